// Turns the tables of an output folder (plain rows, as read) into the report's data: the convergence and
// sensitivity tables when the folder has none, the field series, the warnings and the summary. Pure: rows in,
// ReportData out; the folder reading lives in analysis/read-tables.ts.
import { describeGroup } from '../analysis/grid-convergence.js';
import { type ConvergenceRow } from '../../schemas/analysis-rows.js';
import {
  computeConvergence,
  computeSensitivity,
  fieldsByJob,
  finestLevelRuns,
  frequencyOf,
  num,
  paramColumnsOf,
  type AnalysisOptions,
  type Notes,
} from '../analysis/compute-tables.js';
import type { FolderTables } from '../analysis/read-tables.js';
import type { Sweep } from '../../schemas/sweep.js';
import type { FieldSeries, ReportData, ReportWarning, VariedInput } from './data.js';

const RUN_TABLE_COLUMNS = ['job_id', 'status', 'cell_size_m', 'steps', 'cells_total', 'wall_time_s', 'warnings', 'error'];

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
export function assembleReportData(tables: FolderTables, options: AnalysisOptions): ReportData {
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
