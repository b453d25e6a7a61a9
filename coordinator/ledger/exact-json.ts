// JSON text that gives back every double bit for bit: like JSON.stringify, but −0 is written `-0` (which
// JSON.parse reads back as −0) and NaN or ±Infinity are refused with the path of the offending value, where
// JSON.stringify would silently write `null`. Used wherever a result is stored or carried as text.

/** A non-finite number where a stored value must be finite; `path` says where (e.g. `receivers[3].ez.re`). */
export class NonFiniteNumberError extends Error {
  readonly path: string;
  constructor(path: string, value: number) {
    super(`${path}: ${value} cannot be stored (only finite numbers are); the solver result is invalid`);
    this.name = 'NonFiniteNumberError';
    this.path = path;
  }
}

/**
 * Serialize plain data (objects, arrays, strings, finite numbers, booleans, null) so that
 * `JSON.parse(toExactJson(v))` equals `v` with `Object.is` on every number. Numbers use ECMAScript
 * Number::toString, the shortest text that reads back as the same double (ECMA-262, §6.1.6.1.20).
 */
export function toExactJson(value: unknown): string {
  return write(value, '');
}

function write(v: unknown, path: string): string {
  if (v === null) return 'null';
  switch (typeof v) {
    case 'number':
      if (!Number.isFinite(v)) throw new NonFiniteNumberError(path || '(value)', v);
      return Object.is(v, -0) ? '-0' : String(v);
    case 'string':
    case 'boolean':
      return JSON.stringify(v);
    case 'object': {
      if (Array.isArray(v)) return `[${v.map((x, i) => write(x === undefined ? null : x, `${path}[${i}]`)).join(',')}]`;
      const parts: string[] = [];
      for (const [k, x] of Object.entries(v as Record<string, unknown>)) {
        if (x === undefined) continue;
        parts.push(`${JSON.stringify(k)}:${write(x, path === '' ? k : `${path}.${k}`)}`);
      }
      return `{${parts.join(',')}}`;
    }
    default:
      throw new Error(`toExactJson: ${path || '(value)'} is a ${typeof v}, which has no JSON form`);
  }
}
