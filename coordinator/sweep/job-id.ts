// Job identity: the same validated case is the same job on any machine and in any sweep, so a re-submitted sweep
// skips what is done and never queues a twin. A change of the solver's major version makes every job new; a new
// option whose default keeps the old behaviour does not (defaults are left out of the canonical form).
import { createHash } from 'node:crypto';
import { createRequire } from 'node:module';
import type { Case } from '../../schemas/case.js';
import { withoutDefaults } from '../../schemas/canonical-case.js';
import { SOLVER_MAJOR } from '../../solver/version.js';

// canonicalize is CommonJS whose typings claim an ES default export; load it as what it is (module.exports = fn).
const canonicalize = createRequire(import.meta.url)('canonicalize') as (value: unknown) => string | undefined;

/**
 * The canonical text a job id hashes: RFC 8785 JSON of the case without its default values, a newline, and the
 * solver's major version tag.
 */
export function jobIdText(c: Case, solverMajor: string = SOLVER_MAJOR): string {
  // RFC 8785 (JSON Canonicalization Scheme): sorted keys, ECMAScript number formatting, no white space.
  const canonical = canonicalize(withoutDefaults(c));
  if (canonical === undefined) throw new Error('jobIdText: the case has no JSON form');
  return `${canonical}\nloamwave-solver-${solverMajor}`;
}

/** Hex SHA-256 (FIPS 180-4) of `jobIdText(c)`: 64 characters of [0-9a-f], never containing ':'. */
export function jobIdFor(c: Case, solverMajor: string = SOLVER_MAJOR): string {
  const id = createHash('sha256').update(jobIdText(c, solverMajor), 'utf8').digest('hex');
  // BullMQ treats an all-digit custom job id as a plain counter id; a SHA-256 hex digest is all digits with
  // probability (10/16)^64 ≈ 1e-13, which we refuse loudly rather than let it collide.
  if (/^\d+$/.test(id)) throw new Error(`jobIdFor: digest ${id} is all digits; change the case slightly`);
  return id;
}
