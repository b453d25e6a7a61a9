// How fast the solver runs on this machine, in cell updates per second: measured once by timing the real solver
// on a tiny case, then cached in `$LOAMWAVE_CACHE_DIR/kernel-speed.json` (default `~/.cache/loamwave/`), keyed
// by solver version and CPU model so that an upgrade or another machine measures afresh.
import { mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { cpus, homedir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { z } from 'zod';
import { parseCase } from '../../schemas/case.js';
import { solve } from '../../solver/index.js';
import { SOLVER_VERSION } from '../../solver/version.js';

export const KernelSpeedSchema = z.strictObject({
  solver_version: z.string(),
  cpu_model: z.string(),
  /** Cell updates per second of one solver thread. */
  cell_updates_per_s: z.number().positive().finite(),
  /** Seconds the measurement took, and how many solves it timed. */
  measured_s: z.number().nonnegative(),
  solves: z.number().int().positive(),
  measured_at_ms: z.number().int(),
});
export type KernelSpeed = z.infer<typeof KernelSpeedSchema>;

/**
 * The calibration case: 20 kHz, 16 cells per wavelength, 150 km × 40 km over wet ground (about 0.2 s a solve). Big
 * enough that the bulk update, not the absorbing layers and per-solve set-up, sets the speed, as in real jobs.
 */
export const CALIBRATION_CASE = {
  frequency_hz: 20000,
  ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30 }] },
  domain: { range_m: 150000, height_m: 40000 },
  grid: { cells_per_wavelength: 16 },
  receivers: { ranges_m: [20000, 40000] },
} as const;

/** Time spent measuring at least, seconds: long enough that timer resolution and JIT warm-up stop mattering. */
const MIN_MEASURE_S = 0.5;

export function cacheDir(env: NodeJS.ProcessEnv = process.env): string {
  return env.LOAMWAVE_CACHE_DIR ?? join(homedir(), '.cache', 'loamwave');
}

function cpuModel(): string {
  return cpus()[0]?.model?.trim() || 'unknown cpu';
}

/** Time the real solver on the calibration case (one untimed warm-up solve, then at least MIN_MEASURE_S). */
export function measureKernelSpeed(nowMs: () => number = Date.now): KernelSpeed {
  const c = parseCase(CALIBRATION_CASE, 'calibration case');
  solve(c);
  let updates = 0;
  let solves = 0;
  const start = performance.now();
  let elapsedS = 0;
  while (elapsedS < MIN_MEASURE_S) {
    updates += solve(c).grid.cell_updates;
    solves++;
    elapsedS = (performance.now() - start) / 1000;
  }
  return {
    solver_version: SOLVER_VERSION,
    cpu_model: cpuModel(),
    cell_updates_per_s: updates / elapsedS,
    measured_s: elapsedS,
    solves,
    measured_at_ms: nowMs(),
  };
}

/**
 * The cached speed if it was measured by this solver version on this CPU model, else a fresh measurement
 * (written back atomically; an unwritable cache is not an error, the number is simply measured each time).
 */
export function kernelSpeed(options: { env?: NodeJS.ProcessEnv; remeasure?: boolean } = {}): KernelSpeed & { cached: boolean } {
  const dir = cacheDir(options.env);
  const file = join(dir, 'kernel-speed.json');
  if (!options.remeasure) {
    try {
      const cached = KernelSpeedSchema.safeParse(JSON.parse(readFileSync(file, 'utf8')));
      if (cached.success && cached.data.solver_version === SOLVER_VERSION && cached.data.cpu_model === cpuModel()) {
        return { ...cached.data, cached: true };
      }
    } catch {
      // missing or unreadable cache: measure below
    }
  }
  const fresh = measureKernelSpeed();
  try {
    mkdirSync(dir, { recursive: true });
    const tmp = `${file}.${process.pid}.tmp`;
    writeFileSync(tmp, JSON.stringify(fresh, null, 2) + '\n');
    renameSync(tmp, file);
  } catch {
    // read-only home or cache folder: keep the measurement for this run only
  }
  return { ...fresh, cached: false };
}
