// `--retry-failed`: a job that failed in an earlier run stays failed on a plain rerun (the ledger remembers it),
// and is solved again, to the same numbers, when asked. The failure is written into the ledger directly, as a
// worker crash or a refused result would leave it.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCliSync } from './helpers/cli-process.js';
import { ensureCompiled } from './helpers/compiled.js';

const SWEEP = [
  'name: retry-inland',
  'base:',
  '  frequency_hz: 20000',
  '  ground: { model: impedance, segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] }',
  '  domain: { range_m: 40000, height_m: 15000 }',
  '  grid: { cells_per_wavelength: 8 }',
  '  receivers: { ranges_m: [10000, 30000] }',
  'vary:',
  '  ground.segments[0].conductivity_s_per_m: { values: [0.001, 0.01] }',
  '',
].join('\n');

let scratch: string;
beforeAll(() => {
  ensureCompiled();
  scratch = mkdtempSync(join(tmpdir(), 'loamwave-retry-'));
});
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe('loamwave run --retry-failed', () => {
  it('when a job failed before then a rerun keeps it failed (exit 1), and --retry-failed solves it again to the same numbers', () => {
    const sweep = join(scratch, 'retry.yaml');
    writeFileSync(sweep, SWEEP);
    const out = join(scratch, 'out');
    const run = runCliSync(['run', sweep, '--out', out, '--workers', '1', '--no-report'], scratch);
    expect(run.code, run.stderr).toBe(0);

    const db = new Database(join(out, 'ledger.sqlite'));
    const first = db.prepare('SELECT job_id, result_json FROM jobs JOIN results USING (job_id) ORDER BY idx LIMIT 1').get() as { job_id: string; result_json: string };
    db.prepare('DELETE FROM results WHERE job_id = ?').run(first.job_id);
    db.prepare(`UPDATE jobs SET status = 'failed', error = 'crashed: worker killed', attempts = 3 WHERE job_id = ?`).run(first.job_id);
    db.close();

    const plain = runCliSync(['run', sweep, '--out', out, '--workers', '1', '--no-report', '--json'], scratch);
    expect(plain.code).toBe(1);
    expect(JSON.parse(plain.stdout)).toMatchObject({ solved_now: 0, counts: { done: 1, failed: 1 } });

    const retried = runCliSync(['run', sweep, '--out', out, '--workers', '1', '--no-report', '--json', '--retry-failed'], scratch);
    expect(retried.code).toBe(0);
    expect(retried.stderr).toContain('1 failed job(s) to try again');
    expect(JSON.parse(retried.stdout)).toMatchObject({ solved_now: 1, counts: { done: 2, failed: 0 } });

    const after = new Database(join(out, 'ledger.sqlite'), { readonly: true });
    const row = after.prepare('SELECT status, error, result_json FROM jobs JOIN results USING (job_id) WHERE job_id = ?').get(first.job_id) as {
      status: string;
      error: string | null;
      result_json: string;
    };
    after.close();
    expect(row.status).toBe('done');
    expect(row.error).toBeNull();
    // the solver is deterministic: the same case gives the same numbers (wall time aside)
    const strip = (json: string) => JSON.stringify({ ...JSON.parse(json), wall_time_s: 0 });
    expect(strip(row.result_json)).toBe(strip(first.result_json));
  });
});
