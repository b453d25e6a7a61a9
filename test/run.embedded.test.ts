// The embedded default, driven through the built command line: a sweep runs on local threads into the ledger
// and the outputs, a rerun computes nothing, Ctrl-C leaves a ledger a rerun continues from, progress on a pipe
// is plain text, and a bad sweep is one line with nothing written.
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCase } from '../worker/run-case.js';
import { CLI, runCliSync } from './helpers/cli-process.js';
import { ensureCompiled } from './helpers/compiled.js';


/** An invented inland path: conductivity × resolution, small enough for seconds in total. */
function sweepYaml(name: string, cellsPerWavelength: number, conductivities: number[]): string {
  return [
    `name: ${name}`,
    'base:',
    '  frequency_hz: 20000',
    '  ground: { model: impedance, segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] }',
    '  domain: { range_m: 60000, height_m: 20000 }',
    `  grid: { cells_per_wavelength: ${cellsPerWavelength} }`,
    '  receivers: { ranges_m: [10000, 30000, 50000] }',
    'vary:',
    `  ground.segments[0].conductivity_s_per_m: { values: [${conductivities.join(', ')}] }`,
    '',
  ].join('\n');
}

const cli = runCliSync;

function ledgerRows(dir: string): Array<{ job_id: string; status: string; attempts: number; result_json: string | null }> {
  const db = new Database(join(dir, 'ledger.sqlite'), { readonly: true });
  try {
    return db
      .prepare('SELECT jobs.job_id, status, attempts, result_json FROM jobs LEFT JOIN results USING (job_id) ORDER BY idx')
      .all() as Array<{ job_id: string; status: string; attempts: number; result_json: string | null }>;
  } finally {
    db.close();
  }
}

let scratch: string;
beforeAll(() => {
  ensureCompiled();
  scratch = mkdtempSync(join(tmpdir(), 'loamwave-run-'));
});
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe('loamwave run (embedded)', () => {
  it('when a sweep runs then every job is done with the numbers of an in-process solve, and a rerun solves nothing', () => {
    const sweep = join(scratch, 'inland-a.yaml');
    writeFileSync(sweep, sweepYaml('inland-a', 8, [0.001, 0.003, 0.01, 0.03]));
    const out = join(scratch, 'out-a');
    const first = cli(['run', sweep, '--out', out, '--workers', '2', '--json'], scratch);
    expect(first.stderr).not.toContain('error');
    expect(first.code).toBe(0);
    const s1 = JSON.parse(first.stdout);
    expect(s1).toMatchObject({ jobs: 4, solved_now: 4, solver_calls: 4, counts: { done: 4 } });
    for (const f of ['runs.parquet', 'fields', 'report.html']) expect(existsSync(join(out, f)), f).toBe(true);

    // The ledger's JSON text reads back as the doubles an in-process solve of the same case gives (determinism
    // contract; JSON round trip exact per ECMA-262 Number::toString).
    const rows = ledgerRows(out);
    for (const row of rows) {
      const stored = JSON.parse(row.result_json!);
      const db = new Database(join(out, 'ledger.sqlite'), { readonly: true });
      const caseJson = (db.prepare('SELECT case_json FROM jobs WHERE job_id = ?').get(row.job_id) as { case_json: string }).case_json;
      db.close();
      const { wall_time_s: _a, ...want } = runCase(JSON.parse(caseJson), row.job_id);
      const { wall_time_s: _b, ...got } = stored;
      expect(got).toStrictEqual(want);
    }

    const again = cli(['run', sweep, '--out', out, '--json', '--no-report'], scratch);
    expect(again.code, again.stderr).toBe(0);
    expect(JSON.parse(again.stdout)).toMatchObject({ solved_now: 0, solver_calls: 0, counts: { done: 4 } });
    expect(ledgerRows(out).map((r) => r.attempts)).toEqual(rows.map((r) => r.attempts));
  });

  it.each([
    ['once', 1, 'lets the running job finish'],
    ['twice', 2, 'abandons the running job'],
  ])('when Ctrl-C comes %s mid-run then the exit is 130, the ledger is consistent and a rerun finishes only what was left', async (_n, signals) => {
    const name = `inland-stop-${signals}`;
    const sweep = join(scratch, `${name}.yaml`);
    // Six jobs of about a second each on one thread (40 cells per wavelength).
    writeFileSync(sweep, sweepYaml(name, 40, [0.001, 0.002, 0.003, 0.005, 0.01, 0.02]));
    const out = join(scratch, `out-${name}`);
    const child = spawn(process.execPath, [CLI, 'run', sweep, '--out', out, '--workers', '1'], { cwd: scratch, stdio: ['ignore', 'pipe', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (d) => (stderr += d));
    const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
    // Wait until the first result is committed, then signal.
    for (;;) {
      await new Promise((r) => setTimeout(r, 100));
      try {
        if (ledgerRows(out).some((r) => r.status === 'done')) break;
      } catch {
        // the ledger is not created yet
      }
    }
    for (let i = 0; i < signals; i++) child.kill('SIGINT');
    const code = await exited;
    expect(code, stderr).toBe(130);
    const rows = ledgerRows(out);
    const done = rows.filter((r) => r.status === 'done').length;
    expect(rows.every((r) => r.status === 'done' || r.status === 'pending')).toBe(true);
    expect(rows.filter((r) => r.status === 'done').every((r) => r.result_json !== null)).toBe(true);
    expect(done).toBeGreaterThanOrEqual(1);
    expect(done).toBeLessThan(6);
    expect(existsSync(join(out, 'runs.parquet'))).toBe(false);

    const rerun = cli(['run', sweep, '--out', out, '--workers', '2', '--json', '--no-report'], scratch);
    expect(rerun.code, rerun.stderr).toBe(0);
    expect(JSON.parse(rerun.stdout)).toMatchObject({ solver_calls: 6 - done, counts: { done: 6 } });
  });

  it('when stderr is a pipe then progress comes as plain lines without escape codes', () => {
    const sweep = join(scratch, 'inland-plain.yaml');
    writeFileSync(sweep, sweepYaml('inland-plain', 8, [0.001, 0.01]));
    const r = cli(['run', sweep, '--out', join(scratch, 'out-plain'), '--no-report'], scratch, { NO_COLOR: '1' });
    expect(r.code).toBe(0);
    expect(r.stdout).toBe(''); // quiet on stdout without --json
    expect(r.stderr).toMatch(/2\/2 done/);
    expect(r.stderr).not.toMatch(/\u001b|\r/);
  });

  it('when a finished sweep is run again then no output file is rewritten, and report rewrites only report.html', () => {
    const sweep = join(scratch, 'inland-noop.yaml');
    writeFileSync(sweep, sweepYaml('inland-noop', 8, [0.001, 0.01]));
    const out = join(scratch, 'out-noop');
    expect(cli(['run', sweep, '--out', out], scratch).code).toBe(0);
    const stamp = () =>
      Object.fromEntries(
        ['runs.parquet', 'fields/part=0/data.parquet', 'convergence.parquet', 'report.html', '.loamwave-outputs.json'].map((f) => [
          f,
          statSync(join(out, f)).mtimeMs,
        ]),
      );
    const first = stamp();
    const again = cli(['run', sweep, '--out', out], scratch);
    expect(again.code, again.stderr).toBe(0);
    expect(stamp()).toEqual(first);
    const report = cli(['report', out], scratch);
    expect(report.code, report.stderr).toBe(0);
    const after = stamp();
    expect(after['report.html']).toBeGreaterThan(first['report.html']);
    expect({ ...after, 'report.html': 0 }).toEqual({ ...first, 'report.html': 0 });
    // A changed sweep file (one more conductivity) is new work: the tables are written again.
    writeFileSync(sweep, sweepYaml('inland-noop', 8, [0.001, 0.01, 0.1]));
    expect(cli(['run', sweep, '--out', out, '--no-report'], scratch).code).toBe(0);
    expect(statSync(join(out, 'runs.parquet')).mtimeMs).toBeGreaterThan(first['runs.parquet']);
    expect(existsSync(join(out, 'report.html'))).toBe(false); // it described the old tables
  });

  it('when run with --no-report then the tables are written and no report.html is', () => {
    const sweep = join(scratch, 'inland-noreport.yaml');
    writeFileSync(sweep, sweepYaml('inland-noreport', 8, [0.001, 0.01]));
    const out = join(scratch, 'out-noreport');
    const r = cli(['run', sweep, '--out', out, '--no-report'], scratch);
    expect(r.code, r.stderr).toBe(0);
    for (const f of ['runs.parquet', 'fields', 'convergence.parquet']) expect(existsSync(join(out, f)), f).toBe(true);
    expect(existsSync(join(out, 'report.html'))).toBe(false);
    expect(r.stderr).not.toContain('report.html');
  });

  it.each<[string, (dir: string) => string, RegExp]>([
    ['the sweep file does not exist', (dir) => join(dir, 'missing.yaml'), /missing\.yaml: cannot read the sweep file \(no such file\)/],
    [
      'a varied value breaks a case',
      (dir) => {
        const p = join(dir, 'inland-bad.yaml');
        writeFileSync(p, sweepYaml('inland-bad', 8, [0.001, -1]));
        return p;
      },
      /conductivity_s_per_m/,
    ],
  ])('when %s then the error is one line, the exit code 2 and nothing is written', (_what, make, message) => {
    const dir = mkdtempSync(join(scratch, 'bad-'));
    const r = cli(['run', make(dir), '--out', join(dir, 'out')], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).not.toMatch(/\n\s+at /);
    expect(existsSync(join(dir, 'out'))).toBe(false);
  });
});
