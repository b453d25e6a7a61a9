// Command-line options shared by the sweep commands: the Redis connection and key prefix, and whole-number
// options with their bounds. One definition each, so `run`, `submit`, `worker`, `collect` and `status` agree.
import { InvalidArgumentError, Option, type Command } from 'commander';
import { DEFAULT_QUEUE_PREFIX } from '../../schemas/queue-names.js';
import type { QueueSettings } from '../queue/target.js';

/** Environment variable a worker reads its Redis URL from when `--redis` is not given (handy in job arrays). */
export const REDIS_URL_ENV = 'LOAMWAVE_REDIS_URL';

/** Parser for an integer option within [min, max]; commander prints its message as one line (exit code 2, cli.ts). */
export function integerOption(min: number, max = Number.MAX_SAFE_INTEGER): (value: string) => number {
  return (value: string) => {
    const n = Number(value);
    if (!/^[+-]?\d+$/.test(value.trim()) || !Number.isSafeInteger(n) || n < min || n > max) {
      throw new InvalidArgumentError(`expected a whole number from ${min} to ${max}`);
    }
    return n;
  };
}

/**
 * `--max-memory-mib <n>`, spelt the same on every command: the largest memory one case may need, MiB (2^20 bytes).
 * `whose` says what the default divides this machine's memory by.
 */
export function memoryOption(whose: string): Option {
  return new Option('--max-memory-mib <n>', `largest memory one case may need, MiB (default: 70 % of this machine's memory${whose})`).argParser(
    (value: string) => {
      const n = Number(value);
      if (value.trim() === '' || !Number.isFinite(n) || n <= 0) throw new InvalidArgumentError('expected a number of MiB > 0');
      return n;
    },
  );
}

/** Bytes of a `--max-memory-mib` value. */
export function mibToBytes(mib: number): number {
  return mib * 2 ** 20;
}

export type QueueCliOptions = QueueSettings;

/** Add `--redis URL`, `--redis-ca FILE` and `--prefix P`; `fromEnv` lets the URL come from LOAMWAVE_REDIS_URL. */
export function addQueueOptions(cmd: Command, how: { required: boolean; fromEnv?: boolean; what: string }): Command {
  const redis = new Option('--redis <url>', `Redis URL (redis://[user:password@]host:port[/db], rediss:// for TLS): ${how.what}`);
  if (how.fromEnv) redis.env(REDIS_URL_ENV);
  if (how.required && !how.fromEnv) redis.makeOptionMandatory(true);
  cmd.addOption(redis);
  cmd.addOption(new Option('--redis-ca <file>', 'PEM file of the certificate authority of a TLS Redis server'));
  cmd.addOption(new Option('--prefix <prefix>', 'prefix of every Redis key of the queue').default(DEFAULT_QUEUE_PREFIX));
  return cmd;
}

export const RETRY_FAILED_HELP = 'solve again the jobs that failed in an earlier run (after fixing what made them fail)';

/** `--retry-failed`: the ledger's failed jobs become pending again; says how many on stderr. */
export function retryFailedJobs(run: { ledger: { retryFailed(): number } }): void {
  const n = run.ledger.retryFailed();
  process.stderr.write(`${n} failed job(s) to try again\n`);
}
