// The BullMQ sandboxed processor (compiled to dist/worker/queue-processor.js, loaded in a worker thread so the
// worker's main thread keeps renewing the job lock while the solver is busy). Turns `CaseFailure`s into what
// BullMQ understands: deterministic failures become `UnrecoverableError` (no retry); a stop request hands the
// job back to the queue (`moveToWait`) instead of failing it. Results go back sealed (result-seal.ts) when the
// worker was given the shared result key.
import { UnrecoverableError, WaitingError, type SandboxedJob } from 'bullmq';
import { workerData } from 'node:worker_threads';
import { CaseFailure } from './case-failure.js';
import { QueueJobDataSchema } from '../schemas/queue-payload.js';
import { defaultMemoryCapBytes, runCase } from './run-case.js';
import { PROGRESS_INTERVAL_MS } from './thread-protocol.js';
import { sealResult, type SealedResult } from './result-seal.js';

/** `workerData` the `loamwave worker` command gives its processor threads. */
export interface ProcessorThreadData {
  /** Largest memory a case may need, bytes. */
  readonly maxMemoryBytes: number;
  /** One Int32 in shared memory: set to 1 to stop running solves (the process is shutting down). */
  readonly stopFlag: SharedArrayBuffer;
  /** Key shared with the coordinator (LOAMWAVE_RESULT_KEY): results are sealed with an HMAC when it is set. */
  readonly resultKey?: string;
}

const data = (workerData ?? {}) as Partial<ProcessorThreadData>;
const stop = data.stopFlag ? new Int32Array(data.stopFlag) : undefined;

export default async function processLoamwaveJob(job: SandboxedJob, token?: string): Promise<SealedResult> {
  const parsed = QueueJobDataSchema.safeParse(job.data);
  if (!parsed.success) throw new UnrecoverableError(`invalid_case: the job data is not a loamwave job (${parsed.error.issues[0]?.message})`);
  let lastSentMs = 0;
  try {
    const result = runCase(parsed.data.case, parsed.data.job_id, {
      maxMemoryBytes: data.maxMemoryBytes ?? defaultMemoryCapBytes(1),
      shouldStop: stop ? () => Atomics.load(stop, 0) !== 0 : undefined,
      onProgress: (fraction) => {
        const now = Date.now();
        if (now - lastSentMs < PROGRESS_INTERVAL_MS) return;
        lastSentMs = now;
        // Percent with one decimal; posted at once even while this thread stays busy.
        job.updateProgress(Math.round(fraction * 1000) / 10).catch(() => undefined);
      },
    });
    return sealResult(result, data.resultKey);
  } catch (err) {
    if (!(err instanceof CaseFailure)) throw err;
    if (err.kind === 'cancelled' && token) {
      await job.moveToWait(token);
      throw new WaitingError();
    }
    if (!err.retryable) throw new UnrecoverableError(err.reason);
    throw new Error(err.reason);
  }
}
