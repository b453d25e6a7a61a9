// The report's data read out of core (runs and sensitivity whole, convergence as a digest by SQL, the fields
// streamed once) is the data assembled with every table in memory, for a study whose convergence table is larger
// than the report holds, so that the digest's first rows, counts, plotted rows and unconverged warnings are read
// from the file by DuckDB.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { solve } from '../solver/index.js';
import { Ledger } from '../coordinator/ledger/ledger.js';
import { writeOutputs } from '../coordinator/outputs/tables.js';
import { expandSweep } from '../coordinator/sweep/expand.js';
import { parseSweep } from '../coordinator/sweep/file.js';
import { readReportFolder } from '../coordinator/analysis/read-tables.js';
import { assembleReportData } from '../coordinator/report/assembly.js';
import { assembleReportFromFolder } from '../coordinator/report/from-folder.js';
import { MAX_TABLE_ROWS } from '../coordinator/report/data.js';

const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

describe('report data from a folder', () => {
  it('when read out of core then it equals the data assembled in memory, with a convergence table larger than the report holds', async () => {
    const ranges = Array.from({ length: 110 }, (_, k) => 2000 + 500 * k);
    const input = {
      name: 'report-from-folder',
      description: 'a resolution study at two frequencies over land (invented)',
      base: {
        frequency_hz: 20000,
        ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30 }] },
        domain: { range_m: 60000, height_m: 20000 },
        receivers: { ranges_m: ranges },
      },
      vary: { frequency_hz: { values: [20000, 24000] }, 'grid.cells_per_wavelength': { values: [8, 12, 16] } },
      resolution_axis: 'grid.cells_per_wavelength',
    };
    const sweep = parseSweep(input);
    const jobs = expandSweep(sweep);
    const out = mkdtempSync(join(tmpdir(), 'loamwave-report-folder-'));
    dirs.push(out);
    const ledger = Ledger.open(out);
    ledger.addJobs(jobs);
    // the real solver on tiny cases; one job left failed, so the runs table and warnings have one
    for (const j of jobs.slice(1)) ledger.commitResult({ ...solve(j.case), job_id: j.job_id, wall_time_s: 0.25 });
    ledger.markFailed(jobs[0].job_id, 'made-up failure for the test', 1);
    const summary = await writeOutputs(ledger, sweep, JSON.stringify(input), out, { jobs });
    ledger.close();
    expect(summary.convergenceRows).toBeGreaterThan(MAX_TABLE_ROWS);
    const options = { generatedBy: 'test' };
    const inMemory = assembleReportData(await readReportFolder(out), options);
    const outOfCore = await assembleReportFromFolder(out, options);
    expect(outOfCore.convergence_summary).not.toBeNull();
    expect(outOfCore.convergence_plotted!.length).toBeGreaterThan(0);
    expect(outOfCore).toEqual(inMemory);
  });
});
