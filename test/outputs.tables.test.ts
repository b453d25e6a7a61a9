// Parquet outputs read back with DuckDB (an independent Parquet reader) and compared value by value with the
// ledger: runs.parquet, the Hive-partitioned fields/ table and the sweep copy; and a failure mid-write leaves
// the previous outputs as they were.
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance, type DuckDBConnection } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { JobResult } from '../schemas/result.js';
import { solve } from '../solver/index.js';
import { convergenceTable } from '../coordinator/analysis/grid-convergence.js';
import { Ledger } from '../coordinator/ledger/ledger.js';
import { writeOutputs } from '../coordinator/outputs/tables.js';
import { expandSweep, type ExpandedJob } from '../coordinator/sweep/expand.js';
import { parseSweep, parseSweepText } from '../coordinator/sweep/file.js';

const SIGMA = 'ground.segments[0].conductivity_s_per_m';
const SWEEP_TEXT = `# a small 20-24 kHz study over land and sea ground (invented)
name: outputs-test
base:
  frequency_hz: 20000
  ground: {model: impedance, segments: [{start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30}]}
  domain: {range_m: 60000, height_m: 20000}
  grid: {cells_per_wavelength: 8}
  receivers: {ranges_m: [10000, 25000, 40000]}
vary:
  frequency_hz: {values: [20000, 24000]}
  ${SIGMA}: {values: [0.01, 5]}
`;

const dirs: string[] = [];
let db: DuckDBInstance;
let conn: DuckDBConnection;
beforeAll(async () => {
  db = await DuckDBInstance.create(':memory:');
  conn = await db.connect();
});
afterAll(() => {
  conn.closeSync();
  db.closeSync();
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

function freshDir(): string {
  const d = mkdtempSync(join(tmpdir(), 'loamwave-outputs-'));
  dirs.push(d);
  return d;
}

async function rows(sql: string): Promise<Record<string, unknown>[]> {
  return (await conn.runAndReadAll(sql)).getRowObjectsJS() as Record<string, unknown>[];
}

/** DuckDB gives BIGINT as bigint; compare as numbers (all our integers are below 2^53). */
function plain(v: unknown): unknown {
  return typeof v === 'bigint' ? Number(v) : v;
}

function expectSame(got: unknown, expected: unknown, where: string): void {
  const g = plain(got);
  const e = expected === undefined ? null : expected;
  if (typeof e === 'number') expect(Object.is(g, e), `${where}: got ${show(g)}, expected ${show(e)}`).toBe(true);
  else expect(g, where).toEqual(e);
}

function show(v: unknown): string {
  return Object.is(v, -0) ? '-0' : String(v);
}

function realResult(job: ExpandedJob): JobResult {
  // The real solver on a tiny case (20–24 kHz, 8 cells per wavelength, 60 km × 20 km): well under a second.
  return { ...solve(job.case), job_id: job.job_id, wall_time_s: 0.25 };
}

describe('outputs', () => {
  const sweep = parseSweep(parseSweepText(SWEEP_TEXT, 'sweep.yaml'), 'sweep.yaml');
  const jobs = expandSweep(sweep, 'sweep.yaml');

  it('when a sweep with done, failed and pending jobs is written then DuckDB reads every value the ledger holds', async () => {
    const out = freshDir();
    const ledger = Ledger.open(out);
    ledger.addJobs(jobs);
    // Jobs 0 and 1 solved by the real solver; job 2 carries awkward doubles; job 3 failed; nothing is pending-only.
    ledger.markRunning(jobs[0].job_id);
    ledger.commitResult(realResult(jobs[0]));
    ledger.commitResult(realResult(jobs[1]));
    const awkward = realResult(jobs[2]);
    // −0, a subnormal, 5e-324 and 0.1 + 0.2: the values a lossy writer would change (IEEE 754-2008 binary64).
    awkward.receivers[0].ez = { re: -0, im: 1e-310 };
    awkward.receivers[1].h = { re: 5e-324, im: 0.1 + 0.2 };
    awkward.warnings = ['first; with a semicolon', 'second "quoted"'];
    ledger.commitResult(awkward);
    ledger.markFailed(jobs[3].job_id, 'solver diverged at step 12', 2);
    await writeOutputs(ledger, sweep, SWEEP_TEXT, out, { fieldRowsPerFile: 6 });

    const runs = await rows(`SELECT * FROM read_parquet('${out}/runs.parquet') ORDER BY index`);
    expect(runs.length).toBe(4);
    for (const [i, r] of runs.entries()) {
      const job = jobs[i];
      const row = ledger.get(job.job_id)!;
      const res = ledger.result(job.job_id);
      const g = res?.grid;
      const expected: Record<string, unknown> = {
        job_id: job.job_id, index: job.index, status: row.status,
        frequency_hz: job.params.frequency_hz, ground_segments_0_conductivity_s_per_m: job.params[SIGMA],
        design_role: null, design_sample: null,
        cell_size_m: g?.cell_size_m, time_step_s: g?.time_step_s, steps: g?.steps, steps_per_period: g?.steps_per_period,
        cells_total: g?.cells_total, memory_bytes: g?.memory_bytes, cell_updates: g?.cell_updates, settled: g?.settled,
        settling_change: g?.settling_change, wall_time_s: res?.wall_time_s, solver_version: res?.solver_version,
        warnings: res ? res.warnings.join('; ') : null, error: row.error, attempts: row.attempts,
        queued_at_ms: row.queued_at_ms, started_at_ms: row.started_at_ms, finished_at_ms: row.finished_at_ms,
      };
      expect(Object.keys(r).sort()).toEqual(Object.keys(expected).sort());
      for (const [k, v] of Object.entries(expected)) expectSame(r[k], v, `runs row ${i} ${k}`);
    }
    expect(runs[3]).toMatchObject({ status: 'failed', error: 'solver diverged at step 12', cell_size_m: null });
    expect(runs[2].warnings).toBe('first; with a semicolon; second "quoted"');

    // 3 receivers per job and at most 6 rows per file: 2 jobs per partition, so jobs 0–1 in part=0, job 2 in part=1.
    expect(readdirSync(join(out, 'fields')).sort()).toEqual(['part=0', 'part=1']);
    const fields = await rows(
      `SELECT * FROM read_parquet('${out}/fields/**/*.parquet', hive_partitioning = true) ORDER BY index, range_m`,
    );
    expect(fields.length).toBe(9);
    let n = 0;
    for (const { job, result } of ledger.results()) {
      const ex = jobs.find((j) => j.job_id === job.job_id)!;
      for (const rcv of result.receivers) {
        const f = fields[n++];
        const expected: Record<string, unknown> = {
          job_id: ex.job_id, index: ex.index, part: Math.floor(ex.index / 2), range_m: rcv.range_m, height_m: rcv.height_m,
          ez_re: rcv.ez.re, ez_im: rcv.ez.im, e_horizontal_re: rcv.e_horizontal.re, e_horizontal_im: rcv.e_horizontal.im,
          h_re: rcv.h.re, h_im: rcv.h.im, ez_db_uv_per_m: rcv.ez_db_uv_per_m, ez_phase_deg: rcv.ez_phase_deg,
          frequency_hz: ex.params.frequency_hz, ground_segments_0_conductivity_s_per_m: ex.params[SIGMA],
        };
        expect(Object.keys(f).sort()).toEqual(Object.keys(expected).sort());
        for (const [k, v] of Object.entries(expected)) expectSame(f[k], v, `fields row ${n - 1} ${k}`);
      }
    }
    expect(n).toBe(9);
    const awkwardRow = fields.find((f) => f.job_id === jobs[2].job_id && f.range_m === 10000)!;
    expect(Object.is(awkwardRow.ez_re, -0)).toBe(true);
    expect(awkwardRow.ez_im).toBe(1e-310);
    expect(readFileSync(join(out, 'sweep.yaml'), 'utf8')).toBe(SWEEP_TEXT);
    expect(readdirSync(out).filter((f) => f.startsWith('.outputs-staging-'))).toEqual([]);
    ledger.close();
  });

  it('when nothing has finished yet then fields/ reads as an empty table and runs lists every job as pending', async () => {
    const out = freshDir();
    const ledger = Ledger.open(out);
    ledger.addJobs(jobs);
    await writeOutputs(ledger, sweep, SWEEP_TEXT, out);
    expect((await rows(`SELECT status FROM read_parquet('${out}/runs.parquet')`)).map((r) => r.status)).toEqual(['pending', 'pending', 'pending', 'pending']);
    expect(await rows(`SELECT * FROM read_parquet('${out}/fields/**/*.parquet', hive_partitioning = true)`)).toEqual([]);
    ledger.close();
  });

  it('when writing fails part-way then the previous tables are left exactly as they were', async () => {
    const out = freshDir();
    const ledger = Ledger.open(out);
    ledger.addJobs(jobs);
    ledger.commitResult(realResult(jobs[0]));
    await writeOutputs(ledger, sweep, SWEEP_TEXT, out);
    const before = snapshot(out);
    ledger.commitResult(realResult(jobs[1]));
    // Fault injection: the result stream breaks after its first item, as a crash of the reader would.
    const breaking = Object.create(ledger) as Ledger;
    breaking.resultTextsOf = function* (ids) {
      const it = ledger.resultTextsOf(ids);
      yield it.next().value!;
      throw new Error('simulated crash while writing fields');
    };
    await expect(writeOutputs(breaking, sweep, SWEEP_TEXT, out)).rejects.toThrow('simulated crash');
    expect(snapshot(out)).toEqual(before);
    expect((await rows(`SELECT count(*) AS n FROM read_parquet('${out}/fields/**/*.parquet')`))[0].n).toBe(3n);
    ledger.close();
  });

  it('when a Saltelli sweep is written then design_role and design_sample say where each run sits, and sensitivity.parquet holds its indices', async () => {
    const input = {
      name: 'saltelli-out',
      base: { frequency_hz: 20000, ground: { model: 'pec' }, domain: { range_m: 60000, height_m: 20000 }, grid: { cells_per_wavelength: 8 }, receivers: { ranges_m: [10000, 30000] } },
      design: { kind: 'saltelli', samples: 2, seed: 5 },
      vary: { frequency_hz: { uniform: { from: 15000, to: 25000 } }, 'source.power_w': { log_uniform: { from: 100, to: 10000 } } },
    };
    const text = JSON.stringify(input);
    const s = parseSweep(input);
    const js = expandSweep(s);
    const out = freshDir();
    const ledger = Ledger.open(out);
    ledger.addJobs(js);
    for (const j of js) ledger.commitResult(realResult(j));
    const summary = await writeOutputs(ledger, s, text, out, { jobs: js, sensitivityTable: true });
    const got = await rows(`SELECT design_role, design_sample, frequency_hz FROM read_parquet('${out}/runs.parquet') ORDER BY index`);
    expect(got.map((r) => [r.design_role, Number(r.design_sample)])).toEqual([
      ['A', 0], ['A', 1], ['B', 0], ['B', 1], ['AB_0', 0], ['AB_0', 1], ['AB_1', 0], ['AB_1', 1],
    ]);
    got.forEach((r, i) => expect(Object.is(r.frequency_hz, js[i].params.frequency_hz)).toBe(true));
    expect(readFileSync(join(out, 'sweep.json'), 'utf8')).toBe(text);
    const sens = await rows(`SELECT * FROM read_parquet('${out}/sensitivity.parquet')`);
    expect(sens.length).toBe(summary.sensitivityRows);
    expect(new Set(sens.map((r) => r.measure))).toEqual(new Set(['first_order', 'total_order']));
    expect(new Set(sens.map((r) => r.parameter))).toEqual(new Set(['frequency_hz', 'source_power_w']));
    // The outputs stage writes tables only: report.html is the command layer's, written once after it.
    expect(existsSync(join(out, 'report.html'))).toBe(false);
    ledger.close();
  });

  it('when a resolution study is written then convergence.parquet holds, per receiver, exactly what the analysis computes from runs and fields', async () => {
    const input = {
      name: 'resolution-out',
      base: {
        frequency_hz: 20000,
        ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30 }] },
        domain: { range_m: 60000, height_m: 20000 },
        receivers: { ranges_m: [10000, 30000] },
      },
      vary: { 'grid.cells_per_wavelength': { values: [8, 12, 16] } },
    };
    const s = parseSweep(input);
    const js = expandSweep(s);
    const out = freshDir();
    const ledger = Ledger.open(out);
    ledger.addJobs(js);
    const results = js.map(realResult);
    results.forEach((r) => ledger.commitResult(r));
    await writeOutputs(ledger, s, JSON.stringify(input), out, { jobs: js });
    const conv = await rows(`SELECT * FROM read_parquet('${out}/convergence.parquet') ORDER BY output, range_m`);
    // Independent recomputation from the ledger's results with the analysis module's public function.
    const expected = convergenceTable(
      js.map((j, k) => ({ params: { grid_cells_per_wavelength: j.params['grid.cells_per_wavelength'] }, resolution: j.params['grid.cells_per_wavelength'] as number, receivers: results[k].receivers })),
      { axis: 'cells_per_wavelength', resolutionColumn: 'grid_cells_per_wavelength' },
    ).sort((a, b) => (a.output < b.output ? -1 : a.output > b.output ? 1 : a.range_m - b.range_m));
    expect(conv.length).toBe(4);
    expect(conv.length).toBe(expected.length);
    conv.forEach((row, i) => {
      for (const [k, v] of Object.entries(expected[i])) expectSame(row[k], v, `convergence row ${i} ${k}`);
      // dB and degrees have no natural zero: the relative errors of Celik et al. (2008) are null, the absolute stay.
      expect([row.e_a21, row.e_ext21, row.gci_fine21]).toEqual([null, null, null]);
      expect(row.abs_diff21).toBe(Math.abs((row.phi1 as number) - (row.phi2 as number)));
    });
    ledger.close();
  });
  it('when the analysis fails after the tables are written then runs and fields stay published and no stale analysis file is left', async () => {
    const input = {
      name: 'analysis-fault',
      base: { frequency_hz: 20000, ground: { model: 'pec' }, domain: { range_m: 60000, height_m: 20000 }, receivers: { ranges_m: [10000] } },
      vary: { 'grid.cells_per_wavelength': { values: [8, 12, 16] } },
    };
    const s = parseSweep(input);
    const js = expandSweep(s);
    const out = freshDir();
    const ledger = Ledger.open(out);
    ledger.addJobs(js);
    ledger.commitResult(realResult(js[0]));
    await writeOutputs(ledger, s, JSON.stringify(input), out, { jobs: js });
    const outputs = () => readdirSync(out).filter((f) => !f.startsWith('ledger.sqlite')).sort();
    expect(outputs()).toEqual(['.loamwave-outputs.json', '.loamwave-segments', 'convergence.parquet', 'fields', 'runs.parquet', 'sensitivity.parquet', 'sweep.json']);
    const firstRevision = ledger.revision();
    for (const j of js.slice(1)) ledger.commitResult(realResult(j));
    // Fault: a sweep copy the analysis cannot read back (YAML text that is no sweep) makes the second stage throw.
    await expect(writeOutputs(ledger, s, 'not: a sweep\n', out, { jobs: js })).rejects.toThrow('sweep.yaml');
    expect(outputs()).toEqual(['.loamwave-outputs.json', '.loamwave-segments', 'fields', 'runs.parquet', 'sweep.yaml']);
    // The state left names the first write's revision, not the ledger's now: a rerun writes everything again.
    expect(JSON.parse(readFileSync(join(out, '.loamwave-outputs.json'), 'utf8')).ledger_revision).toBe(firstRevision);
    expect(ledger.revision()).toBeGreaterThan(firstRevision);
    expect((await rows(`SELECT count(*) AS n FROM read_parquet('${out}/fields/**/*.parquet')`))[0].n).toBe(3n);
    ledger.close();
  });
});

/** Name, size and bytes of every output file (the ledger excluded), for before/after comparison. */
function snapshot(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (d: string, rel: string) => {
    for (const name of readdirSync(d).sort()) {
      const p = join(d, name);
      const r = rel ? `${rel}/${name}` : name;
      if (name.startsWith('ledger.sqlite')) continue;
      if (statSync(p).isDirectory()) walk(p, r);
      else out[r] = readFileSync(p).toString('base64');
    }
  };
  walk(dir, '');
  return out;
}
