// User-facing errors: one line naming the field and the fix. Programming errors stay plain `Error`s and throw.
// Every zod issue is turned into English here and nowhere else.
import type { z } from 'zod';
import { ExitCode } from './exit-codes.js';

/** A mistake of the user's (bad file, bad option): printed as one line, exit code 2, never a stack trace. */
export class UserError extends Error {
  /** Stable, namespaced code a caller can branch on (e.g. `loamwave.case.invalid`). */
  readonly code: string;
  /** Process exit code the entry point should use. */
  readonly exitCode: number;
  constructor(message: string, code = 'loamwave.input.invalid', exitCode: number = ExitCode.inputMistake) {
    super(message);
    this.name = 'UserError';
    this.code = code;
    this.exitCode = exitCode;
  }
}

/** A service the command needs cannot be reached: one line naming it and the fix, exit code 3. */
export class ServiceUnreachableError extends UserError {
  constructor(message: string, code = 'loamwave.service.unreachable') {
    super(message, code, ExitCode.serviceUnreachable);
    this.name = 'ServiceUnreachableError';
  }
}

/**
 * A message from elsewhere (a parser's, the runtime's) as part of one line: line breaks and the white space around
 * them become one space (V8's JSON.parse, for one, quotes the offending text, line breaks included).
 */
export function oneLine(text: string): string {
  return text.replace(/\s*[\r\n]+\s*/g, ' ').trim();
}

/** Control characters and the Unicode line and paragraph separators. */
const UNPRINTABLE = /[\u0000-\u001f\u007f-\u009f\u2028\u2029]/;

/** A key as a message shows it: as written, or JSON-quoted when it holds a line break or a control character. */
export function shownKey(key: string): string {
  return UNPRINTABLE.test(key) ? JSON.stringify(key) : key;
}

/** `ground.segments[0].conductivity_s_per_m` from a zod path. */
export function formatPath(path: ReadonlyArray<PropertyKey>): string {
  let out = '';
  for (const part of path) {
    if (typeof part === 'number') out += `[${part}]`;
    // a key holding a line break or another control character is quoted, so the message stays one line
    else if (UNPRINTABLE.test(String(part))) out += `[${JSON.stringify(String(part))}]`;
    else out += out === '' ? String(part) : `.${String(part)}`;
  }
  return out === '' ? '(top level)' : out;
}

/** Render one zod issue as `path: what is wrong (got …)`; custom refinements carry their own fix in the message. */
export function formatIssue(issue: z.core.$ZodIssue, input?: unknown): string {
  const where = formatPath(issue.path);
  const got = describeValueAt(input, issue.path);
  switch (issue.code) {
    case 'invalid_type':
      return got === 'undefined'
        ? `${where}: is required (expected ${issue.expected})`
        : `${where}: expected ${issue.expected} (got ${got})`;
    case 'too_small': {
      const cmp = issue.inclusive ? '>=' : '>';
      if (issue.origin === 'array') return `${where}: needs at least ${String(issue.minimum)} item(s)`;
      return `${where}: must be ${cmp} ${String(issue.minimum)} (got ${got})`;
    }
    case 'too_big': {
      const cmp = issue.inclusive ? '<=' : '<';
      if (issue.origin === 'array') return `${where}: allows at most ${String(issue.maximum)} item(s)`;
      return `${where}: must be ${cmp} ${String(issue.maximum)} (got ${got})`;
    }
    case 'invalid_value':
      return `${where}: must be one of ${issue.values.map((v) => JSON.stringify(v)).join(', ')} (got ${got})`;
    case 'unrecognized_keys':
      return `${where === '(top level)' ? '' : where + ': '}unknown key(s) ${issue.keys.map((k) => JSON.stringify(k)).join(', ')}; remove or correct the spelling`;
    case 'invalid_union':
      return `${where}: ${issue.message} (got ${got})`;
    default:
      return `${where}: ${issue.message}${got !== 'undefined' ? ` (got ${got})` : ''}`;
  }
}

function describeValueAt(input: unknown, path: ReadonlyArray<PropertyKey>): string {
  let v: unknown = input;
  for (const part of path) {
    if (v === null || typeof v !== 'object') return 'undefined';
    v = (v as Record<PropertyKey, unknown>)[part as string];
  }
  if (v === undefined) return 'undefined';
  const s = JSON.stringify(v);
  return s === undefined ? String(v) : s.length > 60 ? s.slice(0, 57) + '...' : s;
}

/** Turn a failed zod parse into one UserError: the first issue, prefixed with where the input came from. */
export function userErrorFromZod(error: z.ZodError, input: unknown, source: string, code: string): UserError {
  const first = error.issues[0];
  const line = first ? formatIssue(first, input) : 'invalid input';
  const more = error.issues.length > 1 ? ` (and ${error.issues.length - 1} more problem(s))` : '';
  return new UserError(`${source}: ${line}${more}`, code);
}
