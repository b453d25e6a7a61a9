// The one module that knows the Parquet library (parquetjs-lite 0.8.7), so it can be swapped: a typed column
// list, a streaming writer (memory bounded by one row group) and the checks that keep us inside what that
// library writes correctly. Measured limits it works around: INT64 above 2^53 is stored wrongly, NaN throws,
// its own TIMESTAMP_MILLIS cannot be read back. So: DOUBLE, INT64 below 2^53, UTF8, BOOLEAN; times as INT64 ms.
import { createRequire } from 'node:module';

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
    const fields = Object.fromEntries(columns.map((c) => [c.name, { type: c.type, optional: true, compression: 'UNCOMPRESSED' }]));
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
