// Expands a parsed sweep into jobs, in a deterministic order: full factorial (nested like loops, the first vary
// path outermost), Latin hypercube, or a Saltelli design. Every case is validated before anything is queued, and
// cases that come out identical collapse into one job (same job id).
import { parseCase, type Case } from '../../schemas/case.js';
import { shownKey, UserError } from '../../schemas/errors.js';
import { checkSolvable, type SolveLimits } from '../../solver/index.js';
import {
  generatorKind,
  parseVaryPath,
  type Generator as VaryGenerator,
  type PathStep,
  type Sweep,
  withValueAt,
} from '../../schemas/sweep.js';
import { jobIdFor } from './job-id.js';
import { latinHypercubeUnit, saltelliUnit } from '../sampling/designs.js';

/** Where a job sits in a sampled design: role `A`, `B`, `AB_<i>` (Saltelli) or `LHS`, and its sample index. */
export interface DesignPlace {
  role: string;
  sample: number;
}

export interface ExpandedJob {
  job_id: string;
  /** Position in the expansion (0-based, over distinct jobs). */
  index: number;
  /** The varied values, keyed by the vary path as written in the sweep file. */
  params: Record<string, number | string>;
  case: Case;
  /** Sampled designs only: the design role and sample index of the job (the first, if points coincide). */
  design?: DesignPlace;
}

export interface Expansion {
  jobs: ExpandedJob[];
  /** Number of design points before identical cases collapsed. */
  points: number;
  /** Design points whose case equals an earlier one: `point` (0-based) is the same job as `job_index`. */
  duplicates: Array<{ point: number; job_index: number; job_id: string }>;
}

/** The values of a list generator (values, linear, log), endpoints exact. */
export function listValues(g: VaryGenerator): Array<number | string> {
  if (g.values) return g.values;
  const spaced = g.linear ?? g.log;
  if (!spaced) throw new Error(`listValues: a ${generatorKind(g)} generator is sampled, not listed`);
  const { from, to, count } = spaced;
  return Array.from({ length: count }, (_, i) => {
    if (i === count - 1) return to;
    const t = i / (count - 1);
    // Linear: from + t·(to − from); logarithmic: from·(to/from)^t (geometric spacing).
    return g.linear ? from + t * (to - from) : from * Math.pow(to / from, t);
  });
}

/** Map u ∈ [0, 1) to a sampled generator's range: uniform, or uniform in logarithm. */
export function sampledValue(g: VaryGenerator, u: number): number {
  if (g.uniform) return g.uniform.from + u * (g.uniform.to - g.uniform.from);
  if (g.log_uniform) return g.log_uniform.from * Math.pow(g.log_uniform.to / g.log_uniform.from, u);
  throw new Error(`sampledValue: a ${generatorKind(g)} generator lists values, it is not sampled`);
}

interface Point {
  values: Array<number | string>;
  design?: DesignPlace;
}

function* designPoints(sweep: Sweep): Generator<Point, void, unknown> {
  const gens = Object.values(sweep.vary);
  const d = gens.length;
  const design = sweep.design;
  if (design.kind === 'full_factorial') {
    const lists = gens.map(listValues);
    const total = lists.reduce((n, l) => n * l.length, 1);
    const digit = new Array<number>(d).fill(0);
    for (let p = 0; p < total; p++) {
      yield { values: digit.map((k, j) => lists[j][k]) };
      // Odometer: the last path turns fastest.
      for (let j = d - 1; j >= 0; j--) {
        if (++digit[j] < lists[j].length) break;
        digit[j] = 0;
      }
    }
    return;
  }
  const rows =
    design.kind === 'latin_hypercube'
      ? latinHypercubeUnit(design.samples, d, design.seed)
      : saltelliUnit(d, design.samples, design.seed);
  for (const row of rows) {
    yield { values: gens.map((g, j) => sampledValue(g, row.u[j])), design: { role: row.role, sample: row.sample } };
  }
}

/** How many design points the sweep has, without building them. */
export function countDesignPoints(sweep: Sweep): number {
  const gens = Object.values(sweep.vary);
  const design = sweep.design;
  if (design.kind === 'full_factorial') return gens.reduce((n, g) => n * listValues(g).length, 1);
  if (design.kind === 'latin_hypercube') return design.samples;
  return design.samples * (gens.length + 2);
}

/** `frequency_hz=20000, grid.cells_per_wavelength=8`: the job's varied values, for messages. */
export function describeParams(params: Record<string, number | string>): string {
  const parts = Object.entries(params).map(([k, v]) => `${shownKey(k)}=${typeof v === 'string' ? shownKey(v) : v}`);
  return parts.length > 0 ? parts.join(', ') : 'base case';
}

/**
 * Expand the sweep; `source` (the file name) starts every error. Every job passes the case schema and the
 * solver's own pre-step checks (`checkSolvable`: ground-model validity, source and receivers inside the region,
 * grid size, and the memory cap in `limits` when given), so a sweep the solver would refuse is refused here, before
 * anything is queued or written. Throws UserError naming the job, its varied values, the field and the fix, e.g.
 * `sweep.yaml: job 12 (frequency_hz=…): ground.segments[0]: loss tangent … is below 1, …`.
 */
export function expandSweepDetailed(sweep: Sweep, source = 'sweep', limits: SolveLimits = {}): Expansion {
  const paths = Object.keys(sweep.vary);
  const steps: PathStep[][] = paths.map((p) => {
    const s = parseVaryPath(p);
    if (!s) throw new Error(`expandSweep: vary path ${p} was not checked by parseSweep`);
    return s;
  });
  const jobs: ExpandedJob[] = [];
  const byId = new Map<string, number>();
  const duplicates: Expansion['duplicates'] = [];
  let point = 0;
  for (const pt of designPoints(sweep)) {
    const params: Record<string, number | string> = {};
    let input: unknown = sweep.base;
    paths.forEach((p, j) => {
      params[p] = pt.values[j];
      input = withValueAt(input, steps[j], pt.values[j]);
    });
    const where = `${source}: job ${jobs.length} (${describeParams(params)})`;
    const c = withoutUnusedParts(parseCase(input, where));
    solvableOrThrow(c, limits, where);
    // A flat case has no radius: its runs.parquet row leaves the radius column null rather than repeat a value.
    if (c.earth === undefined) for (const p of paths) if (p.startsWith('earth.')) delete params[p];
    const jobId = jobIdFor(c);
    const seen = byId.get(jobId);
    if (seen !== undefined) {
      duplicates.push({ point, job_index: seen, job_id: jobId });
    } else {
      byId.set(jobId, jobs.length);
      jobs.push({ job_id: jobId, index: jobs.length, params, case: c, ...(pt.design ? { design: pt.design } : {}) });
    }
    point++;
  }
  return { jobs, points: point, duplicates };
}

/** The solver's pre-step checks on one job; a refusal becomes `<where>: <field>: <why and the fix>`. */
function solvableOrThrow(c: Case, limits: SolveLimits, where: string): void {
  try {
    checkSolvable(c, limits);
  } catch (e) {
    if (e instanceof UserError) throw new UserError(`${where}: ${e.message}`, e.code, e.exitCode);
    throw e;
  }
}

/**
 * A case without the parts its geometry ignores: a flat geometry (planar, axisymmetric) has no earth radius, so a
 * sweep that sets flat against sphere and varies the radius runs the flat case once (the other points are
 * duplicates of it, and `plan` counts them) instead of repeating an identical solve per radius.
 */
function withoutUnusedParts(c: Case): Case {
  if (c.geometry === 'spherical' || c.earth === undefined) return c;
  const { earth: _ignored, ...flat } = c;
  return flat as Case;
}

/** The distinct jobs of a sweep, in expansion order (see `expandSweepDetailed`). */
export function expandSweep(sweep: Sweep, source = 'sweep', limits: SolveLimits = {}): ExpandedJob[] {
  return expandSweepDetailed(sweep, source, limits).jobs;
}
