// The output stage in a thread of its own, so that its JavaScript heap is held to a cap (resourceLimits) instead
// of growing as V8 sees fit: at 10 M field rows the stage's live heap is some 230 MB, but left alone V8 let the
// heap grow past 600 MB before collecting, and the process past 1 GiB (measured with bench:scale). The thread
// opens the ledger itself (SQLite in WAL mode takes a second connection), expands the same sweep text again, and
// does what `finishOutputs` describes; it reports back an exit code, or a user's error as one line.
import { basename, extname } from 'node:path';
import { parentPort, workerData } from 'node:worker_threads';
import { UserError } from '../../schemas/errors.js';
import { Ledger } from '../ledger/ledger.js';
import { parseSweep, parseSweepText } from '../sweep/file.js';
import { expandSweep } from '../sweep/expand.js';
import { writeOutputStage, type OutputStageRequest, type OutputStageReply } from './finish-outputs.js';

const request = workerData as OutputStageRequest;
let reply: OutputStageReply;
const ledger = Ledger.open(request.outDir);
try {
  // as loadSweep and prepareSweep read and expand it (the job ids are the same)
  const source = basename(request.path);
  const sweep = parseSweep(parseSweepText(request.text, source, extname(request.path).toLowerCase()), source);
  const jobs = expandSweep(sweep, source);
  const exitCode = await writeOutputStage({ sweep, text: request.text, path: request.path, outDir: request.outDir, ledger, jobs }, request.withReport);
  reply = { exitCode };
} catch (e) {
  reply =
    e instanceof UserError
      ? { userError: { message: e.message, code: e.code, exitCode: e.exitCode } }
      : { internalError: String((e as Error)?.stack ?? e) };
} finally {
  ledger.close();
}
parentPort!.postMessage(reply);
