// Turns the tables of an output folder (plain rows, as read) into the report's data: the convergence and
// sensitivity tables when the folder has none, the spread of the fields, the warnings and the summary, each bounded
// in size whatever the sweep's (the Parquet files hold every row). Pure: rows in, ReportData out; the folder
// reading lives in analysis/read-tables.ts.
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
import { fieldRecordsOf, isFieldColumns, jobColumnsOf, type FieldRows, type FolderTables } from '../analysis/read-tables.js';
import { convergenceDigestOf, countBy, type ConvergenceDigest } from '../analysis/convergence-digest.js';
import type { Sweep } from '../../schemas/sweep.js';
import {
  MAX_CONVERGENCE_LINES,
  MAX_SENSITIVITY_CHARTS,
  MAX_TABLE_ROWS,
  type CurvatureRow,
  type ReportData,
  type ReportWarning,
  type VariedInput,
} from './data.js';
import type { SensitivityRow } from '../../schemas/analysis-rows.js';
import type { Cell } from '../analysis/read-tables.js';
import { evenIndices, fieldSpread, MAX_DRAWN_RUNS, MAX_RANGES_PER_LINE, pointColumnsOf, type FieldSummary, type PointColumns, type SpreadInput } from '../analysis/field-spread.js';
import { columnNameFor } from '../../schemas/table-rows.js';
import { unwrapNearDeg } from '../../solver/phase.js';

/** Inputs given range plots of their own (two each: field strength and residual phase); the rest are in the tables. */
export const MAX_PLOTTED_INPUTS = 6;

/** Most flat-against-sphere pairs (radius and group) whose rows the report holds and draws, chosen evenly. */
export const MAX_CURVATURE_LINES = MAX_DRAWN_RUNS;

const RUN_TABLE_COLUMNS = ['job_id', 'status', 'cell_size_m', 'steps', 'cells_total', 'wall_time_s', 'warnings', 'error'];

function warningsOf(tables: Pick<FolderTables<FieldRows>, 'runs'>, unconverged: readonly ConvergenceRow[]): ReportWarning[] {
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
  for (const r of unconverged) {
    if (r.verdict === 'converged') continue;
    const group = r.group === '{}' ? '' : ` (${describeGroup(r.group)})`;
    out.push({ kind: 'unconverged_mesh', job_id: null, message: `${r.output} at ${r.range_m / 1000} km${group}: ${r.behaviour}; ${r.advice}` });
  }
  return out;
}

function variedOf(tables: Pick<FolderTables<FieldRows>, 'runs' | 'sweep'>): VariedInput[] {
  return paramColumnsOf(tables.sweep).map(({ path, column }) => {
    const values = tables.runs.map((r) => r[column]).filter((v) => v !== null && v !== undefined);
    const numbers = values.filter((v): v is number => typeof v === 'number');
    const numeric = numbers.length === values.length && numbers.length > 0;
    return {
      path,
      column,
      // A loop, not Math.min(...numbers): spreading a very large sweep's values would overflow the call stack.
      min: numeric ? numbers.reduce((a, b) => Math.min(a, b)) : null,
      max: numeric ? numbers.reduce((a, b) => Math.max(a, b)) : null,
      distinct: new Set(values.map((v) => String(v))).size,
    };
  });
}

/** The earth radius the solver uses when a spherical case gives none (the mean radius; schemas/case.ts). */
const DEFAULT_EARTH_RADIUS_M = 6_371_000;

/**
 * Pairs of otherwise-equal runs, one over a flat geometry and one over the sphere, and the sphere's field minus the
 * flat one at each receiver both have. Needs `geometry` among the varied inputs; the radius of a spherical run is its
 * varied `earth.radius_m`, else the base case's, else the mean radius. Returns every row, sorted by group, radius and
 * range.
 */
export function curvatureOf(tables: Pick<FolderTables<FieldRows>, 'sweep'>, series: readonly SpreadInput[]): CurvatureRow[] {
  const sweep = tables.sweep;
  if (!('geometry' in sweep.vary)) return [];
  const geometryColumn = columnNameFor('geometry');
  const radiusColumn = columnNameFor('earth.radius_m');
  const baseRadius = num((sweep.base as { earth?: { radius_m?: Cell } }).earth?.radius_m as Cell) ?? DEFAULT_EARTH_RADIUS_M;
  const others = paramColumnsOf(sweep).filter((p) => p.column !== geometryColumn && p.column !== radiusColumn);
  const groupOf = (s: SpreadInput) => others.map((p) => `${p.path}=${String(s.params[p.column] ?? '')}`).join(', ');
  // The flat run of each group: its columns and the row of each range (the last row at a range, when several).
  const flat = new Map<string, { cols: PointColumns; at: Map<number, number> }>();
  for (const s of series) {
    if (s.params[geometryColumn] !== 'spherical' && !flat.has(groupOf(s))) {
      const cols = pointColumnsOf(s.points);
      const at = new Map<number, number>();
      for (let i = 0; i < cols.range_m.length; i++) at.set(cols.range_m[i], i);
      flat.set(groupOf(s), { cols, at });
    }
  }
  const rows: CurvatureRow[] = [];
  for (const s of series) {
    if (s.params[geometryColumn] !== 'spherical') continue;
    const f = flat.get(groupOf(s));
    if (!f) continue;
    const radius = num(s.params[radiusColumn]) ?? baseRadius;
    const p = pointColumnsOf(s.points);
    for (let i = 0; i < p.range_m.length; i++) {
      const j = f.at.get(p.range_m[i]);
      if (j === undefined) continue;
      const qDb = f.cols.ez_db_uv_per_m[j];
      rows.push({
        group: groupOf(s),
        earth_radius_m: radius,
        range_m: p.range_m[i],
        flat_db: qDb,
        sphere_db: p.ez_db_uv_per_m[i],
        difference_db: p.ez_db_uv_per_m[i] - qDb,
        phase_difference_deg: unwrapNearDeg(p.ez_phase_deg[i] - f.cols.ez_phase_deg[j], 0),
      });
    }
  }
  return rows.sort((a, b) => (a.group < b.group ? -1 : a.group > b.group ? 1 : a.earth_radius_m - b.earth_radius_m || a.range_m - b.range_m));
}

/**
 * The curvature rows the report holds: at most MAX_CURVATURE_LINES pairs (radius and group, chosen evenly in sorted
 * order) of at most MAX_RANGES_PER_LINE ranges each (thinned evenly); with the totals when some were left out.
 */
function boundedCurvature(rows: readonly CurvatureRow[]): { rows: CurvatureRow[]; total: { rows: number; lines: number } | null } {
  const lines: CurvatureRow[][] = [];
  for (const r of rows) {
    const last = lines[lines.length - 1];
    if (last && last[0].group === r.group && last[0].earth_radius_m === r.earth_radius_m) last.push(r);
    else lines.push([r]);
  }
  const kept = evenIndices(lines.length, MAX_CURVATURE_LINES).flatMap((i) =>
    evenIndices(lines[i].length, MAX_RANGES_PER_LINE).map((k) => lines[i][k]),
  );
  return { rows: kept, total: kept.length < rows.length ? { rows: rows.length, lines: lines.length } : null };
}

/**
 * The convergence rows the report holds: all of them up to MAX_TABLE_ROWS; beyond, the table's first rows, the
 * MAX_CONVERGENCE_LINES rows per output the plots draw (evenly chosen) and the counts the summary states.
 */
function boundedConvergence(d: ConvergenceDigest): Pick<ReportData, 'convergence' | 'convergence_summary' | 'convergence_plotted'> {
  if (d.total <= MAX_TABLE_ROWS) return { convergence: d.head, convergence_summary: null, convergence_plotted: null };
  return {
    convergence: d.head,
    convergence_summary: { rows: d.total, verdicts: d.verdicts, rows_per_output: d.rowsPerOutput },
    convergence_plotted: d.plotted,
  };
}

/** The digest limits the report uses. */
export const DIGEST_LIMITS = { tableRows: MAX_TABLE_ROWS, linesPerOutput: MAX_CONVERGENCE_LINES } as const;

/** The sensitivity rows the report holds: the table's first MAX_TABLE_ROWS and every row of the outputs charted. */
function boundedSensitivity(rows: readonly SensitivityRow[]): Pick<ReportData, 'sensitivity' | 'sensitivity_total'> {
  // sensitivityPlots charts the first outputs in row order, at most MAX_SENSITIVITY_CHARTS charts, so at most as many outputs.
  const charted = new Set<string>();
  for (const r of rows) {
    if (charted.size >= MAX_SENSITIVITY_CHARTS) break;
    charted.add(r.output);
  }
  const kept = rows.filter((r, i) => i < MAX_TABLE_ROWS || charted.has(r.output));
  return { sensitivity: kept, sensitivity_total: kept.length < rows.length ? rows.length : null };
}

/** At most MAX_TABLE_ROWS warnings of each kind, with the counts when some kind had more. */
function boundedWarnings(warnings: readonly ReportWarning[], unlisted: Readonly<Record<string, number>> = {}): Pick<ReportData, 'warnings' | 'warning_counts'> {
  // `unlisted`: warnings of a kind counted but not given (the convergence rows beyond those read)
  const counts = countBy(warnings, (w) => w.kind);
  let total = warnings.length;
  for (const [kind, n] of Object.entries(unlisted)) {
    if (n === 0) continue;
    counts[kind] = (counts[kind] ?? 0) + n;
    total += n;
  }
  const seen: Record<string, number> = {};
  const kept = warnings.filter((w) => (seen[w.kind] = (seen[w.kind] ?? 0) + 1) <= MAX_TABLE_ROWS);
  return { warnings: kept, warning_counts: kept.length < total ? counts : null };
}

function designText(sweep: Sweep): string {
  const d = sweep.design;
  if (d.kind === 'full_factorial') return 'full factorial';
  const what = d.kind === 'saltelli' ? `Saltelli, N = ${d.samples} base samples` : `Latin hypercube, ${d.samples} samples`;
  return `${what}, seed ${d.seed}`;
}

/** The report's data from an output folder's tables, all held in memory. */
export function assembleReportData(tables: FolderTables<FieldRows>, options: AnalysisOptions): ReportData {
  const sweep = tables.sweep;
  const notes: Notes = { warnings: [] };
  // The in-memory analysis takes the field rows as records: made only when the folder lacks one of its tables.
  let asRecords: FolderTables | null = null;
  const recordTables = (): FolderTables => (asRecords ??= { ...tables, fields: fieldRecordsOf(tables.fields) });
  // (No resolution axis: no convergence study, and no records needed for it.)
  const convergence = tables.convergence ?? (sweep.resolution_axis === undefined ? [] : computeConvergence(recordTables(), options));
  const sensitivity = tables.sensitivity ?? computeSensitivity(recordTables(), notes);
  asRecords = null;
  const byJob: Map<string, SpreadInput['points']> = isFieldColumns(tables.fields) ? jobColumnsOf(tables.fields) : fieldsByJob(tables.fields);
  // Every done run's fields, for the spread and the curvature pairs; the report keeps only their bounded summaries.
  const series: SpreadInput[] = spreadRunsOf(tables, new Set(byJob.keys())).map((r) => ({ ...r, points: byJob.get(r.job_id)! }));
  return assembleFromParts(
    tables,
    {
      convergence: convergenceDigestOf(convergence, DIGEST_LIMITS),
      sensitivity,
      fields: fieldSpread(series, reportInputs(tables)),
      curvature: curvatureOf(tables, series),
    },
    notes,
    options,
  );
}

/** The done runs that have field rows, in table order, as the spread and the curvature pairs take them. */
export function spreadRunsOf(tables: Pick<FolderTables<FieldRows>, 'runs' | 'sweep'>, withFields: ReadonlySet<string>): Array<Omit<SpreadInput, 'points'>> {
  const params = paramColumnsOf(tables.sweep);
  return tables.runs.flatMap((run) => {
    const id = String(run.job_id);
    if (run.status !== 'done' || !withFields.has(id)) return [];
    return [{ job_id: id, params: Object.fromEntries(params.map((p) => [p.column, run[p.column] ?? null])), frequency_hz: frequencyOf(run, tables.sweep) }];
  });
}

/** The inputs given range plots of their own. */
export function reportInputs(tables: Pick<FolderTables<FieldRows>, 'runs' | 'sweep'>): VariedInput[] {
  return variedOf(tables).slice(0, MAX_PLOTTED_INPUTS);
}

/** Whether the curvature pairs need each run's receivers (only when the geometry is varied). */
export function needsCurvature(sweep: Sweep): boolean {
  return 'geometry' in sweep.vary;
}

/** What the report is made of besides the runs table: each part already bounded, or about to be. */
export interface ReportParts {
  readonly convergence: ConvergenceDigest;
  readonly sensitivity: readonly SensitivityRow[];
  readonly fields: FieldSummary;
  /** Every flat-against-sphere row (curvatureOf); the report keeps a bounded share. */
  readonly curvature: readonly CurvatureRow[];
}

/** The report's data from the runs table and the parts (read out of core, or computed in memory). */
export function assembleFromParts(tables: Pick<FolderTables<FieldRows>, 'runs' | 'sweep' | 'sweepFileName' | 'runColumns' | 'sensitivity'>, parts: ReportParts, notes: Notes, options: AnalysisOptions): ReportData {
  const sweep = tables.sweep;
  // A sensitivity table read from the folder was made the same way: say so there too.
  if (tables.sensitivity !== null) notes.sensitivityNote = finestLevelRuns({ ...tables, fields: [], convergence: null }, tables.runs.filter((r) => r.status === 'done')).note;
  const params = paramColumnsOf(sweep);
  const varied = variedOf(tables);
  const curvature = boundedCurvature(parts.curvature);
  const count = (status: string) => tables.runs.filter((r) => r.status === status).length;
  const columns = [
    ...RUN_TABLE_COLUMNS.slice(0, 2),
    ...params.map((p) => p.column),
    ...RUN_TABLE_COLUMNS.slice(2),
  ].filter((c) => tables.runColumns.includes(c));
  const digest = parts.convergence;
  return {
    title: `Loamwave report: ${sweep.name}`,
    generated_by: options.generatedBy,
    sweep: {
      name: sweep.name,
      description: sweep.description ?? null,
      file_name: tables.sweepFileName,
      design: designText(sweep),
      resolution_axis: sweep.resolution_axis ?? null,
      varied,
      jobs: {
        total: tables.runs.length,
        done: count('done'),
        failed: count('failed'),
        pending: tables.runs.length - count('done') - count('failed'),
      },
      wall_time_s_total: tables.runs.reduce((s, r) => s + (num(r.wall_time_s) ?? 0), 0),
    },
    fields: parts.fields,
    ...boundedConvergence(digest),
    ...boundedSensitivity(parts.sensitivity),
    sensitivity_note: notes.sensitivityNote ?? null,
    curvature: curvature.rows,
    curvature_total: curvature.total,
    runs: {
      columns,
      rows: tables.runs.slice(0, MAX_TABLE_ROWS).map((r) => columns.map((c) => (c === 'job_id' ? String(r[c]).slice(0, 12) : (r[c] ?? null)))),
      total: tables.runs.length,
    },
    ...boundedWarnings([...warningsOf(tables, digest.unconverged), ...notes.warnings], { unconverged_mesh: digest.unconvergedTotal - digest.unconverged.length }),
  };
}
