// Turns the tables of an output folder (plain rows, as read) into the report's data: the convergence and
// sensitivity tables when the folder has none, the field series, the warnings and the summary. Pure: rows in,
// ReportData out; the folder reading lives in analysis/read-tables.ts.
import { convergenceTable, describeGroup, ResolutionAxisSchema, type ConvergenceRow, type ConvergenceRun } from '../analysis/grid-convergence.js';
import { elementaryEffectRows, elementaryEffects, type EffectScale } from '../analysis/morris.js';
import { regressionRows, standardisedRegression } from '../analysis/regression.js';
import { saltelliIndices, saltelliRows } from '../analysis/saltelli.js';
import type { SensitivityRow } from '../analysis/sensitivity-table.js';
import { generatorKind, type Sweep } from '../../schemas/sweep.js';
import { columnNameFor } from '../outputs/parquet.js';
import type { Cell, FieldSeries, ReportData, ReportWarning, VariedInput } from './data.js';
import { residualPhaseDeg } from './plots.js';

/** One row of runs.parquet as read (BIGINTs already made numbers). */
export type RunRecord = Readonly<Record<string, Cell>>;

/** One row of fields/ as the report needs it. */
export interface FieldRecord {
  job_id: string;
  range_m: number;
  height_m: number;
  ez_db_uv_per_m: number;
  ez_phase_deg: number;
}

export interface FolderTables {
  sweep: Sweep;
  sweepFileName: string | null;
  runColumns: readonly string[];
  runs: readonly RunRecord[];
  fields: readonly FieldRecord[];
  /** convergence.parquet and sensitivity.parquet when the folder has them (null: compute here). */
  convergence: ConvergenceRow[] | null;
  sensitivity: SensitivityRow[] | null;
}

export interface AssemblyOptions {
  readonly generatedBy: string;
  /** Convergence tolerances (see convergenceTable). */
  readonly toleranceDb?: number;
  readonly tolerancePhaseDeg?: number;
}

/** Warnings found while assembling that are not the runs' own: they go into the report's warnings section. */
export interface Notes {
  warnings: ReportWarning[];
  /** How the sensitivity rows were obtained, for the report's sensitivity section. */
  sensitivityNote?: string;
}

const RUN_TABLE_COLUMNS = ['job_id', 'status', 'cell_size_m', 'steps', 'cells_total', 'wall_time_s', 'warnings', 'error'];

function num(v: Cell | undefined): number | undefined {
  return typeof v === 'number' && Number.isFinite(v) ? v : undefined;
}

function paramColumnsOf(sweep: Sweep): Array<{ path: string; column: string }> {
  return Object.keys(sweep.vary).map((path) => ({ path, column: columnNameFor(path) }));
}

function fieldsByJob(fields: readonly FieldRecord[]): Map<string, FieldRecord[]> {
  const byJob = new Map<string, FieldRecord[]>();
  for (const f of fields) {
    const list = byJob.get(f.job_id) ?? [];
    list.push(f);
    byJob.set(f.job_id, list);
  }
  for (const list of byJob.values()) list.sort((a, b) => a.range_m - b.range_m || a.height_m - b.height_m);
  return byJob;
}

function frequencyOf(run: RunRecord, sweep: Sweep): number {
  const varied = num(run[columnNameFor('frequency_hz')]);
  if (varied !== undefined && 'frequency_hz' in sweep.vary) return varied;
  const base = Number((sweep.base as Record<string, unknown>).frequency_hz);
  return Number.isFinite(base) && base > 0 ? base : 1;
}

/** Convergence rows along the sweep's resolution axis, from the done runs and their fields. */
export function computeConvergence(tables: FolderTables, options: AssemblyOptions): ConvergenceRow[] {
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

/** Outputs analysed for sensitivity: Ez in dB and the residual phase, at each receiver range of the sweep. */
function outputsOf(tables: FolderTables, runs: readonly RunRecord[]): Map<string, Map<string, number>> {
  const byJob = fieldsByJob(tables.fields);
  const outputs = new Map<string, Map<string, number>>();
  const put = (output: string, job: string, v: number) => {
    const m = outputs.get(output) ?? new Map<string, number>();
    m.set(job, v);
    outputs.set(output, m);
  };
  for (const run of runs) {
    const job = String(run.job_id);
    const pts = byJob.get(job);
    if (!pts) continue;
    const series: FieldSeries = { job_id: job, params: {}, frequency_hz: frequencyOf(run, tables.sweep), points: pts };
    const residual = residualPhaseDeg(series);
    pts.forEach((p, k) => {
      const where = `${p.range_m / 1000}km`;
      put(`ez_db_uv_per_m@${where}`, job, p.ez_db_uv_per_m);
      put(`residual_phase_deg@${where}`, job, residual[k].value);
    });
  }
  // Residual phases are defined modulo 360°: bring each output's values within half a turn of their median.
  for (const [name, m] of outputs) {
    if (!name.startsWith('residual_phase_deg')) continue;
    const sorted = [...m.values()].sort((a, b) => a - b);
    const median = sorted[Math.floor(sorted.length / 2)];
    for (const [job, v] of m) m.set(job, v + 360 * Math.round((median - v) / 360));
  }
  return outputs;
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
  const sweep = tables.sweep;
  const resolutionColumn = sweep.resolution_axis ? columnNameFor(sweep.resolution_axis) : undefined;
  const params = paramColumnsOf(sweep);
  const done = tables.runs.filter((r) => r.status === 'done');
  if (params.length === 0 || done.length === 0) return [];
  const outputs = outputsOf(tables, done);
  const rows: SensitivityRow[] = [];
  const design = sweep.design;
  if (design.kind === 'saltelli') {
    const n = design.samples;
    const d = params.length;
    const rowOf = (role: string, sample: number) => {
      const block = role === 'A' ? 0 : role === 'B' ? 1 : 2 + Number(role.slice(3));
      return block * n + sample;
    };
    const placed = new Map<string, number>();
    for (const run of done) {
      const role = run.design_role;
      const sample = num(run.design_sample);
      if (typeof role === 'string' && sample !== undefined) placed.set(String(run.job_id), rowOf(role, sample));
    }
    for (const [output, byJob] of outputs) {
      const y = new Float64Array(n * (d + 2)).fill(Number.NaN);
      for (const [job, v] of byJob) {
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
        const indices = saltelliIndices(y, { n, d, skip: 0, seed: design.seed });
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
    const used = atFinest.filter((r) => byJob.has(String(r.job_id)));
    if (numeric.length > 0 && used.length >= numeric.length + 2) {
      const x = used.map((r) => numeric.map((p) => (isLog(p.path) ? Math.log10(num(r[p.column])!) : num(r[p.column])!)));
      const y = used.map((r) => byJob.get(String(r.job_id))!);
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
      const ee = elementaryEffects(grid, used.map((r) => byJob.get(String(r.job_id))!), numeric.map((p) => p.column), { scales });
      rows.push(...elementaryEffectRows(output, ee));
    }
  }
  return rows;
}

function warningsOf(tables: FolderTables, convergence: readonly ConvergenceRow[]): ReportWarning[] {
  const out: ReportWarning[] = [];
  for (const run of tables.runs) {
    const job = String(run.job_id);
    if (run.status === 'failed') {
      out.push({ kind: 'failed_job', job_id: job, message: typeof run.error === 'string' && run.error !== '' ? run.error : 'failed (no message)' });
    }
    if (typeof run.warnings === 'string' && run.warnings !== '') {
      for (const w of run.warnings.split('; ')) {
        out.push({ kind: /impedance model|validity limit/i.test(w) ? 'impedance_validity' : 'solver', job_id: job, message: w });
      }
    }
  }
  for (const r of convergence) {
    if (r.verdict === 'converged') continue;
    const group = r.group === '{}' ? '' : ` (${describeGroup(r.group)})`;
    out.push({ kind: 'unconverged_mesh', job_id: null, message: `${r.output} at ${r.range_m / 1000} km${group}: ${r.behaviour}; ${r.advice}` });
  }
  return out;
}

function variedOf(tables: FolderTables): VariedInput[] {
  return paramColumnsOf(tables.sweep).map(({ path, column }) => {
    const values = tables.runs.map((r) => r[column]).filter((v) => v !== null && v !== undefined);
    const numbers = values.filter((v): v is number => typeof v === 'number');
    const numeric = numbers.length === values.length && numbers.length > 0;
    return {
      path,
      column,
      min: numeric ? Math.min(...numbers) : null,
      max: numeric ? Math.max(...numbers) : null,
      distinct: new Set(values.map((v) => String(v))).size,
    };
  });
}

function designText(sweep: Sweep): string {
  const d = sweep.design;
  if (d.kind === 'full_factorial') return 'full factorial';
  const what = d.kind === 'saltelli' ? `Saltelli, N = ${d.samples} base samples` : `Latin hypercube, ${d.samples} samples`;
  return `${what}, seed ${d.seed}`;
}

/** The report's data from an output folder's tables. */
export function assembleReportData(tables: FolderTables, options: AssemblyOptions): ReportData {
  const sweep = tables.sweep;
  const notes: Notes = { warnings: [] };
  const convergence = tables.convergence ?? computeConvergence(tables, options);
  const sensitivity = tables.sensitivity ?? computeSensitivity(tables, notes);
  // A sensitivity table read from the folder was made the same way: say so there too.
  if (tables.sensitivity !== null) notes.sensitivityNote = finestLevelRuns(tables, tables.runs.filter((r) => r.status === 'done')).note;
  const params = paramColumnsOf(sweep);
  const byJob = fieldsByJob(tables.fields);
  const field_series: FieldSeries[] = tables.runs.flatMap((run) => {
    const pts = byJob.get(String(run.job_id));
    if (run.status !== 'done' || !pts) return [];
    return [
      {
        job_id: String(run.job_id),
        params: Object.fromEntries(params.map((p) => [p.column, run[p.column] ?? null])),
        frequency_hz: frequencyOf(run, sweep),
        points: pts.map((p) => ({ range_m: p.range_m, ez_db_uv_per_m: p.ez_db_uv_per_m, ez_phase_deg: p.ez_phase_deg })),
      },
    ];
  });
  const count = (status: string) => tables.runs.filter((r) => r.status === status).length;
  const columns = [
    ...RUN_TABLE_COLUMNS.slice(0, 2),
    ...params.map((p) => p.column),
    ...RUN_TABLE_COLUMNS.slice(2),
  ].filter((c) => tables.runColumns.includes(c));
  return {
    title: `Loamwave report: ${sweep.name}`,
    generated_by: options.generatedBy,
    sweep: {
      name: sweep.name,
      description: sweep.description ?? null,
      file_name: tables.sweepFileName,
      design: designText(sweep),
      resolution_axis: sweep.resolution_axis ?? null,
      varied: variedOf(tables),
      jobs: {
        total: tables.runs.length,
        done: count('done'),
        failed: count('failed'),
        pending: tables.runs.length - count('done') - count('failed'),
      },
      wall_time_s_total: tables.runs.reduce((s, r) => s + (num(r.wall_time_s) ?? 0), 0),
    },
    field_series,
    convergence,
    sensitivity,
    sensitivity_note: notes.sensitivityNote ?? null,
    runs: {
      columns,
      rows: tables.runs.map((r) => columns.map((c) => (c === 'job_id' ? String(r[c]).slice(0, 12) : (r[c] ?? null)))),
      total: tables.runs.length,
    },
    warnings: [...warningsOf(tables, convergence), ...notes.warnings],
  };
}
