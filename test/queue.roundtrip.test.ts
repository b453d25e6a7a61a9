// The Redis path end to end with real processes: a 20-job sweep submitted to a real Redis, solved by two spawned
// worker processes and collected into the ledger gives results bit-identical to the embedded run; submitting
// again queues nothing; once collected, the sweep leaves no jobs behind in Redis.
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CLI, killAll, runCli, until } from './helpers/cli-process.js';
import { ensureCompiled } from './helpers/compiled.js';
import { keysUnder, removeKeys, startRedis, uniquePrefix, type TestRedis } from './helpers/redis.js';


let redis: TestRedis;
let scratch: string;
const prefix = uniquePrefix('roundtrip');
const workers: ChildProcess[] = [];

beforeAll(async () => {
  ensureCompiled();
  redis = await startRedis();
  scratch = mkdtempSync(join(tmpdir(), 'loamwave-roundtrip-'));
});

afterAll(async () => {
  killAll(workers);
  await removeKeys(redis.url, prefix);
  await redis.stop();
  rmSync(scratch, { recursive: true, force: true });
});

const cli = (args: string[]) => runCli(args, scratch);

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
    const sweep = join(scratch, 'quendravel-grid.yaml');
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
    const embeddedOut = join(scratch, 'embedded');
    const queuedOut = join(scratch, 'queued');
    const q = ['--redis', redis.url, '--prefix', prefix];

    const embedded = await cli(['run', sweep, '--out', embeddedOut, '--workers', '2', '--json', '--no-report']);
    expect(embedded.code, embedded.stderr).toBe(0);

    // Both workers serve the sweep's queue before anything is queued, so both take part.
    const logs = ['', ''];
    for (let i = 0; i < 2; i++) {
      const w = spawn(process.execPath, [CLI, 'worker', ...q, '--concurrency', '1', '--sweep', 'quendravel-grid'], { cwd: scratch, stdio: ['ignore', 'ignore', 'pipe'] });
      w.stderr!.on('data', (d) => (logs[i] += d));
      workers.push(w);
    }
    await until('both workers ready', () => logs.every((l) => l.includes('worker ready')));

    const first = await cli(['submit', sweep, '--out', queuedOut, '--json', ...q]);
    expect(first.code, first.stderr).toBe(0);
    expect(JSON.parse(first.stdout)).toMatchObject({ added: 20, already_queued: 0, finished: 0 });
    const again = await cli(['submit', sweep, '--out', queuedOut, '--json', ...q]);
    expect(JSON.parse(again.stdout)).toMatchObject({ added: 0, already_queued: 20 });

    const collected = await cli(['collect', sweep, '--out', queuedOut, '--follow', '--json', '--no-report', ...q]);
    expect(collected.code, collected.stderr).toBe(0);
    expect(JSON.parse(collected.stdout)).toMatchObject({ committed: 20, failed: 0, complete: true });

    // Both worker processes took part (each logs the jobs it finished).
    for (const log of logs) expect(log).toMatch(/job [0-9a-f]{12} done/);

    const a = resultsOf(embeddedOut);
    const b = resultsOf(queuedOut);
    expect(a.size).toBe(20);
    expect([...b.keys()].sort()).toEqual([...a.keys()].sort());
    // toStrictEqual compares numbers with Object.is: every double identical, through JSON in Redis and in SQLite.
    for (const [id, r] of a) expect(b.get(id), id).toStrictEqual(r);

    // Everything collected: no job hash of the sweep is left in Redis, and a new submit queues nothing.
    const left = (await keysUnder(redis.url, prefix)).filter((k) => /:[0-9a-f]{64}$/.test(k));
    expect(left).toEqual([]);
    const after = await cli(['submit', sweep, '--out', queuedOut, '--json', ...q]);
    expect(JSON.parse(after.stdout)).toMatchObject({ added: 0, already_queued: 0, finished: 20 });

    // SIGTERM: each worker finishes (nothing is running) and exits 0.
    const exits = workers.map((w) => new Promise<number | null>((resolve) => w.once('exit', (code) => resolve(code))));
    for (const w of workers) w.kill('SIGTERM');
    expect(await Promise.all(exits)).toEqual([0, 0]);
  });
});
