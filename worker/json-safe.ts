// Checks that a result survives JSON (the queue stores return values as JSON, the ledger stores JSON text) with
// every number bit-exact: JSON has no NaN or Infinity (RFC 8259 §6), and a JS number written by JSON.stringify
// reads back as the same double (ECMA-262 Number::toString emits the shortest round-tripping digits).

/**
 * The path (`receivers[2].ez.re`) of the first value that JSON would not carry exactly, with what is wrong,
 * or undefined when the value is plain JSON data. (Negative zero is not reported: JSON writes it as 0, on every
 * path alike, so the embedded and queued runs still agree.)
 */
export function findJsonHazard(value: unknown, path = ''): string | undefined {
  switch (typeof value) {
    case 'number':
      if (!Number.isFinite(value)) return `${path || '(top level)'} is ${String(value)}`;
      return undefined;
    case 'string':
    case 'boolean':
      return undefined;
    case 'object': {
      if (value === null) return undefined;
      if (Array.isArray(value)) {
        for (let i = 0; i < value.length; i++) {
          const h = findJsonHazard(value[i], `${path}[${i}]`);
          if (h) return h;
        }
        return undefined;
      }
      const proto = Object.getPrototypeOf(value);
      if (proto !== Object.prototype && proto !== null) {
        return `${path || '(top level)'} is a ${value.constructor?.name ?? 'non-plain object'}, not plain JSON data`;
      }
      for (const [k, v] of Object.entries(value)) {
        const h = findJsonHazard(v, path ? `${path}.${k}` : k);
        if (h) return h;
      }
      return undefined;
    }
    default:
      return `${path || '(top level)'} is a ${typeof value}, which JSON cannot carry`;
  }
}
