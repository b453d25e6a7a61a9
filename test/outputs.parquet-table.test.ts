// The Parquet wrapper keeps inside what parquetjs-lite writes correctly, and DuckDB reads back what it wrote.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, describe, expect, it } from 'vitest';
import { ParquetTableWriter, type ColumnSpec } from '../coordinator/outputs/parquet.js';
import { columnNameFor } from '../schemas/table-rows.js';

const dir = mkdtempSync(join(tmpdir(), 'loamwave-parquet-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const COLUMNS: ColumnSpec[] = [
  { name: 'x', type: 'DOUBLE' },
  { name: 'n', type: 'INT64' },
  { name: 's', type: 'UTF8' },
  { name: 'b', type: 'BOOLEAN' },
];

describe('parquet table writer', () => {
  it('when rows span several row groups then DuckDB reads every value, nulls and the largest safe integer included', async () => {
    const path = join(dir, 'round-trip.parquet');
    const w = await ParquetTableWriter.open(path, COLUMNS, { rowGroupRows: 3 });
    // 2^53 − 1 is the largest integer a double holds exactly (ECMA-262 Number.MAX_SAFE_INTEGER).
    const input = [
      { x: -0, n: Number.MAX_SAFE_INTEGER, s: 'ünï', b: true },
      { x: 1e-310, n: -1, s: null, b: false },
      { x: null, n: null, s: '', b: null },
      { x: Number.MAX_VALUE, n: 0, s: 'a;b', b: true },
      { x: -5e-324, n: 2 ** 40, s: 'z', b: false },
    ];
    for (const r of input) await w.append(r);
    await w.close();
    await w.close();
    expect(w.rowCount).toBe(5);
    const db = await DuckDBInstance.create(':memory:');
    const conn = await db.connect();
    const got = (await conn.runAndReadAll(`SELECT * FROM read_parquet('${path}')`)).getRowObjectsJS();
    const types = (await conn.runAndReadAll(`DESCRIBE SELECT * FROM read_parquet('${path}')`)).getRowObjectsJS();
    conn.closeSync();
    db.closeSync();
    expect(types.map((t) => t.column_type)).toEqual(['DOUBLE', 'BIGINT', 'VARCHAR', 'BOOLEAN']);
    got.forEach((row, i) => {
      const e = input[i];
      expect(Object.is(row.x, e.x), `row ${i} x`).toBe(true);
      expect(row.n === null ? null : Number(row.n)).toBe(e.n);
      expect(row.s).toBe(e.s);
      expect(row.b).toBe(e.b);
    });
  });

  it.each([
    ['an integer above 2^53', { n: 2 ** 53 + 2 }, 'column n: expected an integer below 2^53'],
    ['a fraction in an INT64 column', { n: 1.5 }, 'column n: expected an integer below 2^53'],
    ['NaN', { x: Number.NaN }, 'column x: only finite numbers are written'],
    ['Infinity', { x: Number.POSITIVE_INFINITY }, 'column x: only finite numbers are written'],
    ['a number in a UTF8 column', { s: 3 }, 'column s: expected a string'],
    ['an unknown column', { y: 1 }, 'no column y'],
  ])('when a row holds %s then it is refused before anything is written', async (_what, row, message) => {
    const w = await ParquetTableWriter.open(join(dir, 'refused.parquet'), COLUMNS);
    await expect(w.append(row as never)).rejects.toThrow(message);
    await w.close();
  });

  it.each([
    ['ground.segments[0].conductivity_s_per_m', 'ground_segments_0_conductivity_s_per_m'],
    ['grid.cells_per_wavelength', 'grid_cells_per_wavelength'],
    ['receivers.ranges_m[2]', 'receivers_ranges_m_2'],
    ['frequency_hz', 'frequency_hz'],
  ])('when the vary path is %s then its column is %s', (path, column) => {
    expect(columnNameFor(path)).toBe(column);
  });
});
