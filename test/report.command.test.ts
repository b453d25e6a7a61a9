// `loamwave report DIR` on a real output folder: real solver results in a real ledger, written to Parquet by the
// outputs module, read back by the command through DuckDB, and the page checked in headless Chromium. Also the
// one-line errors for bad input, and Sobol' indices assembled from a Saltelli runs table.
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { main } from '../coordinator/cli.js';
import { Ledger } from '../coordinator/ledger/ledger.js';
import { writeOutputs } from '../coordinator/outputs/tables.js';
import { saltelliDesign } from '../coordinator/sampling/saltelli-layout.js';
import { computeSensitivity, type Notes } from '../coordinator/analysis/compute-tables.js';
import type { FolderTables } from '../coordinator/analysis/read-tables.js';
import { expandSweep } from '../coordinator/sweep/expand.js';
import { parseSweep, parseSweepText } from '../coordinator/sweep/file.js';
import { solve } from '../solver/index.js';
import { checkReportPage, launchChromium, type Browser } from './report.page-check.js';

// An invented scenario: the Pelquarrin VLF test transmitter, three frequencies, two ground conductivities, three grids.
const SWEEP_TEXT = `name: pelquarrin-fen
description: Demo sweep for the invented Pelquarrin VLF test transmitter over fen ground.
base:
  frequency_hz: 20000
  ground: {model: impedance, segments: [{start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30}]}
  domain: {range_m: 60000, height_m: 20000}
  grid: {cells_per_wavelength: 8}
  receivers: {ranges_m: [10000, 25000, 40000]}
vary:
  frequency_hz: {values: [20000, 24000, 28000]}
  ground.segments[0].conductivity_s_per_m: {values: [0.005, 0.02]}
  grid.cells_per_wavelength: {values: [6, 9, 13]}
`;

const dirs: string[] = [];
function freshDir(): string {
  const d = mkdtempSync(join(tmpdir(), 'loamwave-report-'));
  dirs.push(d);
  return d;
}

/** Run the command line in-process; returns the exit code and what it wrote to stderr. */
async function runCli(args: string[]): Promise<{ code: number; stderr: string; stdout: string }> {
  const saved = { err: process.stderr.write.bind(process.stderr), out: process.stdout.write.bind(process.stdout), code: process.exitCode };
  let stderr = '';
  let stdout = '';
  process.stderr.write = ((chunk: string | Uint8Array) => ((stderr += String(chunk)), true)) as typeof process.stderr.write;
  process.stdout.write = ((chunk: string | Uint8Array) => ((stdout += String(chunk)), true)) as typeof process.stdout.write;
  process.exitCode = undefined;
  try {
    await main(['node', 'loamwave', ...args]);
    return { code: Number(process.exitCode ?? 0), stderr, stdout };
  } finally {
    process.stderr.write = saved.err;
    process.stdout.write = saved.out;
    process.exitCode = saved.code;
  }
}

describe('report command on a real output folder', () => {
  const sweep = parseSweep(parseSweepText(SWEEP_TEXT, 'sweep.yaml'), 'sweep.yaml');
  const jobs = expandSweep(sweep, 'sweep.yaml');
  const out = freshDir();
  const failed = jobs.find((j) => j.params.frequency_hz === 28000 && j.params['grid.cells_per_wavelength'] === 13 && j.params['ground.segments[0].conductivity_s_per_m'] === 0.005)!;
  let browser: Browser;

  beforeAll(async () => {
    const ledger = Ledger.open(out);
    ledger.addJobs(jobs);
    for (const job of jobs) {
      if (job === failed) continue;
      // Real solves: 60 km × 20 km at 6–13 cells per wavelength, about 0.1 s each.
      ledger.commitResult({ ...solve(job.case), job_id: job.job_id, wall_time_s: 0.1 });
    }
    ledger.markFailed(failed.job_id, 'worker lost (demo failure)', 1);
    await writeOutputs(ledger, sweep, SWEEP_TEXT, out, { jobs });
    ledger.close();
    browser = await launchChromium();
  });
  afterAll(async () => {
    await browser?.close();
    for (const d of dirs) rmSync(d, { recursive: true, force: true });
  });

  it('when run on the folder then report.html is written and every plot renders in Chromium without errors or requests', async () => {
    const r = await runCli(['report', out, '--json']);
    expect(r.code, r.stderr).toBe(0);
    const written = JSON.parse(r.stdout) as { path: string; plots: number };
    expect(written.path).toBe(join(out, 'report.html'));
    const shots = resolve('test-output');
    mkdirSync(shots, { recursive: true });
    copyFileSync(written.path, join(shots, 'report-folder.html'));
    const page = await checkReportPage(browser, written.path, join(shots, 'report-folder.png'));
    // Two field plots per varied input (3), two convergence plots, and for each of the 6 outputs (dB and residual
    // phase at 3 receivers) an SRC chart and a μ* chart: 12, the most the report draws.
    expect(page.plots.length).toBe(written.plots);
    expect(page.plots.filter((p) => p.startsWith('field-'))).toHaveLength(6);
    expect(page.plots.filter((p) => p.startsWith('convergence-'))).toEqual(['convergence-ez_db_uv_per_m', 'convergence-ez_phase_deg']);
    expect(page.plots.filter((p) => p.startsWith('sensitivity-'))).toHaveLength(12);
    for (const id of page.plots) expect(page.marks[id].paths, id).toBeGreaterThan(0);
    expect(page.errors).toEqual([]);
    expect(page.requests).toEqual([]);
    expect(page.runRows).toBe(jobs.length);
  });

  it('when a group lacks a grid level then it gets no verdict, and the failed job is listed', async () => {
    const html = readFileSync(join(out, 'report.html'), 'utf8');
    // 6 groups (3 frequencies × 2 conductivities) less the one with a failed level, × 3 receivers × 2 outputs.
    expect((html.match(/<td>monotone<\/td>|<td>oscillatory<\/td>|<td>divergent<\/td>|<td>zero_difference<\/td>/g) ?? []).length).toBe(5 * 3 * 2);
    expect(html).toContain('worker lost (demo failure)');
    // Sensitivity uses the finest grid only: 3 frequencies × 2 conductivities less the failed run.
    expect(html).toContain('Sensitivity uses the 5 runs on the finest level of grid.cells_per_wavelength (13)');
    expect(html).toContain(`${jobs.length} (${jobs.length - 1} done, 1 failed, 0 pending)`);
  });

  it.each([
    ['a folder that does not exist', (d: string) => [join(d, 'missing')], /no such folder/],
    ['a folder without runs.parquet', (d: string) => [d], /no runs\.parquet here/],
    ['a tolerance that is not a number', () => [out, '--tolerance-db', 'lots'], /--tolerance-db: must be a number > 0/],
  ])('when given %s then it exits 2 with one line and writes nothing', async (_case, args, message) => {
    const empty = freshDir();
    const before = existsSync(join(out, 'report.html')) ? readFileSync(join(out, 'report.html'), 'utf8') : '';
    const r = await runCli(['report', ...args(empty)]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^error: report: /);
    expect(existsSync(join(empty, 'report.html'))).toBe(false);
    if (before) expect(readFileSync(join(out, 'report.html'), 'utf8')).toBe(before);
  });
});

describe('sensitivity assembled from a Saltelli runs table', () => {
  it('when the runs carry design roles and Ishigami outputs then the Sobol indices are the analytic ones', () => {
    // Ishigami & Homma 1990, a = 7, b = 0.1 (docs/references.md, derived): S = 0.313905, 0.442411, 0 and
    // ST = 0.557589, 0.442411, 0.243684. The runs table is shuffled so only design_role/design_sample place them.
    const n = 1024;
    const sweep = parseSweep(
      parseSweepText(
        `name: ishigami-check
base: {frequency_hz: 20000, ground: {segments: [{start_m: 0, conductivity_s_per_m: 0.01}]}, domain: {range_m: 60000, height_m: 20000}, receivers: {ranges_m: [10000]}}
vary:
  frequency_hz: {uniform: {from: 10000, to: 30000}}
  ground.segments[0].conductivity_s_per_m: {uniform: {from: 0.001, to: 0.1}}
  ground.segments[0].relative_permittivity: {uniform: {from: 5, to: 40}}
design: {kind: saltelli, samples: ${n}, seed: 3}
`,
        'sweep.yaml',
      ),
      'sweep.yaml',
    );
    const { points } = saltelliDesign(3, n, 3);
    const roleOf = (row: number) => (row < n ? 'A' : row < 2 * n ? 'B' : `AB_${Math.floor(row / n) - 2}`);
    const runs = points.map((u, row) => ({ job_id: `j${row}`, status: 'done', design_role: roleOf(row), design_sample: row % n, u }));
    runs.sort((a, b) => (a.job_id.length - b.job_id.length) || (a.job_id < b.job_id ? 1 : -1));
    const tables: FolderTables = {
      sweep,
      sweepFileName: 'sweep.yaml',
      runColumns: ['job_id', 'status', 'design_role', 'design_sample'],
      runs: runs.map(({ u: _u, ...r }) => r),
      fields: runs.map((r) => {
        const [x1, x2, x3] = Array.from(r.u, (v) => -Math.PI + 2 * Math.PI * v);
        return { job_id: r.job_id, range_m: 10000, height_m: 0, ez_db_uv_per_m: Math.sin(x1) + 7 * Math.sin(x2) ** 2 + 0.1 * x3 ** 4 * Math.sin(x1), ez_phase_deg: 0 };
      }),
      convergence: null,
      sensitivity: null,
    };
    const notes: Notes = { warnings: [] };
    const rows = computeSensitivity(tables, notes).filter((r) => r.output === 'ez_db_uv_per_m@10km');
    // The residual phase of these runs is the same everywhere (one frequency, phase 0): it has nothing to apportion.
    expect(notes.warnings.map((w) => w.message)).toEqual([
      'sensitivity of residual_phase_deg@10km: the output does not vary over A and B, so it has no variance to apportion',
    ]);
    const get = (m: string) => rows.filter((r) => r.measure === m).map((r) => r.value);
    // N = 1024 (5120 evaluations): bootstrap standard errors about 0.04 (S) and up to 0.045 (ST1); measured errors
    // at most 0.024 (S3) and 0.0023 (ST): tolerance 0.05, a little over one standard error.
    get('first_order').forEach((v, i) => expect(Math.abs(v - [0.313905, 0.442411, 0][i])).toBeLessThan(0.05));
    get('total_order').forEach((v, i) => expect(Math.abs(v - [0.557589, 0.442411, 0.243684][i])).toBeLessThan(0.05));

    // With one run failed the estimators cannot be used: no rows, and one warning saying what to do.
    const short = { ...tables, runs: tables.runs.map((r, k) => (k === 7 ? { ...r, status: 'failed' } : r)) };
    const shortNotes: Notes = { warnings: [] };
    expect(computeSensitivity(short, shortNotes)).toEqual([]);
    expect(shortNotes.warnings).toHaveLength(1);
    expect(shortNotes.warnings[0].message).toMatch(/1 of 5120 Saltelli runs have no result/);
  });
});
