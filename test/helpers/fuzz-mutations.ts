// Mutations of valid inputs for the property-based tests: a valid sweep file, case file or queue payload is taken
// apart at a random place (a value replaced by an odd one, scaled, deleted, moved, a key misspelt or added, an array
// item dropped or doubled), or its text is damaged. fast-check shrinks a failing list of mutations to the smallest.
import fc from 'fast-check';

export type Json = null | boolean | number | string | Json[] | { [key: string]: Json };
type Step = string | number;

/** Values a user or a broken program might put anywhere: edges of the number line, wrong types, empty containers. */
const oddNumber = fc.constantFrom(
  0, -0, -1, 1, 0.5, 2, 6, 7.5, 8, 100, 99.9, 0.94, 0.95, 1e-5, 1e-300, 5e-324, 1e300, Number.MAX_VALUE,
  2 ** 31, 2 ** 32, 2 ** 53, -1e9, 1e6, 3e6, 3e7, 1e12, NaN, Infinity, -Infinity,
);
const scalar: fc.Arbitrary<Json> = fc.oneof(
  oddNumber,
  fc.double(),
  fc.integer({ min: -1000, max: 100000 }),
  fc.string({ maxLength: 6 }),
  fc.constantFrom('', 'open', 'pec', 'resolved', 'impedance', 'planar', 'spherical', 'saltelli', 'latin_hypercube', '1e4', 'NaN', '__proto__', 'a\nb'),
  fc.boolean(),
  fc.constant(null),
);
const replacement: fc.Arbitrary<Json> = fc.oneof(
  { weight: 6, arbitrary: scalar },
  { weight: 1, arbitrary: fc.constant<Json>([]) },
  { weight: 1, arbitrary: fc.constant<Json>({}) },
  { weight: 1, arbitrary: fc.array(scalar, { maxLength: 3 }) },
  { weight: 1, arbitrary: fc.dictionary(fc.oneof(fc.string({ maxLength: 4 }), fc.constantFrom('a\nb', ' ', '\u2028', 'frequency_hz', 'ground.segments[0].start_m')), scalar, { maxKeys: 2 }) },
);

/** One mutation; `at` and `from` pick among the document's paths (modulo their number, at the time it applies). */
export type Mutation =
  | { kind: 'set'; at: number; value: Json }
  | { kind: 'scale'; at: number; factor: number }
  | { kind: 'delete'; at: number }
  | { kind: 'move'; at: number; from: number }
  | { kind: 'rename'; at: number; suffix: string }
  | { kind: 'add_key'; at: number; key: string; value: Json }
  | { kind: 'duplicate_item'; at: number }
  | { kind: 'drop_item'; at: number };

const at = fc.nat({ max: 10_000 });
export const mutationArb: fc.Arbitrary<Mutation> = fc.oneof(
  { weight: 4, arbitrary: fc.record({ kind: fc.constant('set' as const), at, value: replacement }) },
  // mostly mild factors, which keep many documents valid (those then go through expansion and plan)
  { weight: 4, arbitrary: fc.record({ kind: fc.constant('scale' as const), at, factor: fc.constantFrom(0.5, 0.9, 1.1, 2, 3, 10, 0.1, -1, 1e3, 1e-3, 1e6, 1e-6, 0) }) },
  { weight: 2, arbitrary: fc.record({ kind: fc.constant('delete' as const), at }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('move' as const), at, from: at }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('rename' as const), at, suffix: fc.constantFrom('s', '_', 'X', '') }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('add_key' as const), at, key: fc.constantFrom('extra', 'values', 'kind', 'height_m', 'from', 'to', 'count'), value: replacement }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('duplicate_item' as const), at }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('drop_item' as const), at }) },
);
export const mutationsArb = fc.array(mutationArb, { minLength: 1, maxLength: 4 });

/** Every path into the document, the root included, in a fixed order. */
function allPaths(v: Json, prefix: Step[] = [], out: Step[][] = []): Step[][] {
  out.push(prefix);
  if (Array.isArray(v)) v.forEach((x, i) => allPaths(x, [...prefix, i], out));
  else if (v !== null && typeof v === 'object') for (const k of Object.keys(v)) allPaths(v[k], [...prefix, k], out);
  return out;
}

function get(v: Json, path: Step[]): Json | undefined {
  let node: Json | undefined = v;
  for (const s of path) node = node !== null && typeof node === 'object' ? (node as Record<Step, Json>)[s] : undefined;
  return node;
}

/** The document with the value at `path` replaced (undefined deletes a key or an array item); copies along the path. */
function put(v: Json, path: Step[], value: Json | undefined): Json | undefined {
  if (path.length === 0) return value;
  const [head, ...rest] = path;
  if (Array.isArray(v)) {
    const copy = [...v];
    const inner = put(copy[head as number], rest, value);
    if (inner === undefined) copy.splice(head as number, 1);
    else copy[head as number] = inner;
    return copy;
  }
  if (v !== null && typeof v === 'object') {
    const copy: { [k: string]: Json } = { ...v };
    const inner = put(copy[head as string], rest, value);
    if (inner === undefined) delete copy[head as string];
    else copy[head as string] = inner;
    return copy;
  }
  return v;
}

/** Apply one mutation (a copy; the input is not changed). */
export function applyMutation(doc: Json, m: Mutation): Json {
  const paths = allPaths(doc);
  const path = paths[m.at % paths.length];
  const node = get(doc, path);
  const parentPath = path.slice(0, -1);
  switch (m.kind) {
    case 'set':
      return put(doc, path, m.value) ?? null;
    case 'scale':
      return typeof node === 'number' ? (put(doc, path, node * m.factor) ?? null) : doc;
    case 'delete':
      return path.length === 0 ? doc : (put(doc, path, undefined) ?? null);
    case 'move':
      return put(doc, path, get(doc, paths[m.from % paths.length]) ?? null) ?? null;
    case 'rename': {
      const key = path[path.length - 1];
      if (typeof key !== 'string') return doc;
      const renamed = m.suffix === '' ? key.slice(0, -1) : key + m.suffix;
      const without = put(doc, path, undefined) ?? null;
      return put(without, [...parentPath, renamed], node ?? null) ?? null;
    }
    case 'add_key':
      return node !== null && typeof node === 'object' && !Array.isArray(node) ? (put(doc, [...path, m.key], m.value) ?? null) : doc;
    case 'duplicate_item':
      return Array.isArray(node) && node.length > 0 ? (put(doc, path, [...node, node[node.length - 1]]) ?? null) : doc;
    case 'drop_item':
      return Array.isArray(node) && node.length > 0 ? (put(doc, path, node.slice(1)) ?? null) : doc;
  }
}

export function applyMutations(doc: Json, ms: readonly Mutation[]): Json {
  return ms.reduce(applyMutation, doc);
}

/** Damage to a text: a slice deleted, a line doubled, a few characters of the format's syntax inserted. */
export type TextMutation = { kind: 'delete'; at: number; length: number } | { kind: 'double_line'; at: number } | { kind: 'insert'; at: number; text: string };

const syntaxBits = fc.constantFrom(':', ': ', '{', '}', '[', ']', ',', '-', ' ', '  ', '\t', '\n', '#', '"', "'", '&a ', '*a', '!x ', '!!binary ', '|', '>', '%', '@', '`', '\\', '0', '9', 'e', '.', '.nan', '.inf', '1e999', '~', '? ', '<<: ');
export const textMutationArb: fc.Arbitrary<TextMutation> = fc.oneof(
  fc.record({ kind: fc.constant('delete' as const), at, length: fc.integer({ min: 1, max: 12 }) }),
  fc.record({ kind: fc.constant('double_line' as const), at }),
  fc.record({ kind: fc.constant('insert' as const), at, text: fc.oneof(syntaxBits, fc.string({ maxLength: 3 })) }),
);

export function applyTextMutation(text: string, m: TextMutation): string {
  const i = text.length === 0 ? 0 : m.at % text.length;
  if (m.kind === 'delete') return text.slice(0, i) + text.slice(i + m.length);
  if (m.kind === 'insert') return text.slice(0, i) + m.text + text.slice(i);
  const lines = text.split('\n');
  const l = m.at % lines.length;
  lines.splice(l, 0, lines[l]);
  return lines.join('\n');
}

/**
 * What a refusal must look like: one line, no stack trace, starting with where the input came from (`source`), or
 * with no source given, with the field it names (`ground.segments[0]: …`).
 */
export function checkOneLine(message: string, source?: string): string | undefined {
  if (message.includes('\n')) return 'the message has more than one line';
  if (/\bat .*\.(ts|js):\d+/.test(message)) return 'the message holds a stack trace';
  if (source !== undefined && !message.startsWith(`${source}: `)) return `the message does not start with "${source}: "`;
  if (source === undefined && !/^[a-z_][a-z0-9_]*(\[\d+\]|\.[a-z_][a-z0-9_]*)*: \S/.test(message)) return 'the message does not start with the field it names';
  if (message.length < (source?.length ?? 0) + 8) return 'the message says nothing';
  return undefined;
}
