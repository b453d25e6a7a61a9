// The Redis path end to end with real processes: a 20-job sweep submitted to a real Redis, solved by two spawned
// worker processes and collected into the ledger gives results bit-identical to the embedded run; submitting
// again queues nothing; once collected, the sweep leaves no jobs behind in Redis.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { until } from './helpers/cli-process.js';
import { queueFixture } from './helpers/queue-fixture.js';
import { keysUnder } from './helpers/redis.js';

const fx = queueFixture('roundtrip');
const cli = fx.run;

/** Results by job id from a ledger, wall time removed (the one field that differs between runs). */
function resultsOf(outDir: string): Map<string, unknown> {
  const db = new Database(join(outDir, 'ledger.sqlite'), { readonly: true });
  try {
    const rows = db.prepare('SELECT job_id, result_json FROM results').all() as Array<{ job_id: string; result_json: string }>;
    return new Map(rows.map((r) => {
      const { wall_time_s: _w, ...rest } = JSON.parse(r.result_json);
      return [r.job_id, rest];
    }));
  } finally {
    db.close();
  }
}

describe('queue round trip', () => {
  it('when 20 jobs go through submit, two worker processes and collect then the results equal the embedded run bit for bit', async () => {
    const sweep = join(fx.scratch, 'quendravel-grid.yaml');
    writeFileSync(
      sweep,
      [
        '# Quendravel VLF transmitter (invented): 20 kHz over fen country; conductivity × resolution, 20 small jobs.',
        'name: quendravel-grid',
        'base:',
        '  frequency_hz: 20000',
        '  ground: { model: impedance, segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] }',
        '  domain: { range_m: 60000, height_m: 20000 }',
        '  grid: { cells_per_wavelength: 8 }',
        '  receivers: { ranges_m: [10000, 30000, 50000] }',
        'vary:',
        '  ground.segments[0].conductivity_s_per_m: { values: [0.0005, 0.001, 0.002, 0.003, 0.005, 0.01, 0.02, 0.03, 0.05, 0.1] }',
        '  grid.cells_per_wavelength: { values: [8, 10] }',
        '',
      ].join('\n'),
    );
    const embeddedOut = join(fx.scratch, 'embedded');
    const queuedOut = join(fx.scratch, 'queued');
    const q = fx.queueArgs();

    const embedded = await cli(['run', sweep, '--out', embeddedOut, '--workers', '2', '--json', '--no-report']);
    expect(embedded.code, embedded.stderr).toBe(0);

    // Both workers serve the sweep's queue before anything is queued, so both take part.
    const workers = [0, 1].map(() => fx.start(['worker', ...q, '--concurrency', '1', '--sweep', 'quendravel-grid']));
    await until('both workers ready', () => workers.every((w) => w.log().includes('worker ready')));

    const first = await cli(['submit', sweep, '--out', queuedOut, '--json', ...q]);
    expect(first.code, first.stderr).toBe(0);
    expect(JSON.parse(first.stdout)).toMatchObject({ added: 20, already_queued: 0, finished: 0 });
    const again = await cli(['submit', sweep, '--out', queuedOut, '--json', ...q]);
    expect(JSON.parse(again.stdout)).toMatchObject({ added: 0, already_queued: 20 });

    const collected = await cli(['collect', sweep, '--out', queuedOut, '--follow', '--json', '--no-report', ...q]);
    expect(collected.code, collected.stderr).toBe(0);
    expect(JSON.parse(collected.stdout)).toMatchObject({ committed: 20, failed: 0, complete: true });

    // Both worker processes took part (each logs the jobs it finished).
    for (const w of workers) expect(w.log()).toMatch(/job [0-9a-f]{12} done/);

    const a = resultsOf(embeddedOut);
    const b = resultsOf(queuedOut);
    expect(a.size).toBe(20);
    expect([...b.keys()].sort()).toEqual([...a.keys()].sort());
    // toStrictEqual compares numbers with Object.is: every double identical, through JSON in Redis and in SQLite.
    for (const [id, r] of a) expect(b.get(id), id).toStrictEqual(r);

    // Everything collected: no job hash of the sweep is left in Redis, and a new submit queues nothing.
    const left = (await keysUnder(fx.url, fx.prefix)).filter((k) => /:[0-9a-f]{64}$/.test(k));
    expect(left).toEqual([]);
    const after = await cli(['submit', sweep, '--out', queuedOut, '--json', ...q]);
    expect(JSON.parse(after.stdout)).toMatchObject({ added: 0, already_queued: 0, finished: 20 });

    // SIGTERM: each worker finishes (nothing is running) and exits 0.
    for (const w of workers) w.child.kill('SIGTERM');
    expect((await Promise.all(workers.map((w) => w.exited))).map((e) => e.code)).toEqual([0, 0]);
  });
});
