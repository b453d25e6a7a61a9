// The analysis tables computed out of core agree with the in-memory analysis of the same folder, row for row and in
// order, whichever way the field rows are read: streamed in file order (each convergence group held only while
// under way) or sorted group by group by DuckDB, and whichever input varies fastest in job order.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { solve } from '../solver/index.js';
import { Ledger } from '../coordinator/ledger/ledger.js';
import { writeOutputs } from '../coordinator/outputs/tables.js';
import { expandSweep } from '../coordinator/sweep/expand.js';
import { parseSweep } from '../coordinator/sweep/file.js';
import { fieldRecordsOf, openFieldReader, readReportFolder } from '../coordinator/analysis/read-tables.js';
import { computeConvergence, computeConvergenceOutOfCore, computeSensitivity, computeSensitivityOutOfCore, inFlightRows } from '../coordinator/analysis/compute-tables.js';
import type { ConvergenceRow } from '../schemas/analysis-rows.js';

const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

/** A small resolution study over two frequencies (invented), its vary keys in the order given, written to a folder. */
async function studyFolder(resolutionFirst: boolean): Promise<string> {
  const cpw = { 'grid.cells_per_wavelength': { values: [8, 12, 16] } };
  const freq = { frequency_hz: { values: [20000, 24000] } };
  const input = {
    name: 'out-of-core',
    base: {
      frequency_hz: 20000,
      ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30 }] },
      domain: { range_m: 60000, height_m: 20000 },
      receivers: { ranges_m: [30000, 10000, 20000] },
    },
    vary: resolutionFirst ? { ...cpw, ...freq } : { ...freq, ...cpw },
    resolution_axis: 'grid.cells_per_wavelength',
  };
  const sweep = parseSweep(input);
  const jobs = expandSweep(sweep);
  const out = mkdtempSync(join(tmpdir(), 'loamwave-ooc-'));
  dirs.push(out);
  const ledger = Ledger.open(out);
  ledger.addJobs(jobs);
  // the real solver on tiny cases (8-16 cells per wavelength, 60 km x 20 km)
  for (const j of jobs) ledger.commitResult({ ...solve(j.case), job_id: j.job_id, wall_time_s: 0.25 });
  await writeOutputs(ledger, sweep, JSON.stringify(input), out, { jobs, analysis: false });
  ledger.close();
  return out;
}

async function outOfCore(out: string, streamMaxRows?: number): Promise<ConvergenceRow[]> {
  const tables = await readReportFolder(out, { fields: false });
  const reader = await openFieldReader(out, out);
  const byGroup: Array<[number, readonly ConvergenceRow[]]> = [];
  try {
    await computeConvergenceOutOfCore(tables, reader, { generatedBy: 'test' }, async (rows, g) => void byGroup.push([g, rows]), { streamMaxRows });
  } finally {
    reader.close();
  }
  return byGroup.sort((a, b) => a[0] - b[0]).flatMap(([, rows]) => rows);
}

describe('analysis out of core', () => {
  for (const resolutionFirst of [false, true]) {
    it(`when the resolution axis is listed ${resolutionFirst ? 'first' : 'last'} then streamed and sorted reads give the in-memory convergence rows`, async () => {
      const out = await studyFolder(resolutionFirst);
      const inMemory = computeConvergence(await readReportFolder(out).then((t) => ({ ...t, fields: fieldRecordsOf(t.fields) })), { generatedBy: 'test' });
      expect(inMemory).toHaveLength(2 * 3 * 2);
      expect(await outOfCore(out)).toEqual(inMemory);
      // no streaming allowed: DuckDB sorts the rows group by group
      expect(await outOfCore(out, 0)).toEqual(inMemory);
    });
  }

  it('when the sensitivity rows are computed from the streamed fields then they are the in-memory ones', async () => {
    const out = await studyFolder(false);
    const folder = await readReportFolder(out);
    const inMemory = computeSensitivity({ ...folder, fields: fieldRecordsOf(folder.fields) }, { warnings: [] });
    const reader = await openFieldReader(out, out);
    try {
      expect(await computeSensitivityOutOfCore(await readReportFolder(out, { fields: false }), reader, { warnings: [] })).toEqual(inMemory);
    } finally {
      reader.close();
    }
  });

  it('when groups interleave in job order then the rows held at once are those of every group under way', () => {
    const rows = () => 10;
    // three groups of two jobs: side by side, then interleaved (0 3, 1 4, 2 5)
    expect(inFlightRows([['a', 'b'], ['c', 'd'], ['e', 'f']], (id) => 'abcdef'.indexOf(id), rows)).toBe(20);
    expect(inFlightRows([['a', 'd'], ['b', 'e'], ['c', 'f']], (id) => 'abcdef'.indexOf(id), rows)).toBe(60);
  });
});

