// Reads a sweep file (YAML or JSON) and validates it: the schema, every vary path against the case schema, and
// every listed or end-point value against the field it sets. Errors are one line naming the file, the path in it
// and the fix; the full check of each expanded case happens in expand.ts.
import { readFileSync } from 'node:fs';
import { basename, extname } from 'node:path';
import { parseDocument } from 'yaml';
import { CaseSchema } from '../../schemas/case.js';
import { formatIssue, oneLine, shownKey, UserError, userErrorFromZod } from '../../schemas/errors.js';
import {
  defaultResolutionAxis,
  generatorKind,
  parseVaryPath,
  SweepSchema,
  type PathStep,
  type Sweep,
  varyPathProblem,
  withValueAt,
} from '../../schemas/sweep.js';
import { countDesignPoints, listValues } from './expand.js';
import { SALTELLI_MAX_PARAMETERS } from '../sampling/designs.js';

const CODE = 'loamwave.sweep.invalid';
/** Most design points one sweep may have: beyond this the expansion alone would exhaust memory (a Loamwave choice). */
export const MAX_DESIGN_POINTS = 1_000_000;

/** Read and validate a sweep file; `text` is the file as read (copied into the outputs). */
export function loadSweep(path: string): { sweep: Sweep; text: string; path: string } {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, not a file' : String(code);
    throw new UserError(`${path}: cannot read the sweep file (${why}); give the path of a .yaml or .json sweep file`, CODE);
  }
  const source = basename(path);
  return { sweep: parseSweep(parseSweepText(text, source, extname(path).toLowerCase()), source), text, path };
}

/** Parse the text as JSON (`.json`) or YAML (anything else; YAML 1.2 reads JSON too). */
export function parseSweepText(text: string, source: string, ext = '.yaml'): unknown {
  if (ext === '.json') {
    try {
      return JSON.parse(text) as unknown;
    } catch (e) {
      throw new UserError(`${source}: not valid JSON (${oneLine((e as Error).message)}); fix the syntax`, CODE);
    }
  }
  // parseDocument collects errors and warnings instead of throwing or printing them (an unknown tag would otherwise
  // go to stderr as a multi-line process warning), and logLevel 'error' keeps building the value from printing one
  // (a key that is a collection becomes its text, which the schema then refuses); aliases can still fail.
  const doc = parseDocument(text, { prettyErrors: true, uniqueKeys: true, logLevel: 'error' });
  const problem = doc.errors[0] ?? doc.warnings[0];
  if (problem) {
    const at = problem.linePos?.[0];
    const where = at ? ` at line ${at.line}, column ${at.col}` : '';
    const what = problem.message.split('\n')[0].replace(/ at line \d+, column \d+:?.*$/, '');
    throw new UserError(`${source}: not valid YAML${where}: ${what}`, CODE);
  }
  let value: unknown;
  try {
    // at most 100 aliases (the reader's default): more is how a small file expands into an enormous value
    value = doc.toJS({ maxAliasCount: 100 });
  } catch (e) {
    // the YAML reader throws ReferenceError for an unresolved alias and for too many aliases
    if (e instanceof ReferenceError) throw new UserError(`${source}: not valid YAML: ${e.message.split('\n')[0]}; write the value out instead of the alias`, CODE);
    throw e;
  }
  if (holdsCycle(value)) {
    throw new UserError(`${source}: not valid YAML: an anchor's value refers to itself through an alias; write the value out`, CODE);
  }
  return value;
}

/** Whether a value read from YAML contains itself (an anchor whose alias sits inside it). */
function holdsCycle(value: unknown, onPath = new Set<object>()): boolean {
  if (value === null || typeof value !== 'object') return false;
  if (onPath.has(value)) return true;
  onPath.add(value);
  for (const v of Object.values(value)) if (holdsCycle(v, onPath)) return true;
  onPath.delete(value);
  return false;
}

/** Validate a sweep (already parsed from its text); `source` names the file in every error. */
export function parseSweep(input: unknown, source = 'sweep'): Sweep {
  const r = SweepSchema.safeParse(input);
  if (!r.success) throw userErrorFromZod(r.error, input, source, CODE);
  const sweep = r.data;
  const d = Object.keys(sweep.vary).length;
  if (sweep.design.kind === 'saltelli' && d > SALTELLI_MAX_PARAMETERS) {
    throw new UserError(`${source}: vary: a saltelli design takes at most ${SALTELLI_MAX_PARAMETERS} parameters (got ${d}); vary fewer or use latin_hypercube`, CODE);
  }
  for (const [path, g] of Object.entries(sweep.vary)) {
    const problem = varyPathProblem(path, sweep.base);
    if (problem) throw new UserError(`${source}: vary.${shownKey(path)}: ${problem}`, CODE);
    checkGeneratorValues(sweep, path, g, input, source);
  }
  const points = countDesignPoints(sweep);
  if (points > MAX_DESIGN_POINTS) {
    const where = sweep.design.kind === 'full_factorial' ? 'vary' : 'design.samples';
    throw new UserError(
      `${source}: ${where}: the design has ${points.toPrecision(3)} points, more than ${MAX_DESIGN_POINTS}; vary fewer values or split the sweep`,
      CODE,
    );
  }
  if (sweep.resolution_axis === undefined) {
    const axis = defaultResolutionAxis(sweep.vary);
    if (axis !== undefined) sweep.resolution_axis = axis;
  }
  return sweep;
}

/**
 * Each listed value (or each end of a sampled range) set alone into the base case must satisfy the field it
 * sets; only problems at that very field are reported here, so that `vary.frequency_hz.values[2]` is blamed
 * rather than a job. Problems that need the other fields (a receiver beyond the domain) surface per job.
 */
function checkGeneratorValues(sweep: Sweep, path: string, g: Sweep['vary'][string], input: unknown, source: string): void {
  const steps = parseVaryPath(path) as PathStep[];
  const kind = generatorKind(g);
  const checks: Array<{ where: PathStep[]; value: number | string }> =
    kind === 'uniform' || kind === 'log_uniform'
      ? (['from', 'to'] as const).map((end) => ({ where: [kind, end], value: g[kind]![end] }))
      : listValues(g).map((value, i) => ({ where: [kind, i], value }));
  for (const { where, value } of checks) {
    const r = CaseSchema.safeParse(withValueAt(sweep.base, steps, value));
    if (r.success) continue;
    const issue = r.error.issues.find((is) => samePath(is.path, steps));
    if (!issue) continue;
    const at: PathStep[] = ['vary', path, ...where];
    // For generated values (linear, log) the offending value is not in the file: show it through a stand-in input.
    const shown = kind === 'values' || kind === 'uniform' || kind === 'log_uniform' ? input : withValueAt({}, at, value);
    throw new UserError(`${source}: ${formatIssue({ ...issue, path: at }, shown)}`, CODE);
  }
}

function samePath(a: ReadonlyArray<PropertyKey>, b: readonly PathStep[]): boolean {
  return a.length === b.length && a.every((s, i) => s === b[i]);
}
