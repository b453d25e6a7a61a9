// How fast the solver runs on this machine: cell updates per second, and what a job pays beyond its updates (a
// fixed set-up and hand-over cost, and a cost per receiver and time step). Measured once by timing the real solver
// on small cases, then cached in `$LOAMWAVE_CACHE_DIR/kernel-speed.json` (default `~/.cache/loamwave/`), keyed
// by solver version and CPU model so that an upgrade or another machine measures afresh.
import { mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { cpus, homedir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { z } from 'zod';
import { parseCase, type Case } from '../../schemas/case.js';
import { solve } from '../../solver/index.js';
import { SOLVER_VERSION } from '../../solver/version.js';

export const KernelSpeedSchema = z.strictObject({
  solver_version: z.string(),
  cpu_model: z.string(),
  /** Cell updates per second of one solver thread. */
  cell_updates_per_s: z.number().positive().finite(),
  /** Seconds a solve costs beyond its cell updates and receivers (allocation, set-up, settling checks, result). */
  job_overhead_s: z.number().nonnegative().finite(),
  /** Seconds per receiver per time step (its share of the running DFT, the settling test and the result). */
  receiver_step_s: z.number().nonnegative().finite(),
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
/** Receivers of the many-receiver calibration solve: enough that their cost stands well above timing noise. */
const MANY_RECEIVERS = 500;

/** The tiny case that measures the fixed cost of a solve: 20 kHz, 12 km × 6 km, 8 cells per wavelength. */
const TINY_CASE = {
  frequency_hz: 20000,
  ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30 }] },
  domain: { range_m: 12000, height_m: 6000 },
  grid: { cells_per_wavelength: 8, absorbing_cells: 8 },
  receivers: { ranges_m: [6000] },
} as const;

export function cacheDir(env: NodeJS.ProcessEnv = process.env): string {
  return env.LOAMWAVE_CACHE_DIR ?? join(homedir(), '.cache', 'loamwave');
}

function cpuModel(): string {
  return cpus()[0]?.model?.trim() || 'unknown cpu';
}

/** Mean seconds per solve of `c` over at least `minS` seconds (after one untimed warm-up solve). */
function timeSolves(c: Case, minS: number): { seconds: number; updates: number; steps: number; solves: number } {
  solve(c);
  let updates = 0;
  let solves = 0;
  let steps = 0;
  const start = performance.now();
  let elapsedS = 0;
  while (elapsedS < minS || solves === 0) {
    const r = solve(c);
    updates += r.grid.cell_updates;
    steps = r.grid.steps;
    solves++;
    elapsedS = (performance.now() - start) / 1000;
  }
  return { seconds: elapsedS / solves, updates: updates / solves, steps, solves };
}

/**
 * Time the real solver: the calibration case for the update rate, the same case with MANY_RECEIVERS receivers for
 * the cost per receiver and step, and a tiny case for the fixed cost of a solve. Each cost is what the other two
 * leave unexplained, floored at zero.
 */
export function measureKernelSpeed(nowMs: () => number = Date.now): KernelSpeed {
  const began = performance.now();
  const calibration = parseCase(CALIBRATION_CASE, 'calibration case');
  const base = timeSolves(calibration, MIN_MEASURE_S);
  const rate = base.updates / base.seconds;
  const ranges = Array.from({ length: MANY_RECEIVERS }, (_, i) => 5000 + (i * 140000) / MANY_RECEIVERS);
  const many = timeSolves(parseCase({ ...CALIBRATION_CASE, receivers: { ranges_m: ranges } }, 'calibration case, many receivers'), 0);
  const extraReceivers = MANY_RECEIVERS - CALIBRATION_CASE.receivers.ranges_m.length;
  const receiverStepS = Math.max(0, (many.seconds - base.seconds) / (extraReceivers * many.steps));
  const tiny = timeSolves(parseCase(TINY_CASE, 'tiny calibration case'), MIN_MEASURE_S / 5);
  const jobOverheadS = Math.max(0, tiny.seconds - tiny.updates / rate - TINY_CASE.receivers.ranges_m.length * tiny.steps * receiverStepS);
  return {
    solver_version: SOLVER_VERSION,
    cpu_model: cpuModel(),
    cell_updates_per_s: rate,
    job_overhead_s: jobOverheadS,
    receiver_step_s: receiverStepS,
    measured_s: (performance.now() - began) / 1000,
    solves: base.solves + many.solves + tiny.solves + 3,
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

/** One finished embedded run: its field rows and what it spent outside solving (start-up, ledger, outputs). */
const RunOverheadRecordSchema = z.strictObject({ field_rows: z.number().nonnegative(), overhead_s: z.number().nonnegative().finite() });
const RunOverheadFileSchema = z.strictObject({ cpu_model: z.string(), runs: z.array(RunOverheadRecordSchema) });

/** Runs kept for the fit: recent enough to reflect this machine and release, many enough to span sweep sizes. */
const OVERHEAD_RUNS_KEPT = 20;

/** What a run spends beyond solving, as learned from earlier runs here: fixed + per field row. */
export interface RunOverhead {
  readonly fixed_s: number;
  readonly per_row_s: number;
  /** Earlier runs the fit rests on (0: nothing learned yet, both costs 0). */
  readonly runs: number;
}

function overheadFile(env?: NodeJS.ProcessEnv): string {
  return join(cacheDir(env), 'run-overhead.json');
}

function readOverheadRuns(env?: NodeJS.ProcessEnv): Array<z.infer<typeof RunOverheadRecordSchema>> {
  try {
    const parsed = RunOverheadFileSchema.safeParse(JSON.parse(readFileSync(overheadFile(env), 'utf8')));
    return parsed.success && parsed.data.cpu_model === cpuModel() ? parsed.data.runs : [];
  } catch {
    return [];
  }
}

/** Remember a finished run's overhead (atomically; an unwritable cache is not an error). */
export function recordRunOverhead(fieldRows: number, overheadS: number, env?: NodeJS.ProcessEnv): void {
  if (!(Number.isFinite(overheadS) && overheadS >= 0)) return;
  const runs = [...readOverheadRuns(env), { field_rows: fieldRows, overhead_s: overheadS }].slice(-OVERHEAD_RUNS_KEPT);
  try {
    mkdirSync(cacheDir(env), { recursive: true });
    const file = overheadFile(env);
    const tmp = `${file}.${process.pid}.tmp`;
    writeFileSync(tmp, JSON.stringify({ cpu_model: cpuModel(), runs }, null, 2) + '\n');
    renameSync(tmp, file);
  } catch {
    // read-only cache: nothing learned this time
  }
}

/**
 * The overhead of a run here, by least squares over the runs remembered: overhead ≈ fixed + per_row × rows
 * (ordinary least squares, e.g. Montgomery & Runger, Applied Statistics and Probability for Engineers, ch. 11),
 * with both costs held non-negative (a negative slope falls back to the mean and no per-row cost).
 */
export function runOverhead(env?: NodeJS.ProcessEnv): RunOverhead {
  const runs = readOverheadRuns(env);
  const n = runs.length;
  if (n === 0) return { fixed_s: 0, per_row_s: 0, runs: 0 };
  const mx = runs.reduce((s, r) => s + r.field_rows, 0) / n;
  const my = runs.reduce((s, r) => s + r.overhead_s, 0) / n;
  const sxx = runs.reduce((s, r) => s + (r.field_rows - mx) ** 2, 0);
  const sxy = runs.reduce((s, r) => s + (r.field_rows - mx) * (r.overhead_s - my), 0);
  const slope = sxx > 0 ? sxy / sxx : 0;
  if (slope <= 0) return { fixed_s: my, per_row_s: 0, runs: n };
  const fixed = my - slope * mx;
  if (fixed < 0) return { fixed_s: 0, per_row_s: my / Math.max(mx, 1), runs: n };
  return { fixed_s: fixed, per_row_s: slope, runs: n };
}
