// Reads a sweep's output folder for the analysis and the report: the sweep copy, runs.parquet, the Hive-partitioned fields/ table
// and, when present, convergence.parquet and sensitivity.parquet, through DuckDB. Missing pieces the user can
// supply become one-line UserErrors naming the file and what to do.
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { DuckDBInstance, type DuckDBConnection, type DuckDBResult } from '@duckdb/node-api';
import { z } from 'zod';
import { UserError } from '../../schemas/errors.js';
import { ConvergenceRowSchema, type ConvergenceRow } from '../../schemas/analysis-rows.js';
import { SensitivityRowSchema, type SensitivityRow } from '../../schemas/analysis-rows.js';
import { loadSweep } from '../sweep/file.js';
import type { Sweep } from '../../schemas/sweep.js';

const CODE = 'loamwave.report.input';

/** One cell of a table as read: DuckDB's BIGINTs already made numbers. */
export const CellSchema = z.union([z.number(), z.string(), z.boolean(), z.null()]);
export type Cell = z.infer<typeof CellSchema>;

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

/**
 * The rows of fields/ as compact columns, sorted by job id, range and height: row k is job `jobIds[job[k]]` at
 * `range_m[k]`, `height_m[k]`. The rows of job j are `start[j]` up to `start[j + 1]` (`start` has one entry more
 * than `jobIds`). About 36 bytes a row, where an object a row takes several times that.
 */
export interface FieldColumns {
  readonly length: number;
  readonly jobIds: readonly string[];
  readonly start: Int32Array;
  readonly job: Int32Array;
  readonly range_m: Float64Array;
  readonly height_m: Float64Array;
  readonly ez_db_uv_per_m: Float64Array;
  readonly ez_phase_deg: Float64Array;
}

/** The field rows in either form: objects (tests, made-up tables) or the columns `readReportFolder` reads. */
export type FieldRows = readonly FieldRecord[] | FieldColumns;

export function isFieldColumns(rows: FieldRows): rows is FieldColumns {
  return !Array.isArray(rows);
}

/** One job's rows as column views (no copy), sorted by range then height. */
export interface JobColumns {
  readonly range_m: Float64Array;
  readonly height_m: Float64Array;
  readonly ez_db_uv_per_m: Float64Array;
  readonly ez_phase_deg: Float64Array;
}

/** The rows of every job, keyed by job id, as views into the columns. */
export function jobColumnsOf(cols: FieldColumns): Map<string, JobColumns> {
  const out = new Map<string, JobColumns>();
  cols.jobIds.forEach((id, j) => {
    const a = cols.start[j];
    const b = cols.start[j + 1];
    if (b > a) {
      out.set(id, {
        range_m: cols.range_m.subarray(a, b),
        height_m: cols.height_m.subarray(a, b),
        ez_db_uv_per_m: cols.ez_db_uv_per_m.subarray(a, b),
        ez_phase_deg: cols.ez_phase_deg.subarray(a, b),
      });
    }
  });
  return out;
}

/** Columns of field records (sorted by job id, range and height, as the folder reader sorts them). */
export function fieldColumnsFromRecords(records: readonly FieldRecord[]): FieldColumns {
  const sorted = [...records].sort((a, b) => (a.job_id < b.job_id ? -1 : a.job_id > b.job_id ? 1 : a.range_m - b.range_m || a.height_m - b.height_m));
  const b = new FieldColumnsBuilder(sorted.length);
  for (const r of sorted) b.push(r.job_id, r.range_m, r.height_m, r.ez_db_uv_per_m, r.ez_phase_deg);
  return b.finish();
}

/** The columns as records again (for the analysis that takes records: convergence and sensitivity in memory). */
export function fieldRecordsOf(rows: FieldRows): readonly FieldRecord[] {
  if (!isFieldColumns(rows)) return rows;
  const out: FieldRecord[] = [];
  for (let k = 0; k < rows.length; k++) {
    out.push({
      job_id: rows.jobIds[rows.job[k]],
      range_m: rows.range_m[k],
      height_m: rows.height_m[k],
      ez_db_uv_per_m: rows.ez_db_uv_per_m[k],
      ez_phase_deg: rows.ez_phase_deg[k],
    });
  }
  return out;
}

/** Appends rows sorted by job id into typed columns sized up front (or grown by doubling). */
class FieldColumnsBuilder {
  private n = 0;
  private jobIds: string[] = [];
  private starts: number[] = [];
  private job: Int32Array;
  private range: Float64Array;
  private height: Float64Array;
  private db: Float64Array;
  private phase: Float64Array;

  constructor(capacity: number) {
    const c = Math.max(1, capacity);
    this.job = new Int32Array(c);
    this.range = new Float64Array(c);
    this.height = new Float64Array(c);
    this.db = new Float64Array(c);
    this.phase = new Float64Array(c);
  }

  private grow(): void {
    const c = this.job.length * 2;
    const more = <T extends Int32Array | Float64Array>(a: T, make: (n: number) => T): T => {
      const b = make(c);
      b.set(a);
      return b;
    };
    this.job = more(this.job, (n) => new Int32Array(n));
    this.range = more(this.range, (n) => new Float64Array(n));
    this.height = more(this.height, (n) => new Float64Array(n));
    this.db = more(this.db, (n) => new Float64Array(n));
    this.phase = more(this.phase, (n) => new Float64Array(n));
  }

  push(jobId: string, range: number, height: number, db: number, phase: number): void {
    if (this.n === this.job.length) this.grow();
    const last = this.jobIds.length - 1;
    if (last < 0 || this.jobIds[last] !== jobId) {
      this.jobIds.push(jobId);
      this.starts.push(this.n);
    }
    const k = this.n++;
    this.job[k] = this.jobIds.length - 1;
    this.range[k] = range;
    this.height[k] = height;
    this.db[k] = db;
    this.phase[k] = phase;
  }

  finish(): FieldColumns {
    const n = this.n;
    // Exactly n rows: a copy only when the capacity was a guess that came out larger.
    const fit = <T extends Int32Array | Float64Array>(a: T): T => (a.length === n ? a : (a.slice(0, n) as T));
    return {
      length: n,
      jobIds: this.jobIds,
      start: Int32Array.from([...this.starts, n]),
      job: fit(this.job),
      range_m: fit(this.range),
      height_m: fit(this.height),
      ez_db_uv_per_m: fit(this.db),
      ez_phase_deg: fit(this.phase),
    };
  }
}

/** No field rows. */
export const NO_FIELD_COLUMNS: FieldColumns = new FieldColumnsBuilder(0).finish();

export interface FolderTables<F extends FieldRows = readonly FieldRecord[]> {
  sweep: Sweep;
  sweepFileName: string | null;
  runColumns: readonly string[];
  runs: readonly RunRecord[];
  /** The field rows: objects where made in memory, columns as `readReportFolder` reads them. */
  fields: F;
  /** convergence.parquet and sensitivity.parquet when the folder has them (null: compute here). */
  convergence: ConvergenceRow[] | null;
  sensitivity: SensitivityRow[] | null;
}


/** Names of the files the report reads (README, "Outputs"). */
export const REPORT_INPUTS = {
  runs: 'runs.parquet',
  fields: 'fields',
  convergence: 'convergence.parquet',
  sensitivity: 'sensitivity.parquet',
  sweepCopies: ['sweep.yaml', 'sweep.yml', 'sweep.json'],
} as const;

/** SQL string literal of a path (single quotes doubled). */
export function sqlPath(path: string): string {
  return `'${path.replace(/'/g, "''")}'`;
}

function plainCell(v: unknown): Cell {
  if (typeof v === 'bigint') return Number(v);
  if (v === undefined) return null;
  if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean' || v === null) return v;
  return String(v);
}

async function readRows(conn: DuckDBConnection, sql: string): Promise<{ columns: string[]; rows: Record<string, Cell>[] }> {
  const reader = await conn.runAndReadAll(sql);
  const columns = reader.columnNames();
  const rows = (reader.getRowObjectsJS() as Record<string, unknown>[]).map((r) =>
    Object.fromEntries(Object.entries(r).map(([k, v]) => [k, plainCell(v)])),
  );
  return { columns, rows };
}

/**
 * Run one query over one of the folder's files; a file the engine cannot read (corrupt, truncated, not Parquet)
 * becomes one line naming it and the fix, exit code 2, instead of the engine's multi-line message.
 */
export async function readFile(conn: DuckDBConnection, sql: string, file: string): Promise<{ columns: string[]; rows: Record<string, Cell>[] }> {
  try {
    return await readRows(conn, sql);
  } catch (e) {
    const first = String((e as Error).message ?? e).split('\n')[0].trim();
    throw new UserError(
      `${file}: cannot be read as a Parquet table (${first}); write the outputs again with loamwave run or loamwave collect (they are rebuilt from the ledger)`,
      'loamwave.outputs.unreadable',
    );
  }
}

export function parseTable<T>(schema: z.ZodType<T>, rows: Record<string, Cell>[], file: string): T[] {
  return rows.map((row, i) => {
    const r = schema.safeParse(row);
    if (!r.success) {
      const issue = r.error.issues[0];
      throw new UserError(
        `${file}: row ${i}: column ${issue.path.join('.') || '(row)'}: ${issue.message}; rewrite the table with this version of loamwave (or delete it to have the report compute it)`,
        CODE,
      );
    }
    return r.data;
  });
}

/**
 * Read every table of an output folder (with `fields: false`, all but the field rows, which may not fit in
 * memory: read those job by job with `openFieldReader`; with `convergence: false`, without convergence.parquet). Throws UserError when the folder is not a sweep's output
 * folder.
 */
export async function readReportFolder(dir: string, options: { fields: false; convergence?: boolean }): Promise<FolderTables>;
export async function readReportFolder(dir: string, options?: { fields?: true; convergence?: boolean }): Promise<FolderTables<FieldColumns>>;
export async function readReportFolder(dir: string, options: { fields?: boolean; convergence?: boolean } = {}): Promise<FolderTables<FieldRows>> {
  if (!existsSync(dir) || !statSync(dir).isDirectory()) {
    throw new UserError(`report: ${dir}: no such folder; give the output folder of a sweep (the one holding runs.parquet)`, CODE);
  }
  const runsPath = join(dir, REPORT_INPUTS.runs);
  if (!existsSync(runsPath)) {
    throw new UserError(`report: ${dir}: no ${REPORT_INPUTS.runs} here; write the outputs first (loamwave run or loamwave collect) or give the sweep's output folder`, CODE);
  }
  const sweepName = REPORT_INPUTS.sweepCopies.find((n) => existsSync(join(dir, n)));
  if (sweepName === undefined) {
    throw new UserError(`report: ${dir}: no sweep file copy (sweep.yaml or sweep.json) here; write the outputs again with loamwave run or loamwave collect`, CODE);
  }
  const { sweep } = loadSweep(join(dir, sweepName));
  const db = await DuckDBInstance.create(':memory:');
  const conn = await db.connect();
  try {
    const runs = await readFile(conn, `SELECT * FROM read_parquet(${sqlPath(runsPath)})`, runsPath);
    const fieldsDir = join(dir, REPORT_INPUTS.fields);
    const wantFields = options.fields ?? true;
    let fields: FieldRows = wantFields ? NO_FIELD_COLUMNS : [];
    if (existsSync(fieldsDir) && wantFields) {
      const glob = join(fieldsDir, '**', '*.parquet');
      try {
        fields = await readFieldColumns(conn, sqlPath(glob));
      } catch (e) {
        const first = String((e as Error).message ?? e).split('\n')[0].trim();
        throw new UserError(
          `${fieldsDir}: cannot be read as a Parquet table (${first}); write the outputs again with loamwave run or loamwave collect (they are rebuilt from the ledger)`,
          'loamwave.outputs.unreadable',
        );
      }
    }
    const optional = async <T>(file: string, schema: z.ZodType<T>): Promise<T[] | null> => {
      const path = join(dir, file);
      if (!existsSync(path)) return null;
      return parseTable(schema, (await readFile(conn, `SELECT * FROM read_parquet(${sqlPath(path)})`, path)).rows, file);
    };
    // `convergence: false`: not read (it may be large; readConvergenceDigest reads what the report needs)
    const convergence: ConvergenceRow[] | null = options.convergence === false ? null : await optional(REPORT_INPUTS.convergence, ConvergenceRowSchema);
    const sensitivity: SensitivityRow[] | null = await optional(REPORT_INPUTS.sensitivity, SensitivityRowSchema);
    return { sweep, sweepFileName: sweepName, runColumns: runs.columns, runs: runs.rows as RunRecord[], fields, convergence, sensitivity } as FolderTables<FieldRows>;
  } finally {
    conn.closeSync();
    db.closeSync();
  }
}

/**
 * The field rows of `glob` as columns, sorted by job id, range and height. Read chunk by chunk (DuckDB's streaming
 * result, in file order, no sort in the engine) into columns sized from a COUNT(*) first, so no row is ever held as
 * an object; then put in order here: a counting sort by job (stable) and a sort of each job's rows by range and
 * height, applied column by column (about 48 bytes a row at the peak).
 */
async function readFieldColumns(conn: DuckDBConnection, glob: string): Promise<FieldColumns> {
  const from = `read_parquet(${glob}, hive_partitioning = true)`;
  const n = Number((await conn.runAndReadAll(`SELECT COUNT(*) FROM ${from}`)).getColumns()[0][0]);
  let job = new Int32Array(n);
  let range = new Float64Array(n);
  let height = new Float64Array(n);
  let db = new Float64Array(n);
  let phase = new Float64Array(n);
  const seen = new Map<string, number>();
  const result = await conn.stream(`SELECT job_id, range_m, height_m, ez_db_uv_per_m, ez_phase_deg FROM ${from}`);
  let k = 0;
  for (;;) {
    const chunk = await result.fetchChunk();
    if (!chunk || chunk.rowCount === 0) break;
    const [id, r, h, d, p] = chunk.getColumns() as [unknown[], unknown[], unknown[], unknown[], unknown[]];
    if (k + id.length > n) throw new Error(`more field rows than COUNT(*) said (${n})`);
    for (let i = 0; i < id.length; i++, k++) {
      const key = String(id[i]);
      let j = seen.get(key);
      if (j === undefined) seen.set(key, (j = seen.size));
      job[k] = j;
      range[k] = Number(r[i]);
      height[k] = Number(h[i]);
      db[k] = Number(d[i]);
      phase[k] = Number(p[i]);
    }
  }
  if (k !== n) throw new Error(`fewer field rows than COUNT(*) said (${k} of ${n})`);
  // Jobs numbered in id order; rows counted per job, placed stably, then each job's rows sorted by range, height.
  const ids = [...seen.keys()].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  const renumber = new Int32Array(ids.length);
  ids.forEach((id, j) => (renumber[seen.get(id)!] = j));
  seen.clear();
  const start = new Int32Array(ids.length + 1);
  for (let i = 0; i < n; i++) start[renumber[job[i]] + 1]++;
  for (let j = 0; j < ids.length; j++) start[j + 1] += start[j];
  const perm = new Int32Array(n);
  const next = start.slice(0, ids.length);
  for (let i = 0; i < n; i++) perm[next[renumber[job[i]]]++] = i;
  for (let j = 0; j < ids.length; j++) {
    const seg = perm.subarray(start[j], start[j + 1]);
    let sorted = true;
    for (let q = 1; q < seg.length && sorted; q++) {
      const a = seg[q - 1];
      const b = seg[q];
      if (!(range[a] < range[b] || (range[a] === range[b] && height[a] <= height[b]))) sorted = false;
    }
    if (!sorted) {
      const order = Array.from(seg).sort((a, b) => range[a] - range[b] || height[a] - height[b] || a - b);
      seg.set(order);
    }
  }
  const gather = (col: Float64Array): Float64Array<ArrayBuffer> => {
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) out[i] = col[perm[i]];
    return out;
  };
  range = gather(range);
  height = gather(height);
  db = gather(db);
  phase = gather(phase);
  job = new Int32Array(n);
  for (let j = 0; j < ids.length; j++) job.fill(j, start[j], start[j + 1]);
  return { length: n, jobIds: ids, start, job, range_m: range, height_m: height, ez_db_uv_per_m: db, ez_phase_deg: phase };
}

/** One job's field rows, sorted by range then height (as `fieldsByJob` sorts them). */
export interface JobFields {
  job_id: string;
  points: FieldRecord[];
}

/** Reads the fields/ table of an output folder job by job, out of core (DuckDB sorts and spills to disk). */
export interface FieldReader {
  /** The ids of the jobs that have at least one field row. */
  jobsWithFields(): Promise<Set<string>>;
  /** The number of field rows of each job that has any. */
  rowsPerJob(): Promise<Map<string, number>>;
  /** Every receiver range of the table, once each. */
  distinctRanges(): Promise<number[]>;
  /** The field rows of these jobs, one job at a time in the order given (jobs without rows are left out). */
  byJob(jobIds: readonly string[]): AsyncGenerator<JobFields, void, undefined>;
  /**
   * Every job's field rows, one job at a time in the order the files hold them (partitions in number order, each
   * in job index order), streamed without sorting: the writer keeps each job's rows together. A job met twice
   * (files not written by loamwave) is one UserError line.
   */
  inFileOrder(): AsyncGenerator<JobFields, void, undefined>;
  close(): void;
}

/** The columns of each chunk of a streamed result; a chunk that cannot be read throws `unreadable(error)`. */
async function* chunksOf<T extends unknown[]>(result: DuckDBResult, unreadable: (e: unknown) => Error): AsyncGenerator<T, void, undefined> {
  for (;;) {
    let chunk;
    try {
      chunk = await result.fetchChunk();
    } catch (e) {
      throw unreadable(e);
    }
    if (!chunk || chunk.rowCount === 0) return;
    yield chunk.getColumns() as T;
  }
}

/** The fields/ files in partition number order (`part=2` before `part=10`), each folder's files by name. */
export function fieldFilesInOrder(fieldsDir: string): string[] {
  const parts = readdirSync(fieldsDir, { withFileTypes: true })
    .filter((d) => d.isDirectory() && /^part=\d+$/.test(d.name))
    .map((d) => ({ name: d.name, n: Number(d.name.slice('part='.length)) }))
    .sort((a, b) => a.n - b.n);
  return parts.flatMap(({ name }) =>
    readdirSync(join(fieldsDir, name))
      .filter((f) => f.endsWith('.parquet'))
      .sort()
      .map((f) => join(fieldsDir, name, f)),
  );
}

/** One job's points sorted by range, then height (stable), as `fieldsByJob` sorts them. */
function sortedPoints(points: FieldRecord[]): FieldRecord[] {
  for (let i = 1; i < points.length; i++) {
    const a = points[i - 1];
    const b = points[i];
    if (!(a.range_m < b.range_m || (a.range_m === b.range_m && a.height_m <= b.height_m))) {
      return points.sort((x, y) => x.range_m - y.range_m || x.height_m - y.height_m);
    }
  }
  return points;
}

/**
 * Open the fields/ table of `dir` for reading job by job; DuckDB spills what does not fit in `memoryLimit` to
 * `scratchDir`. A file that cannot be read is one line naming the folder (exit code 2).
 */
export async function openFieldReader(dir: string, scratchDir: string, memoryLimit = '256MB'): Promise<FieldReader> {
  const fieldsDir = join(dir, REPORT_INPUTS.fields);
  const glob = sqlPath(join(fieldsDir, '**', '*.parquet'));
  const db = await DuckDBInstance.create(':memory:', { memory_limit: memoryLimit, temp_directory: join(scratchDir, 'read-spill') });
  const conn = await db.connect();
  const present = existsSync(fieldsDir);
  const unreadable = (e: unknown) =>
    new UserError(
      `${fieldsDir}: cannot be read as a Parquet table (${String((e as Error).message ?? e).split('\n')[0].trim()}); write the outputs again with loamwave run or loamwave collect (they are rebuilt from the ledger)`,
      'loamwave.outputs.unreadable',
    );
  return {
    async jobsWithFields() {
      if (!present) return new Set();
      try {
        const r = await conn.runAndReadAll(`SELECT DISTINCT job_id FROM read_parquet(${glob}, hive_partitioning = true)`);
        return new Set(r.getColumns()[0].map(String));
      } catch (e) {
        throw unreadable(e);
      }
    },
    async rowsPerJob() {
      if (!present) return new Map();
      try {
        const r = await conn.runAndReadAll(`SELECT job_id, count(*) AS n FROM read_parquet(${glob}, hive_partitioning = true) GROUP BY job_id`);
        const [ids, n] = r.getColumns() as [string[], bigint[]];
        return new Map(ids.map((id, k) => [String(id), Number(n[k])]));
      } catch (e) {
        throw unreadable(e);
      }
    },
    async distinctRanges() {
      if (!present) return [];
      try {
        const r = await conn.runAndReadAll(`SELECT DISTINCT range_m FROM read_parquet(${glob}, hive_partitioning = true)`);
        return r.getColumns()[0].map(Number);
      } catch (e) {
        throw unreadable(e);
      }
    },
    async *inFileOrder() {
      if (!present) return;
      const files = fieldFilesInOrder(fieldsDir);
      if (files.length === 0) return;
      let result;
      try {
        // insertion order is kept (DuckDB's default): files in the order listed, rows in file order
        result = await conn.stream(
          `SELECT job_id, range_m, height_m, ez_db_uv_per_m, ez_phase_deg FROM read_parquet([${files.map(sqlPath).join(', ')}])`,
        );
      } catch (e) {
        throw unreadable(e);
      }
      const seen = new Set<string>();
      let current: string | null = null;
      let points: FieldRecord[] = [];
      for await (const [ids, range, height, db_, phase] of chunksOf<[string[], number[], number[], number[], number[]]>(result, unreadable)) {
        for (let i = 0; i < ids.length; i++) {
          const id = ids[i];
          if (id !== current) {
            if (current !== null) yield { job_id: current, points: sortedPoints(points) };
            if (seen.has(id)) {
              throw new UserError(
                `${fieldsDir}: the rows of job ${id} are not together in the files (not written by loamwave?); write the outputs again with loamwave run or loamwave collect`,
                'loamwave.outputs.unreadable',
              );
            }
            seen.add(id);
            current = id;
            points = [];
          }
          points.push({ job_id: id, range_m: range[i], height_m: height[i], ez_db_uv_per_m: db_[i], ez_phase_deg: phase[i] });
        }
      }
      if (current !== null) yield { job_id: current, points: sortedPoints(points) };
    },
    async *byJob(jobIds) {
      if (!present || jobIds.length === 0) return;
      await conn.run('CREATE OR REPLACE TEMP TABLE wanted (job_id VARCHAR, ord BIGINT)');
      const appender = await conn.createAppender('wanted');
      jobIds.forEach((id, k) => {
        appender.appendVarchar(id);
        appender.appendBigInt(BigInt(k));
        appender.endRow();
      });
      appender.flushSync();
      appender.closeSync();
      let result;
      try {
        result = await conn.stream(
          `SELECT w.ord, f.range_m, f.height_m, f.ez_db_uv_per_m, f.ez_phase_deg
           FROM read_parquet(${glob}, hive_partitioning = true) f JOIN wanted w USING (job_id)
           ORDER BY w.ord, f.range_m, f.height_m`,
        );
      } catch (e) {
        throw unreadable(e);
      }
      let current = -1;
      let points: FieldRecord[] = [];
      for await (const [ord, range, height, db_, phase] of chunksOf<[bigint[], number[], number[], number[], number[]]>(result, unreadable)) {
        for (let i = 0; i < ord.length; i++) {
          const k = Number(ord[i]);
          if (k !== current) {
            if (current >= 0) yield { job_id: jobIds[current], points };
            current = k;
            points = [];
          }
          points.push({ job_id: jobIds[k], range_m: range[i], height_m: height[i], ez_db_uv_per_m: db_[i], ez_phase_deg: phase[i] });
        }
      }
      if (current >= 0) yield { job_id: jobIds[current], points };
    },
    close() {
      conn.closeSync();
      db.closeSync();
    },
  };
}
