// Entry point of one solver thread of the local pool (compiled to dist/worker/solve-thread.js): runs the cases
// the pool sends, one at a time, posting throttled progress and a result or a typed failure for each.
// Must not touch the ledger or any file: it computes and answers, nothing else.
import { parentPort, workerData } from 'node:worker_threads';
import { CaseFailure } from './case-failure.js';
import { runCase } from './run-case.js';
import { PROGRESS_INTERVAL_MS, type RunMessage, type SolverThreadData, type ThreadMessage } from './thread-protocol.js';

if (!parentPort) throw new Error('solve-thread.js must run as a worker thread');
const port = parentPort;
const stop = new Int32Array((workerData as SolverThreadData).stopFlag);

port.on('message', (msg: RunMessage) => {
  const send = (m: ThreadMessage) => port.postMessage(m);
  let lastSentMs = 0;
  try {
    const result = runCase(msg.caseInput, msg.jobId, {
      maxMemoryBytes: msg.maxMemoryBytes,
      shouldStop: () => Atomics.load(stop, 0) !== 0,
      onProgress: (fraction) => {
        const now = Date.now();
        if (now - lastSentMs < PROGRESS_INTERVAL_MS) return;
        lastSentMs = now;
        send({ type: 'progress', taskId: msg.taskId, fraction });
      },
    });
    send({ type: 'done', taskId: msg.taskId, result });
  } catch (err) {
    const failure = err instanceof CaseFailure ? err : new CaseFailure('internal', (err as Error)?.message ?? String(err));
    send({ type: 'failed', taskId: msg.taskId, failure: failure.toWire() });
  }
});
