// Reads a sweep's output folder for the analysis and the report: the sweep copy, runs.parquet, the Hive-partitioned fields/ table
// and, when present, convergence.parquet and sensitivity.parquet, through DuckDB. Missing pieces the user can
// supply become one-line UserErrors naming the file and what to do.
import { existsSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { DuckDBInstance, type DuckDBConnection } from '@duckdb/node-api';
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


/** Names of the files the report reads (README, "Outputs"). */
export const REPORT_INPUTS = {
  runs: 'runs.parquet',
  fields: 'fields',
  convergence: 'convergence.parquet',
  sensitivity: 'sensitivity.parquet',
  sweepCopies: ['sweep.yaml', 'sweep.yml', 'sweep.json'],
} as const;

/** SQL string literal of a path (single quotes doubled). */
function sqlPath(path: string): string {
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
async function readFile(conn: DuckDBConnection, sql: string, file: string): Promise<{ columns: string[]; rows: Record<string, Cell>[] }> {
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

function parseTable<T>(schema: z.ZodType<T>, rows: Record<string, Cell>[], file: string): T[] {
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

/** Read every table of an output folder. Throws UserError when the folder is not a sweep's output folder. */
export async function readReportFolder(dir: string): Promise<FolderTables> {
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
    let fields: FieldRecord[] = [];
    if (existsSync(fieldsDir)) {
      const glob = join(fieldsDir, '**', '*.parquet');
      const read = await readFile(
        conn,
        `SELECT job_id, range_m, height_m, ez_db_uv_per_m, ez_phase_deg FROM read_parquet(${sqlPath(glob)}, hive_partitioning = true) ORDER BY job_id, range_m, height_m`,
        fieldsDir,
      );
      fields = read.rows.map((r) => ({
        job_id: String(r.job_id),
        range_m: Number(r.range_m),
        height_m: Number(r.height_m),
        ez_db_uv_per_m: Number(r.ez_db_uv_per_m),
        ez_phase_deg: Number(r.ez_phase_deg),
      }));
    }
    const optional = async <T>(file: string, schema: z.ZodType<T>): Promise<T[] | null> => {
      const path = join(dir, file);
      if (!existsSync(path)) return null;
      return parseTable(schema, (await readFile(conn, `SELECT * FROM read_parquet(${sqlPath(path)})`, path)).rows, file);
    };
    const convergence: ConvergenceRow[] | null = await optional(REPORT_INPUTS.convergence, ConvergenceRowSchema);
    const sensitivity: SensitivityRow[] | null = await optional(REPORT_INPUTS.sensitivity, SensitivityRowSchema);
    return { sweep, sweepFileName: sweepName, runColumns: runs.columns, runs: runs.rows as RunRecord[], fields, convergence, sensitivity };
  } finally {
    conn.closeSync();
    db.closeSync();
  }
}
