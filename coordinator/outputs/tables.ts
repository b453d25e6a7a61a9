// Merges a sweep's ledger into its output folder: `runs.parquet` (one row per job), `fields/` (one row per job and
// receiver, Hive-partitioned as `part=<n>` by blocks of jobs), a copy of the sweep file, then the analysis tables
// (`convergence.parquet`, and `sensitivity.parquet` on request) computed from them out of core, at any size
// (report.html is the command layer's, written after this from the same tables). Everything is written
// under a staging folder and renamed into place at the end, so a crash never leaves half a table; rows stream
// from the ledger through a disk-backed DuckDB table, so memory is bounded, not proportional to the sweep.
import { existsSync, mkdirSync, readdirSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Sweep } from '../../schemas/sweep.js';
import type { JobResult } from '../../schemas/result.js';
import { columnNameFor, FieldRowSchema, RunFactsSchema, RunKeySchema, type FieldRow, type LedgerJob, type RunFacts } from '../../schemas/table-rows.js';
import type { Ledger } from '../ledger/ledger.js';
import { columnsFromRowSchema } from './columns.js';
import { sweepDigest, writeOutputState } from './state.js';
import { SOLVER_VERSION } from '../../solver/version.js';
import { ANALYSIS_FILES, writeAnalysisTables } from './analysis-tables.js';
import { DuckTableStore, firstLine, ParquetTableWriter, type CellValue, type ColumnSpec } from './parquet.js';
import { UserError } from '../../schemas/errors.js';
import { ExitCode } from '../../schemas/exit-codes.js';
import { FieldSegments } from './fields.js';
import { expandSweep, type ExpandedJob } from '../sweep/expand.js';

/** What runs.parquet takes from a result. */
type RunResultSummary = Pick<JobResult, 'grid' | 'wall_time_s' | 'solver_version' | 'warnings'>;

export interface OutputOptions {
  /** The sweep's jobs if already expanded (saves expanding again). */
  readonly jobs?: readonly ExpandedJob[];
  /** Largest number of rows in one `fields/part=<n>/` file; sets how many jobs share a partition. @defaultValue 250000 */
  readonly fieldRowsPerFile?: number;
  /** Rows per Parquet row group (the memory bound). @defaultValue 8192 */
  readonly rowGroupRows?: number;
  /** Also write convergence.parquet. @defaultValue true */
  readonly analysis?: boolean;
  /** Also write sensitivity.parquet (needs `analysis`). @defaultValue true */
  readonly sensitivityTable?: boolean;
  /** Called as each stage ends (runs, fields, analysis), for the benchmarks. */
  readonly onStage?: (name: 'runs' | 'fields' | 'analysis') => void;
}

export interface OutputSummary {
  runs: number;
  fieldRows: number;
  /** Jobs per `part=<n>` partition of `fields/`. */
  jobsPerPart: number;
  parts: number;
  /** Rows of convergence.parquet and sensitivity.parquet (null when `analysis` is off). */
  convergenceRows: number | null;
  sensitivityRows: number | null;
}

/** File names inside the output folder. */
export const OUTPUT_FILES = { runs: 'runs.parquet', fields: 'fields', sweep: 'sweep', report: 'report.html' } as const;
const STAGING_PREFIX = '.outputs-staging-';
/** Default rows per fields file (a Loamwave choice: a few MB of ZSTD Parquet per file, a few row groups each). */
const FIELD_ROWS_PER_FILE = 250_000;

/** The column of one varied parameter: DOUBLE when every value given is a number, else UTF8. */
export function paramColumns(jobs: readonly ExpandedJob[], sweep: Sweep): Array<ColumnSpec & { path: string }> {
  return Object.keys(sweep.vary).map((path) => ({
    path,
    name: columnNameFor(path),
    // A job may lack a parameter its case ignores (the radius of a flat case): such a cell is null.
    type: jobs.every((j) => j.params[path] === undefined || typeof j.params[path] === 'number') ? 'DOUBLE' : 'UTF8',
  }));
}

/** Columns of runs.parquet, in order. */
export function runColumns(params: readonly ColumnSpec[]): ColumnSpec[] {
  return [...plain(RunKeySchema), ...params.map(({ name, type }) => ({ name, type })), ...plain(RunFactsSchema)];
}

/** The columns of a row schema, without the nullability flag (every Parquet column we write is optional). */
function plain(schema: Parameters<typeof columnsFromRowSchema>[0]): ColumnSpec[] {
  return columnsFromRowSchema(schema).map(({ name, type }) => ({ name, type }));
}

/** Columns of the fields/ files, in order (the Hive key `part` lives in the folder name, not in the files). */
export function fieldColumns(params: readonly ColumnSpec[]): ColumnSpec[] {
  return [...plain(FieldRowSchema), ...params.map(({ name, type }) => ({ name, type }))];
}

/** Jobs per `part=<n>` partition so that no file holds more than `rowsPerFile` rows. */
export function jobsPerPartFor(jobs: readonly ExpandedJob[], rowsPerFile: number): number {
  const receivers = jobs.reduce((m, j) => Math.max(m, j.case.receivers.ranges_m.length), 1);
  return Math.max(1, Math.floor(rowsPerFile / receivers));
}

function paramCells(job: ExpandedJob, params: ReadonlyArray<ColumnSpec & { path: string }>): Record<string, CellValue> {
  const out: Record<string, CellValue> = {};
  for (const p of params) {
    const v = job.params[p.path];
    out[p.name] = p.type === 'UTF8' && v !== undefined ? String(v) : v;
  }
  return out;
}

function runRow(job: ExpandedJob, row: LedgerJob | undefined, result: RunResultSummary | undefined, params: ReadonlyArray<ColumnSpec & { path: string }>): Record<string, CellValue> {
  const g = result?.grid;
  // Typed as the schema's row, so a column added to RunFactsSchema must be filled here (null when unknown).
  const facts: { [K in keyof RunFacts]: RunFacts[K] | undefined } = {
    design_role: job.design?.role,
    design_sample: job.design?.sample,
    cell_size_m: g?.cell_size_m,
    time_step_s: g?.time_step_s,
    steps: g?.steps,
    steps_per_period: g?.steps_per_period,
    cells_total: g?.cells_total,
    memory_bytes: g?.memory_bytes,
    cell_updates: g?.cell_updates,
    settled: g?.settled,
    settling_change: g?.settling_change,
    wall_time_s: result?.wall_time_s,
    solver_version: result?.solver_version,
    warnings: result ? result.warnings.join('; ') : undefined,
    error: row?.error,
    attempts: row?.attempts,
    queued_at_ms: row?.queued_at_ms,
    started_at_ms: row?.started_at_ms,
    finished_at_ms: row?.finished_at_ms,
  };
  return { job_id: job.job_id, index: job.index, status: row?.status ?? 'pending', ...paramCells(job, params), ...facts };
}

/** The sweep copy's file name: `sweep.json` when the text is JSON, else `sweep.yaml`. */
export function sweepCopyName(sweepText: string): string {
  try {
    JSON.parse(sweepText);
    return `${OUTPUT_FILES.sweep}.json`;
  } catch {
    return `${OUTPUT_FILES.sweep}.yaml`;
  }
}

/**
 * Write runs.parquet, fields/ and the sweep copy for the jobs of `sweep` (jobs of other sweeps that share the
 * ledger are left out), then convergence.parquet (and sensitivity.parquet) from them. Each table is complete or
 * absent: written under a staging folder, then renamed; the analysis files and report.html of an earlier write are
 * removed with the old tables, so no file describing other runs is left beside the new ones.
 */
export async function writeOutputs(
  ledger: Ledger,
  sweep: Sweep,
  sweepText: string,
  outDir: string,
  options: OutputOptions = {},
): Promise<OutputSummary> {
  const jobs = options.jobs ?? expandSweep(sweep, sweep.name);
  // The revision these tables describe, read before the first row: a result committed meanwhile makes it stale.
  // The old state file stays until the new one replaces it: it names an older revision, so until then the folder
  // never passes for current, whatever this write leaves behind.
  const revision = ledger.revision();
  const params = paramColumns(jobs, sweep);
  const rowGroupRows = options.rowGroupRows ?? 8192;
  mkdirSync(outDir, { recursive: true });
  removeStaleStaging(outDir);
  const staging = join(outDir, `${STAGING_PREFIX}${process.pid}-${Date.now().toString(36)}`);
  mkdirSync(staging);
  const stage = (name: 'runs' | 'fields' | 'analysis') => options.onStage?.(name);
  try {
    // runs.parquet: every job of the sweep, in expansion order, with whatever the ledger knows of it.
    const runs = await ParquetTableWriter.open(join(staging, OUTPUT_FILES.runs), runColumns(params), { rowGroupRows });
    for (const job of jobs) {
      const row = ledger.get(job.job_id);
      const result = row?.status === 'done' ? ledger.resultSummary(job.job_id) : undefined;
      await runs.append(runRow(job, row, result, params));
    }
    await runs.close();
    stage('runs');

    // fields/part=<n>/: receivers of done jobs, from the segments written while the jobs ran, after the jobs no
    // segment holds yet are written as segments too (the ledger's result texts, never parsed here, through a
    // DuckDB table); memory is bounded by DuckDB's limit and a segment's size.
    const byId = new Map(jobs.map((j) => [j.job_id, j]));
    const jobsPerPart = jobsPerPartFor(jobs, options.fieldRowsPerFile ?? FIELD_ROWS_PER_FILE);
    const fieldsDir = join(staging, OUTPUT_FILES.fields);
    mkdirSync(fieldsDir);
    const store = await DuckTableStore.open(staging);
    let fieldRows = 0;
    let parts: number[];
    try {
      const segments = new FieldSegments(outDir, sweepText, byId, params, ledger.id());
      const resultRows = ledger.resultRows();
      const kept = segments.scan(resultRows);
      const covered = new Set(kept.flatMap((s) => s.jobs.map(([id]) => id)));
      const missing = jobs.filter((j) => resultRows.has(j.job_id) && !covered.has(j.job_id)).map((j) => j.job_id);
      const added = missing.length > 0 ? await segments.write(store, ledger.resultTextsOf(missing)) : [];
      const written = await segments.assemble(store, [...kept, ...added], jobsPerPart, fieldsDir);
      fieldRows = written.rows;
      parts = written.parts;
    } finally {
      store.close();
    }

    stage('fields');
    writeFileSync(join(staging, sweepCopyName(sweepText)), sweepText);
    // The analysis files (and a sweep copy of the other format) of an earlier write describe other runs: they
    // leave with the old tables.
    const otherCopy = sweepCopyName(sweepText).endsWith('.json') ? `${OUTPUT_FILES.sweep}.yaml` : `${OUTPUT_FILES.sweep}.json`;
    publish(staging, outDir, [OUTPUT_FILES.runs, sweepCopyName(sweepText)], OUTPUT_FILES.fields, [
      ...Object.values(ANALYSIS_FILES),
      OUTPUT_FILES.report,
      otherCopy,
    ]);
    const summary: OutputSummary = {
      runs: jobs.length,
      fieldRows,
      jobsPerPart,
      parts: parts.length,
      convergenceRows: null,
      sensitivityRows: null,
    };
    const recorded = (done: OutputSummary): OutputSummary => {
      writeOutputState(outDir, { ledger_revision: revision, sweep_sha256: sweepDigest(sweepText), solver_version: SOLVER_VERSION, report_revision: null });
      return done;
    };
    if (!(options.analysis ?? true)) return recorded(summary);
    // Second stage, from the tables just published: a failure here leaves runs.parquet and fields/ in place.
    const analysisStore = await DuckTableStore.open(staging);
    let analysis: Awaited<ReturnType<typeof writeAnalysisTables>>;
    try {
      analysis = await writeAnalysisTables(outDir, analysisStore, staging, { sensitivity: options.sensitivityTable ?? true });
    } finally {
      analysisStore.close();
    }
    stage('analysis');
    summary.convergenceRows = analysis.convergence;
    summary.sensitivityRows = analysis.sensitivity;
    return recorded(summary);
  } catch (e) {
    throw diskFull(e, outDir) ?? e;
  } finally {
    rmSync(staging, { recursive: true, force: true });
  }
}

/**
 * A write that failed for want of space (ENOSPC, a quota, DuckDB's "No space left on device") as one line: the
 * tables in place are the previous ones (every file is renamed in only once complete), and the ledger keeps every
 * result, so freeing space and rerunning is all it takes.
 */
function diskFull(e: unknown, outDir: string): UserError | undefined {
  const code = (e as NodeJS.ErrnoException)?.code;
  const line = firstLine(e);
  if (code !== 'ENOSPC' && code !== 'EDQUOT' && !/no space left|disk is full|ENOSPC|quota exceeded/i.test(line)) return undefined;
  return new UserError(
    `${outDir}: outputs not written, the disk is full (${line}); the previous tables are unchanged and the ledger keeps every result: free some space and run again`,
    'loamwave.outputs.disk-full',
    ExitCode.internalError,
  );
}

/**
 * Rename finished files over the old ones (atomic per file), move `stale` files aside, then swap the folder in.
 * A folder cannot be renamed over a non-empty one: the old one moves aside first (a crash between the two renames
 * leaves no fields/ at all, never a mixture) and is removed with the staging folder.
 */
function publish(staging: string, outDir: string, files: readonly string[], folder: string, stale: readonly string[]): void {
  for (const f of stale) if (existsSync(join(outDir, f))) renameSync(join(outDir, f), join(staging, `${f}.old`));
  for (const f of files) renameSync(join(staging, f), join(outDir, f));
  const target = join(outDir, folder);
  if (existsSync(target)) renameSync(target, join(staging, `${folder}.old`));
  renameSync(join(staging, folder), target);
}

/**
 * Staging folders left by a crashed writer hold nothing anyone reads: remove them, the scratch folders of live
 * segment writers (`.loamwave-work-<pid>`) whose process is gone, and old report scratch folders.
 */
function removeStaleStaging(outDir: string): void {
  for (const name of readdirSync(outDir)) {
    if (name.startsWith(STAGING_PREFIX)) rmSync(join(outDir, name), { recursive: true, force: true });
    // the report's scratch folder (DuckDB's spill files), left by a report that crashed an hour or more ago
    if (name.startsWith('.loamwave-report-') && statSync(join(outDir, name)).mtimeMs < Date.now() - 3600_000) rmSync(join(outDir, name), { recursive: true, force: true });
    const work = /^\.loamwave-work-(\d+)$/.exec(name);
    if (work && Number(work[1]) !== process.pid && !processAlive(Number(work[1]))) rmSync(join(outDir, name), { recursive: true, force: true });
  }
}

function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}
