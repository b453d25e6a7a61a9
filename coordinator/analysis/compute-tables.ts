// The analysis of a sweep's tables: grid convergence along the resolution axis and sensitivity indices for the
// sweep's design, from the rows of runs.parquet and fields/ as read back (read-tables.ts). Pure: rows in, rows
// out; outputs/ writes them to Parquet and report/ draws them.
import { convergenceTable, type ConvergenceRun } from './grid-convergence.js';
import { ResolutionAxisSchema, type ConvergenceRow } from '../../schemas/analysis-rows.js';
import { elementaryEffectRows, elementaryEffects, type EffectScale } from './morris.js';
import { residualPhaseDeg } from './residual-phase.js';
import { regressionRows, standardisedRegression } from './regression.js';
import { saltelliIndices, saltelliRows } from './saltelli.js';
import { saltelliRowOfRole } from '../sampling/saltelli-layout.js';
import { type SensitivityRow } from '../../schemas/analysis-rows.js';
import type { Cell, FieldRecord, FolderTables, RunRecord } from './read-tables.js';
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
    const series = { frequency_hz: frequencyOf(run, tables.sweep), points: pts };
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
    for (const [job, v] of m) m.set(job, unwrapNearDeg(v, median));
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
