// The analysis of a sweep's tables: grid convergence along the resolution axis and sensitivity indices for the
// sweep's design, from the rows of runs.parquet and fields/ as read back (read-tables.ts). Pure: rows in, rows
// out; outputs/ writes them to Parquet and report/ draws them.
import { convergenceGroupKey, convergenceTable, type ConvergenceRun } from './grid-convergence.js';
import { ResolutionAxisSchema, type ConvergenceRow } from '../../schemas/analysis-rows.js';
import { elementaryEffectRows, elementaryEffects, type EffectScale } from './morris.js';
import { residualPhaseDeg } from './residual-phase.js';
import { regressionRows, standardisedRegression } from './regression.js';
import { saltelliIndices, saltelliRows } from './saltelli.js';
import { saltelliRowOfRole } from '../sampling/saltelli-layout.js';
import { type SensitivityRow } from '../../schemas/analysis-rows.js';
import type { Cell, FieldReader, FieldRecord, FolderTables, RunRecord } from './read-tables.js';
import { generatorKind, type Sweep } from '../../schemas/sweep.js';
import { columnNameFor } from '../../schemas/table-rows.js';
import { unwrapNearDeg } from '../../solver/phase.js';

export interface AnalysisOptions {
  readonly generatedBy: string;
  /** Convergence tolerances (see convergenceTable). */
  readonly toleranceDb?: number;
  readonly tolerancePhaseDeg?: number;
}

/** Why an analysis could not be made as asked; the report lists these with the runs' own warnings. */
export interface AnalysisWarning {
  kind: 'solver';
  job_id: null;
  message: string;
}

/** Notes gathered while analysing, for the report. */
export interface Notes {
  warnings: AnalysisWarning[];
  /** How the sensitivity rows were obtained, for the report's sensitivity section. */
  sensitivityNote?: string;
}

export function num(v: Cell | undefined): number | undefined {
  return typeof v === 'number' && Number.isFinite(v) ? v : undefined;
}

export function paramColumnsOf(sweep: Sweep): Array<{ path: string; column: string }> {
  return Object.keys(sweep.vary).map((path) => ({ path, column: columnNameFor(path) }));
}

export function fieldsByJob(fields: readonly FieldRecord[]): Map<string, FieldRecord[]> {
  const byJob = new Map<string, FieldRecord[]>();
  for (const f of fields) {
    const list = byJob.get(f.job_id) ?? [];
    list.push(f);
    byJob.set(f.job_id, list);
  }
  for (const list of byJob.values()) list.sort((a, b) => a.range_m - b.range_m || a.height_m - b.height_m);
  return byJob;
}

export function frequencyOf(run: RunRecord, sweep: Sweep): number {
  const varied = num(run[columnNameFor('frequency_hz')]);
  if (varied !== undefined && 'frequency_hz' in sweep.vary) return varied;
  const base = Number((sweep.base as Record<string, unknown>).frequency_hz);
  return Number.isFinite(base) && base > 0 ? base : 1;
}

/** Convergence rows along the sweep's resolution axis, from the done runs and their fields. */
export function computeConvergence(tables: FolderTables, options: AnalysisOptions): ConvergenceRow[] {
  const axisPath = tables.sweep.resolution_axis;
  if (axisPath === undefined) return [];
  const axis = ResolutionAxisSchema.safeParse(axisPath.replace(/^grid\./, ''));
  if (!axis.success) return [];
  const column = columnNameFor(axisPath);
  const byJob = fieldsByJob(tables.fields);
  const params = paramColumnsOf(tables.sweep);
  const runs: ConvergenceRun[] = [];
  for (const run of tables.runs) {
    const resolution = num(run[column]);
    const receivers = byJob.get(String(run.job_id));
    if (run.status !== 'done' || resolution === undefined || !receivers) continue;
    runs.push({ params: Object.fromEntries(params.map((p) => [p.column, run[p.column] ?? null])), resolution, receivers });
  }
  return convergenceTable(runs, {
    axis: axis.data,
    resolutionColumn: column,
    toleranceDb: options.toleranceDb,
    tolerancePhaseDeg: options.tolerancePhaseDeg,
  });
}

/**
 * The convergence rows out of core: the groups are formed from runs.parquet alone, only the runs the study uses
 * (the first of each resolution level in each group of three levels or more) are read, group after group, and
 * each group's rows go to `sink` with the group's number (groups may come in any order). Gives the rows
 * `computeConvergence` gives, in the order of the group numbers.
 */
export async function computeConvergenceOutOfCore(
  tables: FolderTables,
  reader: FieldReader,
  options: AnalysisOptions,
  sink: (rows: readonly ConvergenceRow[], group: number) => Promise<void>,
  limits: { streamMaxRows?: number } = {},
): Promise<number> {
  const axisPath = tables.sweep.resolution_axis;
  if (axisPath === undefined) return 0;
  const axis = ResolutionAxisSchema.safeParse(axisPath.replace(/^grid\./, ''));
  if (!axis.success) return 0;
  const column = columnNameFor(axisPath);
  const params = paramColumnsOf(tables.sweep);
  const withFields = await reader.rowsPerJob();
  const groups = new Map<string, Map<number, { id: string; run: Omit<ConvergenceRun, 'receivers'> }>>();
  for (const run of tables.runs) {
    const resolution = num(run[column]);
    const id = String(run.job_id);
    if (run.status !== 'done' || resolution === undefined || !withFields.has(id)) continue;
    const p = Object.fromEntries(params.map((q) => [q.column, run[q.column] ?? null]));
    const key = convergenceGroupKey(p, column);
    const levels = groups.get(key) ?? new Map<number, { id: string; run: Omit<ConvergenceRun, 'receivers'> }>();
    // convergenceTable keeps the first run of each level of a group.
    if (!levels.has(resolution)) levels.set(resolution, { id, run: { params: p, resolution } });
    groups.set(key, levels);
  }
  const used = [...groups.entries()].filter(([, levels]) => levels.size >= 3).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  const order = used.flatMap(([, levels]) => [...levels.values()]);
  const groupOf = new Map<string, number>();
  used.forEach(([, levels], g) => levels.forEach((v) => groupOf.set(v.id, g)));
  const runOf = new Map(order.map((o) => [o.id, o.run]));
  const table = { axis: axis.data, resolutionColumn: column, toleranceDb: options.toleranceDb, tolerancePhaseDeg: options.tolerancePhaseDeg };
  let rows = 0;
  const emit = async (g: number, batch: ConvergenceRun[]) => {
    const out = convergenceTable(batch, table);
    rows += out.length;
    await sink(out, g);
  };
  // The files hold the jobs in index order. When each group's jobs lie close together in that order (the
  // resolution axis varies fast, as it does when listed last), the rows are streamed as stored and each group is
  // analysed as soon as its last job is read, holding only the groups under way; otherwise DuckDB sorts the rows
  // group by group (and spills to disk).
  const indexOf = new Map(tables.runs.map((r) => [String(r.job_id), num(r.index) ?? 0]));
  const held = inFlightRows(
    used.map(([, levels]) => [...levels.values()].map((v) => v.id)),
    (id) => indexOf.get(id)!,
    (id) => withFields.get(id)!,
  );
  if (held <= (limits.streamMaxRows ?? STREAM_GROUPS_MAX_ROWS)) {
    const pending = new Map<number, Map<string, FieldRecord[]>>();
    for await (const { job_id, points } of reader.inFileOrder()) {
      const g = groupOf.get(job_id);
      if (g === undefined) continue;
      let got = pending.get(g);
      if (!got) pending.set(g, (got = new Map()));
      got.set(job_id, points);
      const members = used[g][1];
      if (got.size === members.size) {
        pending.delete(g);
        await emit(g, [...members.values()].map((v) => ({ ...v.run, receivers: got.get(v.id)! })));
      }
    }
    return rows;
  }
  let group = -1;
  let batch: ConvergenceRun[] = [];
  for await (const { job_id, points } of reader.byJob(order.map((o) => o.id))) {
    const g = groupOf.get(job_id)!;
    if (g !== group) {
      if (batch.length > 0) await emit(group, batch);
      batch = [];
      group = g;
    }
    batch.push({ ...runOf.get(job_id)!, receivers: points });
  }
  if (batch.length > 0) await emit(group, batch);
  return rows;
}

/** Most field rows held at once by the streamed convergence study (a Loamwave choice: some 50 MB of points). */
const STREAM_GROUPS_MAX_ROWS = 500_000;

/**
 * The most field rows held at once when the jobs are read in index order and each group is held from its first
 * job's rows until its last job's: an upper bound, summed over the groups under way at each point.
 */
export function inFlightRows(groups: ReadonlyArray<readonly string[]>, indexOf: (id: string) => number, rowsOf: (id: string) => number): number {
  const events: Array<[at: number, rows: number]> = [];
  for (const ids of groups) {
    let first = Infinity;
    let last = -Infinity;
    let rows = 0;
    for (const id of ids) {
      const i = indexOf(id);
      first = Math.min(first, i);
      last = Math.max(last, i);
      rows += rowsOf(id);
    }
    events.push([first, rows], [last + 0.5, -rows]);
  }
  events.sort((a, b) => a[0] - b[0] || b[1] - a[1]);
  let now = 0;
  let most = 0;
  for (const [, d] of events) {
    now += d;
    most = Math.max(most, now);
  }
  return most;
}

/**
 * Outputs analysed for sensitivity (Ez in dB and the residual phase at each receiver range), each held as one
 * value per done run in a Float64Array (NaN: the run has none), so a sweep of many runs costs 8 bytes a value.
 */
export class OutputValues {
  readonly outputs = new Map<string, Float64Array>();
  private readonly jobPos: Map<string, number>;

  constructor(jobs: readonly string[]) {
    this.jobPos = new Map(jobs.map((j, k) => [j, k]));
  }

  put(output: string, job: string, v: number): void {
    let a = this.outputs.get(output);
    if (!a) {
      a = new Float64Array(this.jobPos.size).fill(Number.NaN);
      this.outputs.set(output, a);
    }
    a[this.jobPos.get(job)!] = v;
  }

  has(output: Float64Array, job: string): boolean {
    const k = this.jobPos.get(job);
    return k !== undefined && !Number.isNaN(output[k]);
  }

  get(output: Float64Array, job: string): number {
    return output[this.jobPos.get(job)!];
  }

  /** The (job, value) pairs of one output that are present. */
  *entries(output: Float64Array): Generator<[string, number]> {
    for (const [job, k] of this.jobPos) if (!Number.isNaN(output[k])) yield [job, output[k]];
  }

  /** Add one run's outputs from its field rows (sorted by range, then height). */
  addRun(run: RunRecord, sweep: Sweep, pts: readonly FieldRecord[]): void {
    const job = String(run.job_id);
    const residual = residualPhaseDeg({ frequency_hz: frequencyOf(run, sweep), points: pts });
    pts.forEach((p, k) => {
      const where = `${p.range_m / 1000}km`;
      this.put(`ez_db_uv_per_m@${where}`, job, p.ez_db_uv_per_m);
      this.put(`residual_phase_deg@${where}`, job, residual[k].value);
    });
  }

  /** Residual phases are defined modulo 360°: bring each output's values within half a turn of their median. */
  finish(): this {
    for (const [name, a] of this.outputs) {
      if (!name.startsWith('residual_phase_deg')) continue;
      const sorted = a.filter((v) => !Number.isNaN(v)).sort();
      const median = sorted[Math.floor(sorted.length / 2)];
      for (let k = 0; k < a.length; k++) if (!Number.isNaN(a[k])) a[k] = unwrapNearDeg(a[k], median);
    }
    return this;
  }
}

/** The outputs of the done runs from field rows held in memory. */
function outputsOf(tables: FolderTables, runs: readonly RunRecord[]): OutputValues {
  const byJob = fieldsByJob(tables.fields);
  const values = new OutputValues(runs.map((r) => String(r.job_id)));
  for (const run of runs) {
    const pts = byJob.get(String(run.job_id));
    if (pts) values.addRun(run, tables.sweep, pts);
  }
  return values.finish();
}

/**
 * The runs that count for regression and elementary effects: the resolution axis is a numerical setting, not an
 * input, so when it varies only the runs on its finest level count (grid error must not pass for sensitivity).
 */
export function finestLevelRuns(tables: FolderTables, done: readonly RunRecord[]): { runs: readonly RunRecord[]; note?: string } {
  const sweep = tables.sweep;
  if (sweep.resolution_axis === undefined || !(sweep.resolution_axis in sweep.vary) || sweep.design.kind === 'saltelli') {
    return { runs: done };
  }
  const column = columnNameFor(sweep.resolution_axis);
  const levels = done.map((r) => num(r[column])).filter((v): v is number => v !== undefined);
  if (levels.length === 0) return { runs: done };
  const finest = column.endsWith('cell_size_m') ? Math.min(...levels) : Math.max(...levels);
  const runs = done.filter((r) => num(r[column]) === finest);
  return {
    runs,
    note: `Sensitivity uses the ${runs.length} runs on the finest level of ${sweep.resolution_axis} (${finest}); coarser levels only enter the grid convergence study.`,
  };
}

/** Sensitivity rows for the sweep's design, from the done runs; notes why when they cannot be computed. */
export function computeSensitivity(tables: FolderTables, notes: Notes): SensitivityRow[] {
  const params = paramColumnsOf(tables.sweep);
  const done = tables.runs.filter((r) => r.status === 'done');
  if (params.length === 0 || done.length === 0) return [];
  return sensitivityFrom(tables, done, outputsOf(tables, done), notes);
}

/**
 * The same, out of core: the field rows are read job by job from `reader` (the folder's fields/ table), and only
 * the outputs (one double per run and receiver range) are held. Gives the rows `computeSensitivity` gives.
 */
export async function computeSensitivityOutOfCore(tables: FolderTables, reader: FieldReader, notes: Notes): Promise<SensitivityRow[]> {
  const params = paramColumnsOf(tables.sweep);
  const done = tables.runs.filter((r) => r.status === 'done');
  if (params.length === 0 || done.length === 0) return [];
  const ids = done.map((r) => String(r.job_id));
  const values = new OutputValues(ids);
  const runOf = new Map(done.map((r, k) => [ids[k], r]));
  // Order does not matter here (each value has its place): the rows are streamed as the files hold them.
  for await (const { job_id, points } of reader.inFileOrder()) {
    const run = runOf.get(job_id);
    if (run) values.addRun(run, tables.sweep, points);
  }
  return sensitivityFrom(tables, done, values.finish(), notes);
}

function sensitivityFrom(tables: FolderTables, done: readonly RunRecord[], values: OutputValues, notes: Notes): SensitivityRow[] {
  const sweep = tables.sweep;
  const resolutionColumn = sweep.resolution_axis ? columnNameFor(sweep.resolution_axis) : undefined;
  const params = paramColumnsOf(sweep);
  const outputs = values.outputs;
  const rows: SensitivityRow[] = [];
  const design = sweep.design;
  if (design.kind === 'saltelli') {
    const n = design.samples;
    const d = params.length;
    const layout = { n, d, skip: 0, seed: design.seed };
    const placed = new Map<string, number>();
    for (const run of done) {
      const role = run.design_role;
      const sample = num(run.design_sample);
      const at = typeof role === 'string' && sample !== undefined ? saltelliRowOfRole(layout, role, sample) : undefined;
      if (at !== undefined) placed.set(String(run.job_id), at);
    }
    for (const [output, byJob] of outputs) {
      const y = new Float64Array(n * (d + 2)).fill(Number.NaN);
      for (const [job, v] of values.entries(byJob)) {
        const at = placed.get(job);
        if (at !== undefined) y[at] = v;
      }
      const missing = y.filter((v) => Number.isNaN(v)).length;
      if (missing > 0) {
        // One warning for the sweep, naming the first output hit: every output lacks the same runs.
        if (rows.length === 0 && !notes.warnings.some((w) => w.message.includes('Saltelli runs have no result'))) {
          notes.warnings.push({
            kind: 'solver',
            job_id: null,
            message: `sensitivity of ${output} and the other outputs: ${missing} of ${y.length} Saltelli runs have no result; Sobol' indices need them all (finish or rerun the failed jobs)`,
          });
        }
        continue;
      }
      try {
        const indices = saltelliIndices(y, layout);
        rows.push(...saltelliRows(output, params.map((p) => p.column), indices, n));
      } catch (e) {
        notes.warnings.push({ kind: 'solver', job_id: null, message: `sensitivity of ${output}: ${(e as Error).message.replace(/^saltelliIndices: /, '')}` });
      }
    }
    return rows;
  }
  // Latin hypercube and full factorial: SRC on the inputs (log10 of those sampled or listed in decades), and on a
  // full factorial grid the elementary effects too, over the runs on the finest grid level.
  const finest = finestLevelRuns(tables, done);
  const atFinest = finest.runs;
  if (finest.note) notes.sensitivityNote = finest.note;
  const physical = params.filter((p) => p.column !== resolutionColumn);
  const numeric = physical.filter((p) => atFinest.every((r) => num(r[p.column]) !== undefined));
  const isLog = (path: string) => ['log', 'log_uniform'].includes(generatorKind(sweep.vary[path]));
  for (const [output, byJob] of outputs) {
    const used = atFinest.filter((r) => values.has(byJob, String(r.job_id)));
    if (numeric.length > 0 && used.length >= numeric.length + 2) {
      const x = used.map((r) => numeric.map((p) => (isLog(p.path) ? Math.log10(num(r[p.column])!) : num(r[p.column])!)));
      const y = used.map((r) => values.get(byJob, String(r.job_id)));
      try {
        const names = numeric.map((p) => (isLog(p.path) ? `log10(${p.column})` : p.column));
        rows.push(...regressionRows(output, names, standardisedRegression(x, y)));
      } catch (e) {
        notes.warnings.push({ kind: 'solver', job_id: null, message: `sensitivity of ${output}: ${(e as Error).message}` });
      }
    }
    if (design.kind === 'full_factorial') {
      const grid = used.map((r) => Object.fromEntries(numeric.map((p) => [p.column, num(r[p.column])!])));
      const scales: Record<string, EffectScale> = Object.fromEntries(numeric.map((p) => [p.column, isLog(p.path) ? 'log' : 'linear']));
      const ee = elementaryEffects(grid, used.map((r) => values.get(byJob, String(r.job_id))), numeric.map((p) => p.column), { scales });
      rows.push(...elementaryEffectRows(output, ee));
    }
  }
  return rows;
}
