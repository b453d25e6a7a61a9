// The sweep file, as a zod schema: a base case, the parameters that vary with one generator each, and the design
// that samples them. Also the grammar of a vary path (`ground.segments[0].conductivity_s_per_m`) and its check
// against the case schema, so that a misspelt path is refused with the nearest valid one. No I/O here.
import { z } from 'zod';
import { caseJsonSchema } from './case.js';
import { shownKey } from './errors.js';

/** A folder-safe sweep name: it becomes `out/<name>/`. */
const SWEEP_NAME = /^[a-z0-9][a-z0-9._-]{0,79}$/i;

const finite = (what: string) => z.number({ error: `expected a number (${what})` }).finite();
const countOf = z.number({ error: 'expected a whole number of values' }).int().min(2).max(100_000);

const RangeSchema = z.strictObject({ from: finite('first value'), to: finite('last value') });

/** One generator per varied path; exactly one key of this object may be given. */
export const GeneratorSchema = z
  .strictObject({
    /** An explicit list of values (numbers, or strings for enumerated keys such as `ground.model`). */
    values: z.array(z.union([finite('a value'), z.string()])).min(1).max(100_000).optional(),
    /** `count` values evenly spaced from `from` to `to`, both included. */
    linear: RangeSchema.extend({ count: countOf }).optional(),
    /** `count` values evenly spaced in logarithm from `from` to `to` (both > 0), both included. */
    log: RangeSchema.extend({ count: countOf }).optional(),
    /** Sampled designs: uniform on [from, to]. */
    uniform: RangeSchema.optional(),
    /** Sampled designs: uniform in logarithm on [from, to] (both > 0). */
    log_uniform: RangeSchema.optional(),
  })
  .superRefine((g, ctx) => {
    const given = GENERATOR_KINDS.filter((k) => g[k] !== undefined);
    if (given.length !== 1) {
      ctx.addIssue({
        code: 'custom',
        path: [],
        message:
          given.length === 0
            ? `give one generator: ${GENERATOR_KINDS.join(', ')} (e.g. {values: [10000, 20000]})`
            : `give only one generator, not ${given.join(' and ')}`,
      });
    }
    for (const k of ['log', 'log_uniform'] as const) {
      const r = g[k];
      if (r === undefined) continue;
      for (const end of ['from', 'to'] as const) {
        if (!(r[end] > 0)) {
          ctx.addIssue({ code: 'custom', path: [k, end], message: `must be > 0 for a ${k} generator (got ${r[end]})` });
        }
      }
    }
    for (const k of ['uniform', 'log_uniform'] as const) {
      const r = g[k];
      if (r !== undefined && !(r.to > r.from)) {
        ctx.addIssue({ code: 'custom', path: [k, 'to'], message: `must be greater than from (${r.from})` });
      }
    }
  });
export type Generator = z.output<typeof GeneratorSchema>;
export const GENERATOR_KINDS = ['values', 'linear', 'log', 'uniform', 'log_uniform'] as const;
export type GeneratorKind = (typeof GENERATOR_KINDS)[number];
/** Generators that list their values (full factorial) and those that are sampled (LHS, Saltelli). */
export const LIST_GENERATORS: readonly GeneratorKind[] = ['values', 'linear', 'log'];
export const SAMPLED_GENERATORS: readonly GeneratorKind[] = ['uniform', 'log_uniform'];

export function generatorKind(g: Generator): GeneratorKind {
  const k = GENERATOR_KINDS.find((kind) => g[kind] !== undefined);
  if (k === undefined) throw new Error('generator without a kind (the schema should have refused it)');
  return k;
}

const seedOf = z.number().int().min(0).max(2 ** 32 - 1).default(1);

export const DesignSchema = z.discriminatedUnion(
  'kind',
  [
    z.strictObject({ kind: z.literal('full_factorial') }),
    z.strictObject({
      kind: z.literal('latin_hypercube'),
      /** Number of samples (one job each). */
      samples: z.number().int().min(2).max(1_000_000),
      /** Seed of the pseudo-random generator: the same seed gives the same design. */
      seed: seedOf,
    }),
    z.strictObject({
      kind: z.literal('saltelli'),
      /** Base samples N; the design has N·(d + 2) jobs for d varied parameters. */
      samples: z.number().int().min(2).max(1_000_000),
      seed: seedOf,
    }),
  ],
  { error: 'design.kind must be one of "full_factorial", "latin_hypercube", "saltelli"' },
);
export type Design = z.output<typeof DesignSchema>;

export const SweepSchema = z
  .strictObject({
    /** Names the output folder `out/<name>/`: letters, digits, `.`, `_`, `-`. */
    name: z.string().regex(SWEEP_NAME, {
      error: 'must be 1–80 letters, digits, ".", "_" or "-", starting with a letter or digit (it names a folder)',
    }),
    description: z.string().max(2000).optional(),
    /** The case every job starts from; defaults of the case schema fill in what is left out. */
    base: z.record(z.string(), z.unknown()),
    /** Path into the case → its generator, in the order the expansion nests them (first = slowest). */
    vary: z.record(z.string(), GeneratorSchema).default({}),
    design: DesignSchema.default({ kind: 'full_factorial' }),
    /** The varied `grid.*` path that grid convergence is judged along; default: the only varied `grid.*` path. */
    resolution_axis: z.string().optional(),
  })
  .superRefine((s, ctx) => {
    const sampled = s.design.kind !== 'full_factorial';
    for (const [path, g] of Object.entries(s.vary)) {
      const kind = GENERATOR_KINDS.find((k) => g[k] !== undefined);
      if (kind === undefined) continue;
      if (!sampled && SAMPLED_GENERATORS.includes(kind)) {
        ctx.addIssue({
          code: 'custom',
          path: ['vary', path, kind],
          message: `a ${kind} generator needs a sampled design; use values/linear/log, or set design.kind to latin_hypercube or saltelli`,
        });
      }
      if (sampled && LIST_GENERATORS.includes(kind)) {
        ctx.addIssue({
          code: 'custom',
          path: ['vary', path, kind],
          message: `a ${s.design.kind} design samples ranges; use uniform or log_uniform (e.g. {uniform: {from: 1, to: 2}}), or set design.kind to full_factorial`,
        });
      }
    }
    const d = Object.keys(s.vary).length;
    if (sampled && d === 0) {
      ctx.addIssue({ code: 'custom', path: ['vary'], message: `a ${s.design.kind} design needs at least one varied parameter` });
    }
    if (s.design.kind === 'saltelli' && d === 1) {
      ctx.addIssue({
        code: 'custom',
        path: ['design', 'kind'],
        message: 'a saltelli design needs at least 2 varied parameters (with one, its index is 1); use latin_hypercube',
      });
    }
    if (s.resolution_axis !== undefined && !(s.resolution_axis in s.vary)) {
      ctx.addIssue({
        code: 'custom',
        path: ['resolution_axis'],
        message: `must be one of the varied paths (${Object.keys(s.vary).map(shownKey).join(', ') || 'none'})`,
      });
    }
  });

/** A sweep file as the user wrote it. */
export type SweepInput = z.input<typeof SweepSchema>;
/** A sweep with defaults filled in (and, after `parseSweep`, `resolution_axis` resolved where it can be). */
export type Sweep = z.output<typeof SweepSchema>;

/** JSON Schema of the sweep file (as written by users: defaults optional). */
export function sweepJsonSchema(): unknown {
  const json = z.toJSONSchema(SweepSchema, { io: 'input', unrepresentable: 'any' }) as {
    properties: Record<string, JsonSchemaNode & Record<string, unknown>>;
  };
  // `base` is a case with anything left out (defaults fill it in, and a varied value may be missing from it): the
  // case schema with nothing required but the kind that tells the branches of a union apart.
  const { $schema: _drop, ...caseJson } = caseJsonSchema() as Record<string, unknown>;
  json.properties.base = { ...partialCase(caseJson as JsonSchemaNode), description: 'The case every job starts from (loamwave schema case); what is left out takes its defaults.' };
  // `vary`: one property pattern per scalar of the case, whose generator's values are held to that scalar's limits.
  const generic = json.properties.vary.additionalProperties as JsonSchemaNode;
  const patternProperties: Record<string, unknown> = {};
  for (const [path, leaves] of caseLeafNodes()) {
    const leaf = leaves.length === 1 ? leaves[0] : { anyOf: leaves };
    const pattern = '^' + path.replace(/[.*+?^${}()|[\]\\]/g, '\\$&').replace(/\\\[0\\\]/g, '\\[\\d+\\]') + '$';
    patternProperties[pattern] = generatorFor(generic, leaf);
  }
  json.properties.vary = { ...json.properties.vary, patternProperties, additionalProperties: false };
  return json;
}

/** A JSON Schema node without `default` and `description` (a generator's values are not the case's defaults). */
function bare(node: JsonSchemaNode): JsonSchemaNode {
  const { default: _d, description: _s, ...rest } = node as JsonSchemaNode & { default?: unknown; description?: unknown };
  return rest;
}

/** The case schema with `required` dropped everywhere except the `kind` of a union branch. */
function partialCase(node: JsonSchemaNode): JsonSchemaNode {
  const out: Record<string, unknown> = { ...node };
  const required = (node as { required?: string[] }).required;
  if (required) {
    const kept = required.filter((k) => k === 'kind');
    if (kept.length > 0) out.required = kept;
    else delete out.required;
  }
  if (node.properties) out.properties = Object.fromEntries(Object.entries(node.properties).map(([k, v]) => [k, partialCase(v)]));
  if (node.items) out.items = partialCase(node.items);
  if (node.oneOf) out.oneOf = node.oneOf.map(partialCase);
  if (node.anyOf) out.anyOf = node.anyOf.map(partialCase);
  return out as JsonSchemaNode;
}

/** The generator schema with every value it gives held to `leaf`; only `values` for a leaf that is not a number. */
function generatorFor(generic: JsonSchemaNode, leaf: JsonSchemaNode): JsonSchemaNode {
  const g = JSON.parse(JSON.stringify(generic)) as JsonSchemaNode & { properties: Record<string, JsonSchemaNode & { properties?: Record<string, JsonSchemaNode> }> };
  const numeric = JSON.stringify(leaf).includes('"number"') || JSON.stringify(leaf).includes('"integer"');
  const values = g.properties.values as JsonSchemaNode & { items?: JsonSchemaNode };
  values.items = leaf;
  for (const kind of ['linear', 'log', 'uniform', 'log_uniform'] as const) {
    if (!numeric) {
      delete g.properties[kind];
      continue;
    }
    // Geometric spacing needs positive ends, whatever the scalar allows.
    const end = kind.startsWith('log') ? { allOf: [leaf, { exclusiveMinimum: 0 }] } : leaf;
    const props = g.properties[kind].properties!;
    props.from = end as JsonSchemaNode;
    props.to = end as JsonSchemaNode;
  }
  return g;
}

let leafNodesCache: Map<string, JsonSchemaNode[]> | undefined;

/** Every scalar of the case schema by vary path (indices written `[0]`), with its schema in each branch it is in. */
function caseLeafNodes(): Map<string, JsonSchemaNode[]> {
  if (leafNodesCache) return leafNodesCache;
  const out = new Map<string, JsonSchemaNode[]>();
  const walk = (node: JsonSchemaNode, prefix: string): void => {
    const branches = node.oneOf ?? node.anyOf;
    if (branches) {
      for (const b of branches) walk(b, prefix);
      return;
    }
    if (node.properties) {
      for (const [k, child] of Object.entries(node.properties)) walk(child, prefix === '' ? k : `${prefix}.${k}`);
      return;
    }
    if (node.items) {
      walk(node.items, `${prefix}[0]`);
      return;
    }
    const list = out.get(prefix) ?? [];
    const leaf = bare(node);
    if (!list.some((l) => JSON.stringify(l) === JSON.stringify(leaf))) list.push(leaf);
    out.set(prefix, list);
  };
  walk(caseJsonSchema() as JsonSchemaNode, '');
  leafNodesCache = out;
  return out;
}

/** The default resolution axis: the only varied `grid.*` path, if there is exactly one. */
export function defaultResolutionAxis(vary: Record<string, unknown>): string | undefined {
  const grid = Object.keys(vary).filter((p) => p.startsWith('grid.'));
  return grid.length === 1 ? grid[0] : undefined;
}

// ---- vary paths -----------------------------------------------------------------------------------------------

/** One step of a path: an object key or an array index. */
export type PathStep = string | number;

const PATH_PIECE = /^([a-z_][a-z0-9_]*)((?:\[\d+\])*)$/;

/** `ground.segments[0].conductivity_s_per_m` → ['ground', 'segments', 0, 'conductivity_s_per_m']; undefined if malformed. */
export function parseVaryPath(path: string): PathStep[] | undefined {
  const steps: PathStep[] = [];
  for (const piece of path.split('.')) {
    const m = PATH_PIECE.exec(piece);
    if (!m) return undefined;
    steps.push(m[1]);
    for (const idx of m[2].matchAll(/\[(\d+)\]/g)) steps.push(Number(idx[1]));
  }
  return steps;
}

type JsonSchemaNode = {
  type?: string | string[];
  properties?: Record<string, JsonSchemaNode>;
  items?: JsonSchemaNode;
  oneOf?: JsonSchemaNode[];
  anyOf?: JsonSchemaNode[];
};

/** Every scalar the case schema knows, as a vary path with array indices written `[0]`, in schema order. */
export function caseLeafPaths(): string[] {
  return [...caseLeafNodes().keys()];
}

/** A path with each index replaced by 0, to compare with `caseLeafPaths()`. */
function genericPath(path: string): string {
  return path.replace(/\[\d+\]/g, '[0]');
}

/** Levenshtein distance (Levenshtein 1966; the two-row dynamic programme of Wagner & Fischer 1974). */
export function editDistance(a: string, b: string): number {
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const cur = [i];
    for (let j = 1; j <= b.length; j++) {
      cur[j] = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1));
    }
    prev = cur;
  }
  return prev[b.length];
}

/** The valid path nearest to `path` by edit distance, with the user's own indices kept where they fit. */
export function nearestVaryPath(path: string): string {
  const target = genericPath(path);
  let best = caseLeafPaths()[0];
  let bestD = Infinity;
  for (const p of caseLeafPaths()) {
    const d = editDistance(target, p);
    if (d < bestD) {
      bestD = d;
      best = p;
    }
  }
  const userIdx = [...path.matchAll(/\[(\d+)\]/g)].map((m) => m[1]);
  let k = 0;
  return best.replace(/\[0\]/g, () => `[${userIdx[k++] ?? 0}]`);
}

/**
 * Why `path` cannot be varied on `base`, as the text after `vary.<path>: `, or undefined if it can.
 * A path must name a scalar of the case schema; an array element it passes through must exist in the base case.
 */
export function varyPathProblem(path: string, base: unknown): string | undefined {
  const steps = parseVaryPath(path);
  if (steps === undefined || !caseLeafPaths().includes(genericPath(path))) {
    return `is not a parameter of the case; did you mean "${nearestVaryPath(path)}"?`;
  }
  let node: unknown = base;
  for (let i = 0; i < steps.length - 1; i++) {
    const step = steps[i];
    if (typeof step === 'number' || typeof steps[i + 1] === 'number') {
      const arrayPath = typeof step === 'number' ? steps.slice(0, i) : steps.slice(0, i + 1);
      const arr = typeof step === 'number' ? node : (node as Record<string, unknown> | undefined)?.[step];
      const idx = typeof step === 'number' ? step : (steps[i + 1] as number);
      if (!Array.isArray(arr) || idx >= arr.length) {
        const where = renderPath(arrayPath);
        const n = Array.isArray(arr) ? arr.length : 0;
        return `the base case has ${n} item(s) in ${where}, so there is no ${where}[${idx}]; add it to base first`;
      }
    }
    node = node === null || typeof node !== 'object' ? undefined : (node as Record<PathStep, unknown>)[step];
  }
  return undefined;
}

function renderPath(steps: PathStep[]): string {
  return steps.map((s, i) => (typeof s === 'number' ? `[${s}]` : i === 0 ? s : `.${s}`)).join('');
}

/** A copy of `target` with the value at `steps` set (copied along the path, shared elsewhere; never mutates). */
export function withValueAt(target: unknown, steps: readonly PathStep[], value: unknown): unknown {
  if (steps.length === 0) return value;
  const [head, ...rest] = steps;
  if (typeof head === 'number') {
    const arr = Array.isArray(target) ? [...target] : [];
    arr[head] = withValueAt(arr[head], rest, value);
    return arr;
  }
  const obj = target !== null && typeof target === 'object' && !Array.isArray(target) ? { ...(target as object) } : {};
  (obj as Record<string, unknown>)[head] = withValueAt((obj as Record<string, unknown>)[head], rest, value);
  return obj;
}
