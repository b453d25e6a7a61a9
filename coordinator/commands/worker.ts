// `loamwave worker --redis URL`: solve queued jobs of every sweep listed on that Redis (or of `--queue` only),
// each case in a worker thread so the job lock keeps renewing. The first SIGTERM/Ctrl-C lets running cases
// finish and return their results; a second cancels them and hands their jobs back to the queue.
import { Option, type Command } from 'commander';
import { UserError } from '../../schemas/errors.js';
import { QueueWorker } from '../../worker/queue-worker.js';
import { redactedUrl, redisOptions, redisServerWarnings } from '../../worker/redis-connection.js';
import { defaultMemoryCapBytes } from '../../worker/run-case.js';
import { Redis } from 'ioredis';
import { addQueueOptions, integerOption, REDIS_URL_ENV, type QueueCliOptions } from './options.js';
import { queueNameFor } from '../../worker/queue-payload.js';

interface WorkerCliOptions extends QueueCliOptions {
  concurrency: number;
  lockMs: number;
  stalledIntervalMs: number;
  maxStalled: number;
  sweep?: string[];
  maxMemoryMb?: number;
}

export function registerWorker(program: Command): void {
  const cmd = program
    .command('worker')
    .description('solve queued jobs from Redis until stopped (SIGTERM: finish the running cases; twice: hand them back)')
    .addOption(new Option('--concurrency <n>', 'cases solved at once per sweep queue').argParser(integerOption(1, 1024)).default(1))
    .addOption(new Option('--lock-ms <n>', 'job lock duration, ms: a dead worker\'s job is taken over after about this').argParser(integerOption(1000)).default(30_000))
    .addOption(new Option('--stalled-interval-ms <n>', 'how often to look for jobs whose worker died, ms').argParser(integerOption(500)).default(30_000))
    .addOption(new Option('--max-stalled <n>', 'times a job may lose its worker before it fails').argParser(integerOption(0, 100)).default(2))
    .addOption(new Option('--sweep <name...>', 'serve only these sweeps (default: every sweep submitted to this Redis)'))
    .addOption(new Option('--max-memory-mb <n>', 'largest memory one case may need, MiB (default: 70 % of RAM / concurrency)').argParser(integerOption(1)));
  addQueueOptions(cmd, { required: true, fromEnv: true, what: 'the queue to work for' });
  cmd.action(async (opts: WorkerCliOptions) => {
    if (!opts.redis) throw new UserError(`worker: give --redis URL (or set ${REDIS_URL_ENV}), e.g. --redis redis://127.0.0.1:6379`);
    const connection = redisOptions({ url: opts.redis, caFile: opts.redisCa });
    const log = (line: string) => process.stderr.write(`${new Date().toISOString()} ${line}\n`);

    const probe = new Redis({ ...connection, lazyConnect: true, retryStrategy: () => null });
    let cause: string | undefined;
    probe.on('error', (e: Error) => (cause ??= e.message));
    try {
      await probe.connect();
      for (const w of await redisServerWarnings(probe)) log(`warning: ${w}`);
    } catch (e) {
      const why = cause ?? (e as Error).message;
      throw new UserError(`--redis: cannot reach ${redactedUrl(opts.redis)} (${why}); start Redis or correct the URL`, 'loamwave.redis.unreachable', 3);
    } finally {
      probe.disconnect();
    }

    const worker = new QueueWorker({
      connection,
      prefix: opts.prefix,
      concurrency: opts.concurrency,
      lockMs: opts.lockMs,
      stalledIntervalMs: opts.stalledIntervalMs,
      maxStalledCount: opts.maxStalled,
      queues: opts.sweep?.map(queueNameFor),
      maxMemoryBytes: opts.maxMemoryMb === undefined ? defaultMemoryCapBytes(opts.concurrency) : opts.maxMemoryMb * 2 ** 20,
      log,
    });
    let signals = 0;
    const stopped = new Promise<void>((resolve) => {
      const onSignal = (signal: string) => {
        signals++;
        if (signals === 1) {
          log(`${signal}: finishing running cases, then exiting (send it again to hand them back to the queue)`);
          void worker.stop(false).then(resolve);
        } else {
          log(`${signal}: cancelling running cases and handing their jobs back`);
          void worker.stop(true).then(resolve);
        }
      };
      process.on('SIGINT', onSignal);
      process.on('SIGTERM', onSignal);
    });
    await worker.start();
    log(`worker ready on ${redactedUrl(opts.redis)} (prefix ${opts.prefix}, concurrency ${opts.concurrency})`);
    await stopped;
    log('worker stopped');
  });
}
