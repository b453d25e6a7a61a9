// convergence.parquet and sensitivity.parquet: the analysis tables of a sweep, computed out of core from the runs
// and fields tables just written (read back through the report's folder reader, the field rows job by job, so the
// files and the report agree, at any size), with Parquet columns derived from the row schemas, which are the
// contract. The report page is not written here:
// the command layer writes it, once, from these same tables.
import { join } from 'node:path';
import { z } from 'zod';
import { ConvergenceRowSchema } from '../../schemas/analysis-rows.js';
import { SensitivityRowSchema } from '../../schemas/analysis-rows.js';
import { columnsFromRowSchema } from './columns.js';
import { appendRow, sqlName, type CellValue, type ColumnSpec, type DuckTableStore } from './parquet.js';
import type { DuckDBAppender } from '@duckdb/node-api';
import { computeConvergenceOutOfCore, computeSensitivityOutOfCore } from '../analysis/compute-tables.js';
import { openFieldReader, readReportFolder } from '../analysis/read-tables.js';
import { SOLVER_VERSION } from '../../solver/version.js';

const ROW_NUMBER = 'loamwave_row_number';
/** Rows appended between commits of an analysis table (a Loamwave choice: a few MB held at most). */
const FLUSH_ROWS = 16_384;
/** Room for each convergence group's rows in the order key (2^26 rows a group; 2^27 groups stay below 2^53). */
const GROUP_KEY_STRIDE = 2 ** 26;
/** DuckDB's memory limit for the field reader of the analysis (a Loamwave choice, measured at 10 M rows). */
const ANALYSIS_READER_MEMORY = '128MB';

/**
 * A table of a flat row schema, filled a batch of rows at a time into the store, then written as one Parquet
 * file; non-finite numbers become null where the schema allows null (and are an error where it does not).
 */
export class RowTable {
  private rows = 0;
  private pending = 0;
  private appender: DuckDBAppender | null = null;
  private readonly withNumber: ColumnSpec[];
  private constructor(
    private readonly store: DuckTableStore,
    private readonly table: string,
    private readonly columns: ReturnType<typeof columnsFromRowSchema>,
  ) {
    this.withNumber = [...columns, { name: ROW_NUMBER, type: 'INT64' }];
  }

  static async open(store: DuckTableStore, table: string, schema: z.ZodObject): Promise<RowTable> {
    const columns = columnsFromRowSchema(schema);
    // A row number, so the file keeps the order the rows were computed in (the store may reorder otherwise).
    await store.createTable(table, [...columns, { name: ROW_NUMBER, type: 'INT64' }], { temp: true });
    return new RowTable(store, table, columns);
  }

  /**
   * Append rows (numbered firstKey, firstKey + 1, … in the file's order when given, else in the order appended)
   * through one appender, committed every FLUSH_ROWS rows: a commit has a fixed cost (measured: a commit per
   * convergence group was most of the analysis time at 1 M field rows), and the rows held between commits bound
   * the memory.
   */
  async append(rows: readonly object[], firstKey?: number): Promise<void> {
    this.appender ??= await this.store.appender(this.table);
    const out: Record<string, CellValue> = {};
    let key = firstKey;
    for (const row of rows) {
      const r = row as Record<string, CellValue>;
      for (const c of this.columns) {
        const v = r[c.name];
        if (typeof v === 'number' && !Number.isFinite(v)) {
          if (!c.nullable) throw new Error(`${this.table}: column ${c.name}: only finite numbers are written (got ${v})`);
          out[c.name] = null;
        } else out[c.name] = v;
      }
      // the file's order: the key given (rows appended out of order), else the order of appending
      out[ROW_NUMBER] = key === undefined ? this.rows : key++;
      this.rows++;
      appendRow(this.appender, this.withNumber, out);
      if (++this.pending >= FLUSH_ROWS) {
        this.appender.flushSync();
        this.pending = 0;
      }
    }
  }

  /** Write the table to `path` (a temporary file beside it, renamed); returns its row count. */
  async write(path: string): Promise<number> {
    this.closeAppender();
    await this.store.copyToParquet(`SELECT * EXCLUDE (${sqlName(ROW_NUMBER)}) FROM ${sqlName(this.table)} ORDER BY ${sqlName(ROW_NUMBER)}`, path);
    await this.store.conn.run(`DROP TABLE ${sqlName(this.table)}`);
    return this.rows;
  }

  /** Commit what is appended and let the appender go (also on failure, before the store closes). */
  closeAppender(): void {
    const a = this.appender;
    this.appender = null;
    if (a) {
      try {
        a.flushSync();
      } finally {
        a.closeSync();
      }
    }
  }
}

export const ANALYSIS_FILES = { convergence: 'convergence.parquet', sensitivity: 'sensitivity.parquet' } as const;

/**
 * Compute convergence.parquet (and sensitivity.parquet when `sensitivity` is set) from the tables published in
 * `dir` (runs.parquet, fields/ and the sweep copy), out of core: the field rows are read job by job, the rows
 * go to `store` (disk-backed) and each file is written beside its final name and renamed into `dir`.
 * `scratchDir` takes DuckDB's spill files.
 */
export async function writeAnalysisTables(
  dir: string,
  store: DuckTableStore,
  scratchDir: string,
  options: { sensitivity?: boolean } = {},
): Promise<{ convergence: number; sensitivity: number | null }> {
  const tables = await readReportFolder(dir, { fields: false });
  // a small limit: the rows are streamed (or, for spread-out groups, sorted with spilling), and the store's
  // DuckDB, the Float64Array per output of the sensitivity pass and Node's own heap share the 1 GiB the output
  // stage is held to (the store needs its 256 MB: sorting 5 M convergence rows in 128 MB ran out)
  const reader = await openFieldReader(dir, scratchDir, ANALYSIS_READER_MEMORY);
  const open: RowTable[] = [];
  try {
    const convergence = await RowTable.open(store, 'convergence', ConvergenceRowSchema);
    open.push(convergence);
    // groups may come in any order: each group's rows are filed under its number, so the file has them in order
    await computeConvergenceOutOfCore(tables, reader, { generatedBy: `loamwave ${SOLVER_VERSION}` }, (rows, group) => convergence.append(rows, group * GROUP_KEY_STRIDE));
    let sensitivityRows: number | null = null;
    let sensitivity: RowTable | null = null;
    if (options.sensitivity) {
      sensitivity = await RowTable.open(store, 'sensitivity', SensitivityRowSchema);
      open.push(sensitivity);
      await sensitivity.append(await computeSensitivityOutOfCore(tables, reader, { warnings: [] }));
    }
    // Both computed before either is renamed in: a failure in the second leaves neither new file.
    const convergenceRows = await convergence.write(join(dir, ANALYSIS_FILES.convergence));
    if (sensitivity) sensitivityRows = await sensitivity.write(join(dir, ANALYSIS_FILES.sensitivity));
    return { convergence: convergenceRows, sensitivity: sensitivityRows };
  } finally {
    // after a failure only (written tables have let theirs go); the first error is the one reported
    for (const t of open) {
      try {
        t.closeAppender();
      } catch {
        /* the store is closed next */
      }
    }
    reader.close();
  }
}
