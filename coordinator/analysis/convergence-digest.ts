// The convergence table as the report holds it, whatever its size: its first rows, the counts its summary states,
// the rows its plots draw (a few per output, chosen evenly) and the first rows that did not converge, with their
// number. From rows in memory, or read from convergence.parquet by DuckDB without loading the table.
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { ConvergenceRowSchema, type ConvergenceRow } from '../../schemas/analysis-rows.js';
import { evenIndices } from './field-spread.js';
import { parseTable, readFile, sqlPath } from './read-tables.js';

export interface ConvergenceDigest {
  /** The first `tableRows` rows, in table order (all of them when there are no more). */
  head: ConvergenceRow[];
  total: number;
  /** Rows per verdict, verdicts in the order they first appear. */
  verdicts: Record<string, number>;
  /** Rows per output, outputs in the order they first appear. */
  rowsPerOutput: Record<string, number>;
  /** For each output in that order, `linesPerOutput` of its rows chosen evenly, in table order. */
  plotted: ConvergenceRow[];
  /** The first `tableRows` rows whose verdict is not `converged`, in table order, and how many there are. */
  unconverged: ConvergenceRow[];
  unconvergedTotal: number;
}

export interface DigestLimits {
  readonly tableRows: number;
  readonly linesPerOutput: number;
}

/** How many items have each key, keys in the order they first appear. */
export function countBy<T>(items: readonly T[], key: (item: T) => string): Record<string, number> {
  const out: Record<string, number> = {};
  for (const i of items) out[key(i)] = (out[key(i)] ?? 0) + 1;
  return out;
}

/** The digest of rows held in memory. */
export function convergenceDigestOf(rows: readonly ConvergenceRow[], limits: DigestLimits): ConvergenceDigest {
  const byOutput = new Map<string, ConvergenceRow[]>();
  for (const r of rows) {
    const list = byOutput.get(r.output) ?? [];
    list.push(r);
    byOutput.set(r.output, list);
  }
  const unconverged = rows.filter((r) => r.verdict !== 'converged');
  return {
    head: rows.slice(0, limits.tableRows),
    total: rows.length,
    verdicts: countBy(rows, (r) => r.verdict),
    rowsPerOutput: Object.fromEntries([...byOutput].map(([o, list]) => [o, list.length])),
    plotted: [...byOutput.values()].flatMap((list) => evenIndices(list.length, limits.linesPerOutput).map((i) => list[i])),
    unconverged: unconverged.slice(0, limits.tableRows),
    unconvergedTotal: unconverged.length,
  };
}

/** The digest of convergence.parquet at `path`, by queries over the file (rows in file order; spills to `scratchDir`). */
export async function readConvergenceDigest(path: string, limits: DigestLimits, scratchDir: string): Promise<ConvergenceDigest> {
  const db = await DuckDBInstance.create(':memory:', { memory_limit: '256MB', temp_directory: join(scratchDir, 'digest-spill') });
  const conn = await db.connect();
  const file = sqlPath(path);
  const numbered = `(SELECT * EXCLUDE (file_row_number), file_row_number AS loamwave_row FROM read_parquet(${file}, file_row_number = true))`;
  const rowsOf = async (sql: string) => parseTable(ConvergenceRowSchema, (await readFile(conn, sql, path)).rows, 'convergence.parquet');
  const counts = async (column: string) => {
    const r = await readFile(conn, `SELECT ${column} AS k, count(*) AS n FROM ${numbered} GROUP BY ${column} ORDER BY min(loamwave_row)`, path);
    return Object.fromEntries(r.rows.map((row) => [String(row.k), Number(row.n)]));
  };
  try {
    const verdicts = await counts('verdict');
    const rowsPerOutput = await counts('output');
    const total = Object.values(verdicts).reduce((a, b) => a + b, 0);
    const picks = Object.entries(rowsPerOutput).flatMap(([o, n], k) => evenIndices(n, limits.linesPerOutput).map((i) => `(${k}, ${sqlPath(o)}, ${i})`));
    const plotted =
      picks.length === 0
        ? []
        : await rowsOf(
            // ranked on two columns only, then the chosen rows fetched whole
            `WITH picks(k, o, i) AS (VALUES ${picks.join(', ')}),
             ranked AS (SELECT file_row_number AS loamwave_row, output, row_number() OVER (PARTITION BY output ORDER BY file_row_number) - 1 AS i
                        FROM read_parquet(${file}, file_row_number = true)),
             chosen AS (SELECT r.loamwave_row, p.k, r.i FROM ranked r JOIN picks p ON r.output = p.o AND r.i = p.i)
             SELECT c.* EXCLUDE (loamwave_row) FROM ${numbered} c JOIN chosen USING (loamwave_row) ORDER BY chosen.k, chosen.i`,
          );
    const unconvergedTotal = total - (verdicts.converged ?? 0);
    return {
      head: await rowsOf(`SELECT * EXCLUDE (loamwave_row) FROM ${numbered} ORDER BY loamwave_row LIMIT ${limits.tableRows}`),
      total,
      verdicts,
      rowsPerOutput,
      plotted,
      unconverged: await rowsOf(`SELECT * EXCLUDE (loamwave_row) FROM ${numbered} WHERE verdict <> 'converged' ORDER BY loamwave_row LIMIT ${limits.tableRows}`),
      unconvergedTotal,
    };
  } finally {
    conn.closeSync();
    db.closeSync();
  }
}
