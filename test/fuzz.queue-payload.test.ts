// Property: whatever job data arrives through the queue (a valid payload of a tiny case, mutated, or any value at
// all), the worker's processor (worker/queue-processor.ts, called in-process) returns a result that passes the
// result schema or fails with BullMQ's UnrecoverableError carrying one line `<kind>: …` (invalid_case, too_large,
// diverged), never another exception: an `internal` failure or a plain Error would be retried as a crash.
// Payloads whose case is valid but costly are sent to runCase with a 1-byte memory cap instead of being solved
// (the same parse and pre-step checks, then a too_large refusal), so only tiny cases are solved.
// Property-based testing after Claessen & Hughes, ICFP 2000 (common practice).
import { UnrecoverableError, type SandboxedJob } from 'bullmq';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseCase } from '../schemas/case.js';
import { QueueJobDataSchema } from '../schemas/queue-payload.js';
import { JobResultSchema } from '../schemas/result.js';
import { checkSolvable, estimateCost } from '../solver/index.js';
import processLoamwaveJob from '../worker/queue-processor.js';
import { CaseFailure } from '../worker/case-failure.js';
import { runCase } from '../worker/run-case.js';
import { applyMutations, checkOneLine, mutationsArb, type Json } from './helpers/fuzz-mutations.js';

const RUNS = 3000;
/** Estimated cell updates above which a valid case is not solved here (the tiny case: about 7e3; one that does not
 * settle runs up to 100 times its estimate). */
const SOLVE_AT_MOST_CELL_UPDATES = 3e4;

// 20 kHz (λ = 15 km) at 6 cells per wavelength over a 10 km × 5 km domain with thin absorbing layers: 13 × 11 cells.
const TINY_PAYLOAD: Json = {
  job_id: 'a'.repeat(64),
  case: {
    frequency_hz: 20000,
    ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 15 }, { start_m: 5000, conductivity_s_per_m: 5, relative_permittivity: 70 }] },
    domain: { range_m: 10000, height_m: 5000 },
    grid: { cells_per_wavelength: 6, absorbing_cells: 8 },
    receivers: { ranges_m: [3000, 7000] },
    // stop at the first DFT window after 100 steps (the schema's least max_steps): an unsettled result with its
    // warning, which is still a result; solving to settling would take 200 windows on so coarse a grid
    run: { ramp_periods: 1, dft_periods: 1, max_steps: 100 },
  },
};

/** Just what the processor uses of a BullMQ sandboxed job: its data and the progress and hand-back calls. */
function sandboxedJob(data: unknown): SandboxedJob {
  return { data, updateProgress: async () => undefined, moveToWait: async () => undefined } as unknown as SandboxedJob;
}

/** Whether the payload's case is valid and cheap enough to solve here. */
function cheapToSolve(data: unknown): boolean {
  const p = QueueJobDataSchema.safeParse(data);
  if (!p.success) return true; // refused before any case is read
  try {
    const c = parseCase(p.data.case);
    checkSolvable(c);
    return estimateCost(c).cell_updates <= SOLVE_AT_MOST_CELL_UPDATES;
  } catch {
    return true; // refused before solving
  }
}

const KINDS = /^(invalid_case|too_large|diverged): \S/;

type Outcome = 'solved' | 'refused' | 'capped';

async function throughProcessor(data: unknown): Promise<Outcome> {
  if (!cheapToSolve(data)) {
    const p = QueueJobDataSchema.parse(data);
    try {
      runCase(p.case, p.job_id, { maxMemoryBytes: 1 });
    } catch (e) {
      if (e instanceof CaseFailure && e.kind === 'too_large') return 'capped';
      throw e;
    }
    throw new Error('a 1-byte cap let a case through');
  }
  try {
    const out = (await processLoamwaveJob(sandboxedJob(data))) as unknown;
    // the processor returns the result, or (with a result key) the result in a sealed envelope
    const result = out !== null && typeof out === 'object' && 'result' in out ? (out as { result: unknown }).result : out;
    const r = JobResultSchema.safeParse(result);
    if (!r.success) throw new Error(`the result does not pass the result schema: ${r.error.issues[0]?.message}`);
    return 'solved';
  } catch (e) {
    if (!(e instanceof UnrecoverableError)) throw e;
    if (!KINDS.test(e.message)) throw new Error(`unexpected failure kind: ${e.message}`);
    const bad = checkOneLine(e.message.replace(KINDS, 'x: '), 'x');
    if (bad) throw new Error(`${bad}: ${JSON.stringify(e.message)}`);
    return 'refused';
  }
}

describe('fuzzing the queue payload', () => {
  it('when the tiny payload is processed unchanged then it is solved (the starting point)', async () => {
    expect(cheapToSolve(TINY_PAYLOAD)).toBe(true);
    expect(await throughProcessor(TINY_PAYLOAD)).toBe('solved');
  });

  it(`when ${RUNS} mutated or arbitrary payloads reach the processor then each is a result or an unrecoverable one-line failure`, async () => {
    const seen: Record<Outcome, number> = { solved: 0, refused: 0, capped: 0 };
    await fc.assert(
      fc.asyncProperty(
        fc.oneof(
          { weight: 9, arbitrary: mutationsArb.map((ms) => applyMutations(TINY_PAYLOAD, ms) as unknown) },
          { weight: 1, arbitrary: fc.anything() },
        ),
        async (data) => {
          seen[await throughProcessor(data)]++;
        },
      ),
      { numRuns: RUNS },
    );
    expect(seen.solved).toBeGreaterThan(RUNS / 20);
    expect(seen.refused).toBeGreaterThan(RUNS / 4);
  });
});
