// `loamwave plan`: job and duplicate counts, cost estimates, longest-first wall time, the measured kernel speed
// and its cache, and refusal of a sweep whose largest job exceeds the memory cap.
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { parseCase } from '../schemas/case.js';
import { estimateCost } from '../solver/index.js';
import { main } from '../coordinator/cli.js';
import { kernelSpeed, recordRunOverhead, runOverhead } from '../coordinator/sweep/kernel-speed.js';
import { longestFirstMakespan } from '../coordinator/sweep/plan.js';

const dir = mkdtempSync(join(tmpdir(), 'loamwave-plan-'));
const cache = join(dir, 'cache');
const SWEEP = join(dir, 'plan.yaml');
let savedCacheEnv: string | undefined;
beforeAll(() => {
  savedCacheEnv = process.env.LOAMWAVE_CACHE_DIR;
  process.env.LOAMWAVE_CACHE_DIR = cache;
  writeFileSync(
    SWEEP,
    `name: plan-test
base:
  frequency_hz: 20000
  ground: {model: impedance, segments: [{start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30}]}
  domain: {range_m: 60000, height_m: 20000}
  receivers: {ranges_m: [10000, 30000]}
vary:
  grid.cells_per_wavelength: {values: [8, 12, 16]}
  frequency_hz: {values: [20000, 30000, 20000]}
`,
  );
});
afterAll(() => {
  if (savedCacheEnv === undefined) delete process.env.LOAMWAVE_CACHE_DIR;
  else process.env.LOAMWAVE_CACHE_DIR = savedCacheEnv;
  rmSync(dir, { recursive: true, force: true });
});
afterEach(() => {
  vi.restoreAllMocks();
  process.exitCode = undefined;
});

/** Run the command line in-process; stdout and stderr captured, exit code as main() sets it. */
async function cli(...args: string[]): Promise<{ out: string; err: string; code: number }> {
  let out = '';
  let err = '';
  vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => ((out += String(s)), true));
  vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => ((err += String(s)), true));
  process.exitCode = undefined;
  await main(['node', 'loamwave', ...args]);
  vi.restoreAllMocks();
  return { out, err, code: Number(process.exitCode ?? 0) };
}

describe('longest-first scheduling', () => {
  it.each([
    // Graham's tight example for m = 3 (SIAM J. Appl. Math. 17(2), 1969): LPT gives 11 where the optimum is 9.
    [[5, 5, 4, 4, 3, 3, 3], 3, 11],
    [[5, 5, 4, 4, 3, 3, 3], 1, 27],
    [[2, 7, 1], 8, 7],
    [[], 4, 0],
  ])('when durations %j run on %i worker(s) then the makespan is %i', (d, m, expected) => {
    expect(longestFirstMakespan(d, m)).toBe(expected);
  });
});

describe('kernel speed', () => {
  it('when no cache exists then the speed is measured and cached, and the next call reads the cache', () => {
    const env = { LOAMWAVE_CACHE_DIR: join(dir, 'speed-cache') };
    const first = kernelSpeed({ env });
    expect(first.cached).toBe(false);
    expect(first.cell_updates_per_s).toBeGreaterThan(0);
    expect(first.measured_s).toBeGreaterThanOrEqual(0.5);
    expect(first.job_overhead_s).toBeGreaterThanOrEqual(0);
    expect(first.receiver_step_s).toBeGreaterThanOrEqual(0);
    const file = join(env.LOAMWAVE_CACHE_DIR, 'kernel-speed.json');
    expect(existsSync(file)).toBe(true);
    const second = kernelSpeed({ env });
    expect(second.cached).toBe(true);
    expect(second.measured_at_ms).toBe(first.measured_at_ms);
    // A cache written by another solver version is not trusted.
    writeFileSync(file, JSON.stringify({ ...JSON.parse(readFileSync(file, 'utf8')), solver_version: '0.0.0' }));
    expect(kernelSpeed({ env }).cached).toBe(false);
  });
});

describe('run overhead learned from earlier runs', () => {
  it('when runs of several sizes were recorded then the fit is their least-squares line, and nothing recorded is no overhead', () => {
    const env = { LOAMWAVE_CACHE_DIR: join(dir, 'overhead-cache') };
    expect(runOverhead(env)).toEqual({ fixed_s: 0, per_row_s: 0, runs: 0 });
    // points on overhead = 2 s + 1e-4 s per row: ordinary least squares recovers the line exactly
    for (const rows of [100, 10_000, 50_000, 200_000]) recordRunOverhead(rows, 2 + 1e-4 * rows, env);
    const fit = runOverhead(env);
    expect(fit.runs).toBe(4);
    expect(fit.fixed_s).toBeCloseTo(2, 9);
    expect(fit.per_row_s).toBeCloseTo(1e-4, 12);
  });

  it('when the runs show no growth with size then the overhead is their mean with no per-row cost', () => {
    const env = { LOAMWAVE_CACHE_DIR: join(dir, 'overhead-flat') };
    recordRunOverhead(100, 3, env);
    recordRunOverhead(1000, 1, env);
    expect(runOverhead(env)).toEqual({ fixed_s: 2, per_row_s: 0, runs: 2 });
  });
});

describe('loamwave plan', () => {
  it('when a sweep is planned then jobs, duplicates, costs and wall time follow from the expansion and the speed', async () => {
    const { out, err, code } = await cli('plan', SWEEP, '--json', '--workers', '2');
    expect(err).toBe('');
    expect(code).toBe(0);
    const plan = JSON.parse(out);
    // 3 × 3 points; frequency 20000 listed twice, so 3 points repeat earlier ones.
    expect(plan).toMatchObject({ sweep: 'plan-test', design_points: 9, jobs: 6, duplicates: 3, workers: 2, fits: true });
    expect(plan.duplicate_points.map((d: { point: number }) => d.point)).toEqual([2, 5, 8]);
    expect(plan.resolution_axis).toBe('grid.cells_per_wavelength');
    let total = 0;
    for (const j of plan.per_job) {
      const c = parseCase({
        frequency_hz: j.params.frequency_hz,
        ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30 }] },
        domain: { range_m: 60000, height_m: 20000 },
        receivers: { ranges_m: [10000, 30000] },
        grid: { cells_per_wavelength: j.params['grid.cells_per_wavelength'] },
      });
      expect(j).toMatchObject(estimateCost(c));
      // the cost model: a fixed cost per job, the updates at the measured rate, and each receiver's cost per step
      const seconds = plan.job_overhead_s + j.cell_updates / plan.cell_updates_per_s + 2 * j.steps * plan.receiver_step_s;
      expect(j.receivers).toBe(2);
      expect(j.core_hours).toBeCloseTo(seconds / 3600, 15);
      total += j.cell_updates;
    }
    expect(plan.total_cell_updates).toBe(total);
    // the makespan of the solves plus what a run spends beyond solving, as learned from earlier runs here
    expect(plan.field_rows).toBe(12);
    expect(plan.overhead_s).toBeGreaterThanOrEqual(0);
    expect(plan.wall_hours).toBeCloseTo(longestFirstMakespan(plan.per_job.map((j: { core_hours: number }) => j.core_hours), 2) + plan.overhead_s / 3600, 12);
    expect(plan.wall_hours).toBeLessThan(plan.total_core_hours);
    expect(plan.wall_hours).toBeGreaterThanOrEqual(plan.total_core_hours / 2);
  });

  it('when the plan is printed for people then it names the counts, the speed and the memory verdict', async () => {
    const { out, code } = await cli('plan', SWEEP, '--workers', '3');
    expect(code).toBe(0);
    expect(out).toContain('sweep plan-test: 9 design point(s), 6 job(s), 3 duplicate point(s) collapsed into earlier jobs');
    expect(out).toContain('wall time on 3 worker(s), longest first');
    expect(out).toMatch(/largest job needs .* within the cap of/);
  });

  it.each([
    [['--max-memory-mib', '0.01'], 'needs', 'raise --max-memory-mib'],
    [['--workers', '0'], "option '--workers <n>' argument '0' is invalid. expected a whole number from 1", ''],
    [['--workers', 'x'], "option '--workers <n>' argument 'x' is invalid", ''],
    [['--max-memory-mib', 'lots'], "option '--max-memory-mib <n>' argument 'lots' is invalid", ''],
  ])('when the options are %j then plan refuses with one line and a non-zero exit', async (extra, first, fix) => {
    const { err, code } = await cli('plan', SWEEP, ...extra);
    expect(code).toBe(2);
    expect(err.trim().split('\n')).toHaveLength(1);
    expect(err).toContain(first);
    expect(err).toContain(fix);
  });
});
