// Runs one case: parse it, refuse it if it needs more memory than allowed, solve, and add what the pure solver
// cannot know (job id, wall time). Every way it can go wrong ends as a `CaseFailure` with a kind, so callers
// (the local pool, the queue processor) decide on retries by kind, never by reading message text.
import { totalmem } from 'node:os';
import { performance } from 'node:perf_hooks';
import { parseCase } from '../schemas/case.js';
import { shownKey, UserError } from '../schemas/errors.js';
import type { JobResult } from '../schemas/result.js';
import { SolveCancelledError, SolverDivergedError } from '../solver/errors.js';
import { estimateCost, solve } from '../solver/index.js';
import { CaseFailure } from './case-failure.js';
import { findJsonHazard } from './json-safe.js';

export interface RunCaseOptions {
  /** Called with the solved fraction, 0..1, as the solver reports it. */
  readonly onProgress?: (fraction: number) => void;
  /** Polled by the solver; once it returns true the run stops and fails with kind `cancelled`. */
  readonly shouldStop?: () => boolean;
  /**
   * Largest memory a case may need, bytes (from `estimateCost(c).memory_bytes`).
   * @defaultValue `defaultMemoryCapBytes(1)`
   */
  readonly maxMemoryBytes?: number;
}

/** Share of the machine's memory all concurrent cases together may use (common practice: leave headroom). */
const MEMORY_SHARE = 0.7;

/** Memory cap per case when `concurrency` cases run side by side on this machine, bytes. */
export function defaultMemoryCapBytes(concurrency: number): number {
  return Math.floor((MEMORY_SHARE * totalmem()) / Math.max(1, concurrency));
}

export function runCase(caseInput: unknown, jobId: string, opts: RunCaseOptions = {}): JobResult {
  const started = performance.now();
  let c;
  try {
    c = parseCase(caseInput, `job ${shownKey(jobId)}`);
  } catch (err) {
    if (err instanceof UserError) throw new CaseFailure('invalid_case', err.message);
    throw err;
  }
  const capBytes = opts.maxMemoryBytes ?? defaultMemoryCapBytes(1);
  let cost;
  try {
    cost = estimateCost(c);
  } catch (err) {
    if (err instanceof UserError) throw new CaseFailure('invalid_case', err.message);
    throw new CaseFailure('internal', (err as Error)?.message ?? String(err));
  }
  if (cost.memory_bytes > capBytes) {
    throw new CaseFailure(
      'too_large',
      `the case needs about ${mib(cost.memory_bytes)} MiB (${cost.cells_total} cells), more than the ${mib(capBytes)} MiB allowed per case; ` +
        'coarsen grid.cells_per_wavelength, shrink the domain, or run fewer cases at once',
    );
  }

  let stopRequested = false;
  const shouldStop = opts.shouldStop
    ? () => {
        if (!stopRequested && opts.shouldStop!()) stopRequested = true;
        return stopRequested;
      }
    : undefined;

  let solved;
  try {
    solved = solve(c, { onProgress: opts.onProgress, shouldStop });
  } catch (err) {
    if (stopRequested || err instanceof SolveCancelledError) throw new CaseFailure('cancelled', 'stopped on request');
    if (err instanceof SolverDivergedError) throw new CaseFailure('diverged', err.message);
    // Cases outside a model's validity (e.g. an impedance ground with a loss tangent below 1) fail every time.
    if (err instanceof UserError) throw new CaseFailure('invalid_case', err.message);
    if (err instanceof RangeError && /allocation|Array buffer/i.test(err.message)) {
      throw new CaseFailure('too_large', `memory allocation failed: ${err.message}`);
    }
    throw new CaseFailure('internal', (err as Error)?.message ?? String(err));
  }
  if (stopRequested) throw new CaseFailure('cancelled', 'stopped on request');

  const hazard = findJsonHazard(solved);
  if (hazard) {
    throw new CaseFailure(
      'diverged',
      `the run produced ${hazard}; the grid is unstable for this case (lower grid.courant or refine the grid)`,
    );
  }
  const wallTimeS = (performance.now() - started) / 1000;
  return { ...solved, job_id: jobId, wall_time_s: wallTimeS };
}

function mib(bytes: number): string {
  return (bytes / 2 ** 20).toFixed(0);
}
