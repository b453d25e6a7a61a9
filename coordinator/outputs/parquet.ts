// The one module that knows the Parquet writers, so they can be swapped: a typed column list, and two writers.
// parquetjs-lite 0.8.7 (the project's choice) writes the small tables (runs.parquet), Snappy-compressed with its
// column statistics; a streaming writer whose memory is bounded by one row group, with the checks that keep us
// inside what that library writes correctly. Measured limits it works around: INT64 above 2^53 is stored wrongly,
// NaN throws, its own TIMESTAMP_MILLIS cannot be read back. So: DOUBLE, INT64 below 2^53, UTF8, BOOLEAN; times as
// INT64 ms. It writes about 50,000 rows of 15 columns a second here (npm run bench:scale prints it), so the large
// tables (fields/, convergence.parquet, sensitivity.parquet) go through DuckDB's Parquet writer instead
// (`DuckTableStore`: rows appended to a disk-backed DuckDB table, then COPY … TO … (FORMAT parquet, COMPRESSION
// zstd), with row-group statistics), whose memory is bounded by its memory_limit, not by the table.
// Every file is written under a temporary name in its own folder and renamed, so a failed write (a full disk)
// leaves the previous file as it was.
import { existsSync, renameSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { basename, dirname, join } from 'node:path';
import { DuckDBInstance, type DuckDBAppender, type DuckDBConnection } from '@duckdb/node-api';

/** Column types we write; every column is optional (nullable), so a missing value is a null. */
export type ColumnType = 'DOUBLE' | 'INT64' | 'UTF8' | 'BOOLEAN';

export interface ColumnSpec {
  readonly name: string;
  readonly type: ColumnType;
}

export type CellValue = number | string | boolean | null | undefined;

export interface ParquetTableOptions {
  /** Rows buffered before a row group is written: bounds memory. @defaultValue 8192 */
  readonly rowGroupRows?: number;
}

interface ParquetLib {
  ParquetSchema: new (fields: Record<string, { type: string; optional?: boolean; compression?: string }>) => unknown;
  ParquetWriter: {
    openFile(schema: unknown, path: string, opts?: Record<string, unknown>): Promise<{
      appendRow(row: Record<string, unknown>): Promise<void>;
      close(): Promise<void>;
    }>;
  };
}

// parquetjs-lite is CommonJS without typings; its surface is the three calls above.
const parquet = createRequire(import.meta.url)('parquetjs-lite') as ParquetLib;

/** A streaming writer of one Parquet file with a fixed column list. */
export class ParquetTableWriter {
  readonly path: string;
  readonly columns: readonly ColumnSpec[];
  private readonly writer: Awaited<ReturnType<ParquetLib['ParquetWriter']['openFile']>>;
  private rows = 0;
  private closed = false;

  private constructor(path: string, columns: readonly ColumnSpec[], writer: ParquetTableWriter['writer']) {
    this.path = path;
    this.columns = columns;
    this.writer = writer;
  }

  static async open(path: string, columns: readonly ColumnSpec[], options: ParquetTableOptions = {}): Promise<ParquetTableWriter> {
    const seen = new Set<string>();
    for (const c of columns) {
      if (seen.has(c.name)) throw new Error(`ParquetTableWriter: column ${c.name} is listed twice`);
      seen.add(c.name);
    }
    // Snappy: parquetjs-lite's fastest codec, read by every Parquet reader (Apache Parquet format, Compression).
    const fields = Object.fromEntries(columns.map((c) => [c.name, { type: c.type, optional: true, compression: 'SNAPPY' }]));
    const writer = await parquet.ParquetWriter.openFile(new parquet.ParquetSchema(fields), path, {
      rowGroupSize: options.rowGroupRows ?? 8192,
    });
    return new ParquetTableWriter(path, columns, writer);
  }

  /** Append one row; keys not in the column list are an error, absent columns are null. */
  async append(row: Readonly<Record<string, CellValue>>): Promise<void> {
    const out: Record<string, unknown> = {};
    for (const key of Object.keys(row)) {
      if (!this.columns.some((c) => c.name === key)) throw new Error(`${this.path}: no column ${key}`);
    }
    for (const c of this.columns) {
      const v = row[c.name];
      if (v === null || v === undefined) continue;
      out[c.name] = checkedCell(this.path, c, v);
    }
    await this.writer.appendRow(out);
    this.rows++;
  }

  get rowCount(): number {
    return this.rows;
  }

  /** Write the last row group and the footer; safe to call twice. */
  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    await this.writer.close();
  }
}

function checkedCell(path: string, c: ColumnSpec, v: Exclude<CellValue, null | undefined>): unknown {
  const bad = (why: string) => new Error(`${path}: column ${c.name}: ${why} (got ${String(v)})`);
  switch (c.type) {
    case 'DOUBLE':
      if (typeof v !== 'number') throw bad('expected a number');
      // parquetjs-lite throws on NaN; the ledger never holds one, so this is a wiring error.
      if (!Number.isFinite(v)) throw bad('only finite numbers are written');
      // parquetjs-lite converts every DOUBLE with parseFloat(value): a number goes through String(), which writes
      // −0 as "0" and loses the sign (measured). Handing it the text "-0" keeps the sign bit.
      return Object.is(v, -0) ? '-0' : v;
    case 'INT64':
      // Above 2^53 parquetjs-lite stores a different integer (measured); doubles cannot hold them exactly anyway.
      if (typeof v !== 'number' || !Number.isSafeInteger(v)) throw bad('expected an integer below 2^53');
      return v;
    case 'UTF8':
      if (typeof v !== 'string') throw bad('expected a string');
      return v;
    case 'BOOLEAN':
      if (typeof v !== 'boolean') throw bad('expected true or false');
      return v;
  }
}

/** SQL string literal (single quotes doubled). */
export function sqlString(text: string): string {
  return `'${text.replace(/'/g, "''")}'`;
}

/** SQL identifier (double quotes doubled). */
export function sqlName(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}

const DUCK_TYPES: Record<ColumnType, string> = { DOUBLE: 'DOUBLE', INT64: 'BIGINT', UTF8: 'VARCHAR', BOOLEAN: 'BOOLEAN' };

export interface DuckStoreOptions {
  /** DuckDB's memory limit (it spills to `dir` beyond it). @defaultValue '256MB' (a Loamwave choice: with Node's own few hundred MB and the field reader's, the output stage stays under 1 GiB; a segment of SEGMENT_ROWS rows unnests well within it) */
  readonly memoryLimit?: string;
  /** DuckDB's threads. @defaultValue DuckDB's own (one per core) */
  readonly threads?: number;
}

/** The first line of an error's message (DuckDB's messages run over several lines). */
export function firstLine(e: unknown): string {
  return String((e as Error)?.message ?? e).split('\n')[0].trim();
}

/**
 * A disk-backed DuckDB database in a scratch folder, for writing large Parquet tables with bounded memory: rows
 * are appended to its tables, then copied to Parquet with ZSTD. Remove the folder with `close()`.
 */
export class DuckTableStore {
  readonly conn: DuckDBConnection;
  private readonly db: DuckDBInstance;
  private readonly dir: string;

  private constructor(db: DuckDBInstance, conn: DuckDBConnection, dir: string) {
    this.db = db;
    this.conn = conn;
    this.dir = dir;
  }

  /** Open a store whose files live in `dir` (created by DuckDB; removed by close). */
  static async open(dir: string, options: DuckStoreOptions = {}): Promise<DuckTableStore> {
    const db = await DuckDBInstance.create(join(dir, 'work.duckdb'), {
      memory_limit: options.memoryLimit ?? '256MB',
      temp_directory: join(dir, 'spill'),
      // Every query that writes a file orders its rows; not keeping insertion order lets DuckDB spill more freely.
      preserve_insertion_order: 'false',
      ...(options.threads !== undefined ? { threads: String(options.threads) } : {}),
    });
    return new DuckTableStore(db, await db.connect(), dir);
  }

  /**
   * Create (or replace) a table with these columns. `temp`: a temporary table, held by the buffer manager and
   * spilled to the scratch folder past the memory limit, without the disk table's storage work on every commit
   * (measured: appends to it cost a third of those to a stored table).
   */
  async createTable(table: string, columns: readonly ColumnSpec[], options: { temp?: boolean } = {}): Promise<void> {
    const kind = options.temp ? 'TEMP TABLE' : 'TABLE';
    await this.conn.run(`CREATE OR REPLACE ${kind} ${sqlName(table)} (${columns.map((c) => `${sqlName(c.name)} ${DUCK_TYPES[c.type]}`).join(', ')})`);
  }

  async appender(table: string): Promise<DuckDBAppender> {
    return this.conn.createAppender(table);
  }

  /**
   * Write the rows of `select` to `path` as Parquet (ZSTD, statistics), through a temporary file in the same
   * folder renamed over `path`: on failure (a full disk) the old file stays and the error is one line naming it.
   */
  async copyToParquet(select: string, path: string): Promise<number> {
    const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
    try {
      const done = await this.conn.runAndReadAll(`COPY (${select}) TO ${sqlString(tmp)} (FORMAT parquet, COMPRESSION zstd)`);
      renameSync(tmp, path);
      return Number(done.getRows()[0]?.[0] ?? 0);
    } catch (e) {
      rmSync(tmp, { force: true });
      throw new ParquetWriteError(path, e);
    }
  }

  close(): void {
    try {
      this.conn.closeSync();
      this.db.closeSync();
    } finally {
      for (const f of ['work.duckdb', 'work.duckdb.wal', 'spill']) if (existsSync(join(this.dir, f))) rmSync(join(this.dir, f), { recursive: true, force: true });
    }
  }
}

/** A table that could not be written (typically a full disk): one line naming the file; the old one is kept. */
export class ParquetWriteError extends Error {
  readonly path: string;
  constructor(path: string, cause: unknown) {
    super(`${path}: not written (${firstLine(cause)}); the previous file, if any, is unchanged`);
    this.name = 'ParquetWriteError';
    this.path = path;
  }
}

/** Append one row to a DuckDB appender by column type; nulls where the value is missing. */
export function appendRow(appender: DuckDBAppender, columns: readonly ColumnSpec[], row: Readonly<Record<string, CellValue>>): void {
  for (const c of columns) {
    const v = row[c.name];
    if (v === null || v === undefined) {
      appender.appendNull();
      continue;
    }
    switch (c.type) {
      case 'DOUBLE':
        if (typeof v !== 'number') throw new Error(`column ${c.name}: expected a number (got ${String(v)})`);
        appender.appendDouble(v);
        break;
      case 'INT64':
        if (typeof v !== 'number' || !Number.isSafeInteger(v)) throw new Error(`column ${c.name}: expected an integer below 2^53 (got ${String(v)})`);
        appender.appendBigInt(BigInt(v));
        break;
      case 'UTF8':
        if (typeof v !== 'string') throw new Error(`column ${c.name}: expected a string (got ${String(v)})`);
        appender.appendVarchar(v);
        break;
      case 'BOOLEAN':
        if (typeof v !== 'boolean') throw new Error(`column ${c.name}: expected true or false (got ${String(v)})`);
        appender.appendBoolean(v);
        break;
    }
  }
  appender.endRow();
}
