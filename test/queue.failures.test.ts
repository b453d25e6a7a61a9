// `run --redis` end to end with a deterministic failure among the jobs: the failing case is not retried (it fails
// the same way every time), its reason reaches the ledger and runs.parquet, the good case is done, and the run
// exits non-zero after writing the outputs. (A case the solver refuses never gets this far: the expansion refuses
// the sweep. What only a worker knows is its own memory cap.)
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { queueFixture } from './helpers/queue-fixture.js';

const fx = queueFixture('failures');

describe('run --redis with a failing case', () => {
  it('when one case is larger than the workers\' memory cap then it fails once with its reason and the good case is done', async () => {
    // 8 cells per wavelength: about 0.6 MiB; 40 cells per wavelength: about 5.4 MiB (estimateCost), over the
    // workers' cap of 2 MiB every time.
    const sweep = join(fx.scratch, 'saltmarsh-lf.yaml');
    writeFileSync(
      sweep,
      [
        'name: saltmarsh-lf',
        'base:',
        '  frequency_hz: 300000',
        '  ground: { model: impedance, segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 15 }] }',
        '  domain: { range_m: 20000, height_m: 5000 }',
        '  receivers: { ranges_m: [5000, 15000] }',
        'vary:',
        '  grid.cells_per_wavelength: { values: [8, 40] }',
        '',
      ].join('\n'),
    );
    const out = join(fx.scratch, 'out');
    const q = fx.queueArgs();
    const worker = fx.start(['worker', ...q, '--sweep', 'saltmarsh-lf', '--max-memory-mib', '2']);
    const run = fx.start(['run', sweep, '--out', out, '--json', ...q]);
    const { code } = await run.exited;
    expect(code, run.log()).toBe(1);
    expect(run.log()).toContain('1 job(s) failed');

    const db = new Database(join(out, 'ledger.sqlite'), { readonly: true });
    const rows = db.prepare('SELECT status, attempts, error FROM jobs ORDER BY idx').all() as Array<{ status: string; attempts: number; error: string | null }>;
    db.close();
    expect(rows[0]).toMatchObject({ status: 'done', error: null });
    expect(rows[1].status).toBe('failed');
    expect(rows[1].error).toMatch(/^too_large: .*more than the 2(\.0+)? MiB allowed per case/);
    // Unrecoverable: one attempt of the three a crash would get.
    expect(rows[1].attempts).toBe(1);

    const duck = await DuckDBInstance.create(':memory:');
    const conn = await duck.connect();
    try {
      const reader = await conn.runAndReadAll(`SELECT status, error FROM read_parquet('${join(out, 'runs.parquet')}') ORDER BY "index"`);
      const got = reader.getRowObjects();
      expect(got.map((r) => r.status)).toEqual(['done', 'failed']);
      expect(String(got[1].error)).toContain('MiB allowed per case');
    } finally {
      conn.closeSync();
      duck.closeSync();
    }

    worker.child.kill('SIGTERM');
    expect((await worker.exited).code).toBe(0);
  });
});
