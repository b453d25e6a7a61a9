// The messages between the local pool (main thread) and a solver thread. Both ends are ours and compiled
// together, so these are plain types; a stop request travels through shared memory, because a busy solver
// thread cannot read messages until its synchronous solve returns.
import type { JobResult } from '../schemas/result.js';
import type { FailureWire } from './case-failure.js';

/** Main thread → solver thread. */
export interface RunMessage {
  readonly type: 'run';
  readonly taskId: number;
  readonly caseInput: unknown;
  readonly jobId: string;
  readonly maxMemoryBytes: number;
}

/** Solver thread → main thread. */
export type ThreadMessage =
  | { readonly type: 'progress'; readonly taskId: number; readonly fraction: number }
  | { readonly type: 'done'; readonly taskId: number; readonly result: JobResult }
  | { readonly type: 'failed'; readonly taskId: number; readonly failure: FailureWire };

/** `workerData` of a solver thread: one Int32 stop flag (0 run, 1 stop) in shared memory. */
export interface SolverThreadData {
  readonly stopFlag: SharedArrayBuffer;
}

/** Least time between two progress messages from one thread, ms (common practice: a few per second is enough). */
export const PROGRESS_INTERVAL_MS = 200;
