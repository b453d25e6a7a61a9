// `loamwave worker --redis URL`: solve queued jobs of every sweep listed on that Redis (or of `--queue` only),
// each case in a worker thread so the job lock keeps renewing. The first SIGTERM/Ctrl-C lets running cases
// finish and return their results; a second cancels them and hands their jobs back to the queue.
import { Option, type Command } from 'commander';
import { UserError } from '../../schemas/errors.js';
import { queueNameFor } from '../../schemas/queue-names.js';
import { addQueueOptions, integerOption, memoryOption, mibToBytes, REDIS_URL_ENV, type QueueCliOptions } from './options.js';

interface WorkerCliOptions extends QueueCliOptions {
  concurrency: number;
  lockMs: number;
  stalledIntervalMs: number;
  maxStalled: number;
  sweep?: string[];
  maxMemoryMib?: number;
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
    .addOption(memoryOption(' / concurrency'));
  addQueueOptions(cmd, { required: true, fromEnv: true, what: 'the queue to work for' });
  cmd.action(async (opts: WorkerCliOptions) => {
    if (!opts.redis) throw new UserError(`worker: give --redis URL (or set ${REDIS_URL_ENV}), e.g. --redis redis://127.0.0.1:6379`);
    const [{ QueueWorker }, { exitIfStillHeld, probeRedis, redactedUrl, redisOptions }, { defaultMemoryCapBytes }, { Redis }] = await Promise.all([
      import('../../worker/queue-worker.js'),
      import('../../worker/redis-connection.js'),
      import('../../worker/run-case.js'),
      import('ioredis'),
    ]);
    const connection = redisOptions({ url: opts.redis, caFile: opts.redisCa });
    const log = (line: string) => process.stderr.write(`${new Date().toISOString()} ${line}\n`);

    const probe = new Redis({ ...connection, lazyConnect: true });
    try {
      for (const w of await probeRedis(probe, opts.redis)) log(`warning: ${w}`);
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
      maxMemoryBytes: opts.maxMemoryMib === undefined ? defaultMemoryCapBytes(opts.concurrency) : mibToBytes(opts.maxMemoryMib),
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
    exitIfStillHeld(log);
  });
}
