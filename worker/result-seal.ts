// The seal a worker puts on a result before it travels back through Redis: with a key shared by the coordinator
// and the workers (LOAMWAVE_RESULT_KEY), an HMAC-SHA256 over the result's canonical JSON, which the collector
// checks before a result may enter the ledger. Knows nothing of queues or sweeps; no key means no seal.
import { createHmac, timingSafeEqual } from 'node:crypto';
import { createRequire } from 'node:module';
import { z } from 'zod';
import type { JobResult } from '../schemas/result.js';

// canonicalize is CommonJS whose typings claim an ES default export; load it as what it is (module.exports = fn).
const canonicalize = createRequire(import.meta.url)('canonicalize') as (value: unknown) => string | undefined;

/** Environment variable holding the key shared by the coordinator and every worker. */
export const RESULT_KEY_ENV = 'LOAMWAVE_RESULT_KEY';

/** What a worker returns to BullMQ: the result and, when a key is set, its seal (64 hex digits). */
export const SealedResultSchema = z.strictObject({
  result: z.unknown(),
  hmac_sha256: z.string().optional(),
});
export type SealedResult = z.infer<typeof SealedResultSchema>;

/** The key from the environment, or undefined when it is unset or empty. */
export function resultKeyFromEnv(env: NodeJS.ProcessEnv = process.env): string | undefined {
  const key = env[RESULT_KEY_ENV];
  return key === undefined || key === '' ? undefined : key;
}

/**
 * HMAC-SHA256 (RFC 2104 over FIPS 180-4) of the RFC 8785 canonical JSON of `value`, hex. The canonical form makes
 * the seal independent of key order; JSON carries every finite double exactly, so the collector, parsing what Redis
 * returns, computes the same text the worker did.
 */
export function resultHmac(value: unknown, key: string): string {
  const text = canonicalize(value);
  if (text === undefined) throw new Error('resultHmac: the value has no JSON form');
  return createHmac('sha256', key).update(text, 'utf8').digest('hex');
}

/** The result as a worker returns it: sealed when `key` is given. */
export function sealResult(result: JobResult, key: string | undefined): SealedResult {
  return key === undefined ? { result } : { result, hmac_sha256: resultHmac(result, key) };
}

/**
 * Why a returned value's seal is refused under `key` (undefined: accepted). Without a key nothing is checked; with
 * one, the seal must be present and equal (compared in constant time).
 */
export function sealRefusal(sealed: SealedResult, key: string | undefined): string | undefined {
  if (key === undefined) return undefined;
  if (sealed.hmac_sha256 === undefined) return `no HMAC, but ${RESULT_KEY_ENV} is set`;
  const want = Buffer.from(resultHmac(sealed.result, key), 'hex');
  const got = /^[0-9a-f]{64}$/.test(sealed.hmac_sha256) ? Buffer.from(sealed.hmac_sha256, 'hex') : undefined;
  if (!got || !timingSafeEqual(got, want)) return `HMAC does not verify (is ${RESULT_KEY_ENV} the same for the coordinator and the workers?)`;
  return undefined;
}
