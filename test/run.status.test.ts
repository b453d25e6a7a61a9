// `loamwave status`: counts by state from the ledger, the recent rate and ETA, and with --redis what the queue
// holds; it reads only, and a sweep never run is one clear line.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { rateAndEta } from '../coordinator/commands/status.js';
import type { LedgerJob } from '../coordinator/ledger/ledger.js';
import { queueFixture } from './helpers/queue-fixture.js';

const fx = queueFixture('status');
const cli = (args: string[]) => fx.runSync(args);

function sweepFile(name: string, values: number[]): string {
  const p = join(fx.scratch, `${name}.json`);
  writeFileSync(
    p,
    JSON.stringify({
      name,
      base: {
        frequency_hz: 20000,
        ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
        domain: { range_m: 60000, height_m: 20000 },
        grid: { cells_per_wavelength: 8 },
        receivers: { ranges_m: [10000, 50000] },
      },
      vary: { 'ground.segments[0].conductivity_s_per_m': { values } },
    }),
  );
  return p;
}

const job = (status: LedgerJob['status'], finishedAtMs: number | null): LedgerJob => ({
  job_id: `j${Math.random()}`,
  index: 0,
  params: {},
  case: {} as LedgerJob['case'],
  status,
  attempts: 1,
  error: null,
  queued_at_ms: null,
  started_at_ms: null,
  finished_at_ms: finishedAtMs,
  design_role: null,
  design_sample: null,
});

describe('rateAndEta', () => {
  const now = 1_000_000_000;
  // Rate = jobs finished in the last 10 minutes / minutes since the first of them; ETA = outstanding / rate
  // (constant-rate extrapolation, common practice).
  it.each<[string, LedgerJob[], number, number | null]>([
    ['4 jobs finished over the last 2 minutes, 6 to go', [...[0, 40, 80, 120].map((s) => job('done', now - s * 1000)), ...Array.from({ length: 6 }, () => job('pending', null))], 2, 180],
    ['nothing finished yet', [job('queued', null), job('queued', null)], 0, null],
    ['everything finished long ago', [job('done', now - 3_600_000)], 0, 0],
  ])('when %s then the rate and ETA follow', (_what, jobs, perMin, etaS) => {
    const r = rateAndEta(jobs, now);
    expect(r.per_min).toBeCloseTo(perMin, 9);
    if (etaS === null) expect(r.eta_s).toBeNull();
    else expect(r.eta_s).toBeCloseTo(etaS, 6);
  });
});

describe('loamwave status', () => {
  it('when the sweep was never run then one line says to run or submit it first', () => {
    const r = cli(['status', sweepFile('tarnbeck-never', [0.001, 0.01]), '--out', join(fx.scratch, 'none')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toMatch(/^error: tarnbeck-never: no ledger in .*; run or submit the sweep first/);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
  });

  it('when a sweep has run then the counts show every job done, and with --redis after a submit the queue holds the rest', () => {
    const sweep = sweepFile('tarnbeck', [0.001, 0.01]);
    const out = join(fx.scratch, 'out');
    expect(cli(['run', sweep, '--out', out, '--no-report']).code).toBe(0);
    const done = JSON.parse(cli(['status', sweep, '--out', out, '--json']).stdout);
    expect(done).toMatchObject({ sweep: 'tarnbeck', jobs: 2, counts: { done: 2, failed: 0, pending: 0 }, eta_s: 0 });
    expect(done.rate_per_min).toBeGreaterThan(0);

    // A wider sweep in the same folder: two new jobs, submitted but not solved (no worker runs here).
    const wider = sweepFile('tarnbeck', [0.001, 0.01, 0.03, 0.1]);
    expect(cli(['submit', wider, '--out', out, ...fx.queueArgs()]).code).toBe(0);
    const r = cli(['status', wider, '--out', out, ...fx.queueArgs(), '--json']);
    expect(r.code, r.stderr).toBe(0);
    const s = JSON.parse(r.stdout);
    expect(s.counts).toMatchObject({ done: 2, queued: 2 });
    expect(s.queue).toMatchObject({ name: 'sweep-tarnbeck', counts: { prioritized: 2, active: 0, completed: 0 }, workers: 0 });
    const text = cli(['status', wider, '--out', out, ...fx.queueArgs()]).stdout;
    expect(text).toMatch(/^tarnbeck: 2 of 4 done, 0 failed, 0 running, 2 queued, 0 pending$/m);
    expect(text).toMatch(/^queue sweep-tarnbeck: 0 waiting, 2 prioritized/m);
  });
});
