// Ctrl-C on `run --redis`: the coordinator stops following and exits 130, the jobs stay queued in Redis for the
// workers, and a later `collect --follow` (with a worker running) brings them home without queueing twins.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { until } from './helpers/cli-process.js';
import { queueFixture } from './helpers/queue-fixture.js';

const fx = queueFixture('stop');

describe('run --redis stopped with Ctrl-C', () => {
  it('when the coordinator gets SIGINT then it exits 130, the jobs stay queued, and collect finishes them later', async () => {
    const name = 'quiet-stop';
    const sweep = join(fx.scratch, `${name}.json`);
    writeFileSync(
      sweep,
      JSON.stringify({
        name,
        base: {
          frequency_hz: 20000,
          ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
          domain: { range_m: 60000, height_m: 20000 },
          grid: { cells_per_wavelength: 8 },
          receivers: { ranges_m: [10000, 50000] },
        },
        vary: { 'ground.segments[0].conductivity_s_per_m': { values: [0.001, 0.01, 0.1] } },
      }),
    );
    const out = join(fx.scratch, 'out');
    const q = fx.queueArgs();
    const run = fx.start(['run', sweep, '--out', out, '--no-report', ...q]);
    await until('the jobs to be queued', () => run.log().includes('3 job(s) queued'));
    run.child.kill('SIGINT');
    expect((await run.exited).code, run.log()).toBe(130);
    expect(run.log()).toContain('the jobs stay queued');

    const queue = fx.openQueue(name);
    try {
      expect(await queue.getJobCountByTypes('prioritized', 'waiting')).toBe(3);
    } finally {
      await fx.close(queue);
    }

    const worker = fx.start(['worker', ...q, '--sweep', name]);
    const collected = await fx.run(['collect', sweep, '--out', out, '--follow', '--json', '--no-report', ...q]);
    expect(collected.code, collected.stderr).toBe(0);
    expect(JSON.parse(collected.stdout)).toMatchObject({ committed: 3, complete: true, counts: { done: 3 } });
    worker.child.kill('SIGTERM');
    expect((await worker.exited).code).toBe(0);
    expect(worker.log().match(/ done$/gm)?.length).toBe(3);
  });
});
