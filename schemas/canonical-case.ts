// The case as a job id sees it: the validated case with every value that equals its schema default left out, so
// that a release adding an option whose default keeps the old behaviour leaves every job id as it was, and a
// default written out and a default left out are the same job. Objects left empty by this are left out too.
import { caseJsonSchema, type Case } from './case.js';

interface SchemaNode {
  default?: unknown;
  properties?: Record<string, SchemaNode>;
  items?: SchemaNode;
  oneOf?: SchemaNode[];
  anyOf?: SchemaNode[];
  const?: unknown;
}

let caseSchema: SchemaNode | undefined;

/** Deep equality of plain JSON values (objects compared key by key, arrays in order). */
function same(a: unknown, b: unknown): boolean {
  if (a === b) return !(a === 0 && Object.is(a, -0) !== Object.is(b, -0));
  if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null) return false;
  if (Array.isArray(a) !== Array.isArray(b)) return false;
  const ka = Object.keys(a as object);
  const kb = Object.keys(b as object);
  return ka.length === kb.length && ka.every((k) => same((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]));
}

/** The branch of a union whose `const` properties (the `kind`) match the value. */
function branchFor(node: SchemaNode, value: Record<string, unknown>): SchemaNode | undefined {
  const branches = node.oneOf ?? node.anyOf;
  if (!branches) return node;
  return branches.find((b) => Object.entries(b.properties ?? {}).every(([k, p]) => p.const === undefined || same(p.const, value[k])));
}

function strip(value: unknown, node: SchemaNode | undefined): unknown {
  if (node === undefined || value === null || typeof value !== 'object') return value;
  if (Array.isArray(value)) return value.map((v) => strip(v, node.items));
  const obj = value as Record<string, unknown>;
  const branch = branchFor(node, obj);
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(obj)) {
    const child = branch?.properties?.[k];
    if (child && 'default' in child && same(v, child.default)) continue;
    const s = strip(v, child);
    if (s !== null && typeof s === 'object' && !Array.isArray(s) && Object.keys(s).length === 0 && child?.default !== undefined) continue;
    out[k] = s;
  }
  return out;
}

/** The case without the values its schema would fill in anyway (the canonical form a job id hashes). */
export function withoutDefaults(c: Case): unknown {
  caseSchema ??= caseJsonSchema() as SchemaNode;
  return strip(c, caseSchema);
}
