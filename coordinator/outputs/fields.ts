// The fields/ table (one row per job and receiver, Hive-partitioned as `part=<n>` by blocks of jobs), written from
// the ledger's result texts without building a JS object per row: each result's JSON text goes into a disk-backed
// DuckDB table (one row per job), and DuckDB unnests the receivers and writes each partition as ZSTD Parquet.
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { FieldRowSchema } from '../../schemas/table-rows.js';
import { columnsFromRowSchema } from './columns.js';
import { appendRow as appendRowTo, sqlName, sqlString, type CellValue, type ColumnSpec, type DuckTableStore } from './parquet.js';
import type { ExpandedJob } from '../sweep/expand.js';
import type { DuckDBAppender } from '@duckdb/node-api';

/** A stored result as the ledger hands it over: its job and its JSON text. */
export interface ResultText {
  readonly job_id: string;
  readonly result_json: string;
}

/** A parameter column of the fields table: its name and type, and where the job's value is. */
export type ParamColumn = ColumnSpec & { path: string };

/** Jobs appended between commits (about 5 MB of result text at 500 receivers; a Loamwave choice). */
const FLUSH_EVERY_JOBS = 32;

const COMPLEX_PARTS = /^(ez|e_horizontal|h)_(re|im)$/;

/** The JSON structure of the receivers, for DuckDB's from_json: every number a DOUBLE. */
function receiversStructure(): string {
  const fields = columnsFromRowSchema(FieldRowSchema).filter((c) => c.name !== 'job_id' && c.name !== 'index');
  const members: Record<string, unknown> = {};
  for (const c of fields) {
    const m = COMPLEX_PARTS.exec(c.name);
    if (m) members[m[1]] = { re: 'DOUBLE', im: 'DOUBLE' };
    else members[c.name] = 'DOUBLE';
  }
  return JSON.stringify({ receivers: [members] });
}

/** The SQL expression of each column of FieldRowSchema, over `r` (one receiver) and the raw job row. */
function fieldExpression(name: string): string {
  if (name === 'job_id') return 'job_id';
  if (name === 'index') return 'idx';
  const m = COMPLEX_PARTS.exec(name);
  return m ? `r.${m[1]}.${m[2]}` : `r.${sqlName(name)}`;
}

/**
 * The exact JSON of the ledger writes −0 as `-0`, which a JSON reader may take for the integer 0; as `-0.0` it is
 * the double −0 (bit for bit: the fields keep the sign of a zero, as the ledger does).
 */
export function negativeZeroAsDouble(json: string): string {
  return json.replace(/([:,[])-0(?=[,}\]])/g, '$1-0.0');
}

/** The raw table's columns: partition, job, index, the result's text, then the parameters as p0, p1, … */
function rawColumns(params: readonly ParamColumn[]): ColumnSpec[] {
  return [
    { name: 'part', type: 'INT64' },
    { name: 'job_id', type: 'UTF8' },
    { name: 'idx', type: 'INT64' },
    { name: 'result', type: 'UTF8' },
    ...params.map((p, k) => ({ name: `p${k}`, type: p.type })),
  ];
}

/** The SELECT of one partition's field rows, in job index order and receiver order, columns as `fieldColumns`. */
export function fieldSelect(rawTable: string, params: readonly ParamColumn[], where: string): string {
  const columns = [
    ...columnsFromRowSchema(FieldRowSchema).map((c) => `${fieldExpression(c.name)} AS ${sqlName(c.name)}`),
    ...params.map((p, k) => `p${k} AS ${sqlName(p.name)}`),
  ];
  return `SELECT ${columns.join(', ')} FROM (
      SELECT job_id, idx, ${params.map((_, k) => `p${k}, `).join('')}unnest(rs) AS r, generate_subscripts(rs, 1) AS k
      FROM (SELECT *, from_json(result, ${sqlString(receiversStructure())}).receivers AS rs FROM ${sqlName(rawTable)} WHERE ${where})
    ) ORDER BY idx, job_id, k`;
}

function paramCell(job: ExpandedJob, p: ParamColumn): CellValue {
  const v = job.params[p.path];
  return p.type === 'UTF8' && v !== undefined ? String(v) : v;
}

/**
 * Write `fields/part=<n>/data.parquet` under `fieldsDir` for every result of a job in `byId`, partition n holding
 * jobs n·jobsPerPart … (n+1)·jobsPerPart − 1 by expansion index. With no result at all, one empty partition keeps
 * `read_parquet('fields/**\/*.parquet')` valid (zero rows). Returns the rows written and the partitions.
 */
export async function writeFieldParts(
  store: DuckTableStore,
  results: Iterable<ResultText>,
  byId: ReadonlyMap<string, ExpandedJob>,
  params: readonly ParamColumn[],
  jobsPerPart: number,
  fieldsDir: string,
): Promise<{ rows: number; parts: number[] }> {
  const raw = 'raw_results';
  const columns = rawColumns(params);
  // One partition at a time (results come in index order, so a partition's jobs arrive together): its result
  // texts go into the raw table, are copied out as Parquet, and the table is emptied before the next one.
  const filesOf = new Map<number, number>();
  let rows = 0;
  let current: number | null = null;
  let appender: DuckDBAppender | null = null;
  let appended = 0;
  const finishPart = async () => {
    if (current === null || appender === null) return;
    appender.flushSync();
    appender.closeSync();
    appender = null;
    const dir = join(fieldsDir, `part=${current}`);
    mkdirSync(dir, { recursive: true });
    // A partition met again (a ledger shared with another sweep may hold the jobs in another order) gets a
    // second file in its folder: readers of the Hive-partitioned table read every file of a folder.
    const n = filesOf.get(current) ?? 0;
    filesOf.set(current, n + 1);
    rows += await store.copyToParquet(fieldSelect(raw, params, 'true'), join(dir, n === 0 ? 'data.parquet' : `data-${n}.parquet`));
  };
  try {
    for (const { job_id, result_json } of results) {
      const job = byId.get(job_id);
      if (!job) continue;
      const part = Math.floor(job.index / jobsPerPart);
      if (part !== current) {
        await finishPart();
        current = part;
        await store.createTable(raw, columns);
        appender = await store.appender(raw);
      }
      const row: Record<string, CellValue> = { part, job_id, idx: job.index, result: negativeZeroAsDouble(result_json) };
      params.forEach((p, k) => (row[`p${k}`] = paramCell(job, p)));
      appendRowTo(appender!, columns, row);
      // Commit every few jobs: an open append is held in memory until committed.
      if (++appended % FLUSH_EVERY_JOBS === 0) appender!.flushSync();
    }
    await finishPart();
  } finally {
    (appender as DuckDBAppender | null)?.closeSync();
  }
  if (filesOf.size === 0) {
    // No result yet: one empty partition keeps `read_parquet('fields/**\/*.parquet')` valid (zero rows).
    await store.createTable(raw, columns);
    mkdirSync(join(fieldsDir, 'part=0'), { recursive: true });
    await store.copyToParquet(fieldSelect(raw, params, 'false'), join(fieldsDir, 'part=0', 'data.parquet'));
    filesOf.set(0, 1);
  }
  await store.conn.run(`DROP TABLE IF EXISTS ${sqlName(raw)}`);
  return { rows, parts: [...filesOf.keys()].sort((a, b) => a - b) };
}
