// The fields/ table (one row per job and receiver, Hive-partitioned as `part=<n>` by blocks of jobs), written in
// two steps so that most of it is written while the jobs run:
//  1. segments: the field rows of a batch of finished jobs, turned from the ledger's result texts into ZSTD
//     Parquet by DuckDB (each result's JSON text goes into a DuckDB table, one row per job, never parsed in JS),
//     kept in `<out>/.loamwave-segments/<key>/` with a manifest naming each job and its result's row in the ledger;
//  2. assembly: each partition's rows read back from the segments that hold them and written in job order, so
//     fields/ is the same whichever order the jobs finished in.
// A segment is used only while its ledger (by identity) still holds the very results it was written from, its
// sweep text and loamwave version are the current ones, and no other segment claims its jobs; otherwise it is
// removed and its jobs are written again from the ledger.
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { FieldRowSchema } from '../../schemas/table-rows.js';
import { SOLVER_VERSION } from '../../solver/version.js';
import { columnsFromRowSchema } from './columns.js';
import { appendRow as appendRowTo, sqlName, sqlString, type CellValue, type ColumnSpec, type DuckTableStore } from './parquet.js';
import type { ExpandedJob } from '../sweep/expand.js';
import type { StoredResultText } from '../ledger/ledger.js';
import { SEGMENT_ROWS } from './segment-rows.js';

/** A parameter column of the fields table: its name and type, and where the job's value is. */
export type ParamColumn = ColumnSpec & { path: string };

/** Folder of the segments inside the output folder. */
export const SEGMENTS_DIR = '.loamwave-segments';
const SEGMENT_FORMAT = 1;
/** Jobs appended between commits of the raw table (about 5 MB of result text at 500 receivers). */
const FLUSH_EVERY_JOBS = 32;
const IDX = 'loamwave_idx';
const ORD = 'loamwave_k';

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

/** The raw table's columns: job, index, the result's text, then the parameters as p0, p1, … */
function rawColumns(params: readonly ParamColumn[]): ColumnSpec[] {
  return [
    { name: 'job_id', type: 'UTF8' },
    { name: 'idx', type: 'INT64' },
    { name: 'result', type: 'UTF8' },
    ...params.map((p, k) => ({ name: `p${k}`, type: p.type })),
  ];
}

/** The final table's column names: FieldRowSchema's, then the parameters'. */
function finalNames(params: readonly ParamColumn[]): string[] {
  return [...columnsFromRowSchema(FieldRowSchema).map((c) => c.name), ...params.map((p) => p.name)];
}

/**
 * The SELECT of the raw table's field rows in job index order and receiver order: the columns of the table (as
 * `fieldColumns`), and with `withOrder` the job index and receiver number that segments keep for the assembly.
 */
export function fieldSelect(rawTable: string, params: readonly ParamColumn[], where: string, withOrder = false): string {
  const columns = [
    ...columnsFromRowSchema(FieldRowSchema).map((c) => `${fieldExpression(c.name)} AS ${sqlName(c.name)}`),
    ...params.map((p, k) => `p${k} AS ${sqlName(p.name)}`),
    ...(withOrder ? [`idx AS ${IDX}`, `k AS ${ORD}`] : []),
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

/** What a segment holds: the ledger it came from and each job with its result's row. */
interface SegmentManifest {
  format: number;
  ledger_id: string;
  jobs: Array<[job_id: string, row: number]>;
}

/** A segment in use: its Parquet file and its jobs. */
export interface Segment {
  readonly file: string;
  readonly jobs: ReadonlyArray<readonly [string, number]>;
}

/**
 * The segments of one sweep text in one output folder. The folder's name is a digest of everything the rows
 * depend on besides the results: the sweep text (job indices, parameter columns), loamwave's version and the
 * table's columns.
 */
export class FieldSegments {
  readonly dir: string;
  private readonly byId: ReadonlyMap<string, ExpandedJob>;
  private readonly params: readonly ParamColumn[];
  private readonly ledgerId: string;
  private serial = 0;

  constructor(outDir: string, sweepText: string, byId: ReadonlyMap<string, ExpandedJob>, params: readonly ParamColumn[], ledgerId: string) {
    const key = createHash('sha256')
      .update(JSON.stringify([SEGMENT_FORMAT, SOLVER_VERSION, finalNames(params), params.map((p) => [p.path, p.type]), sweepText]))
      .digest('hex')
      .slice(0, 16);
    this.dir = join(outDir, SEGMENTS_DIR, key);
    this.byId = byId;
    this.params = params;
    this.ledgerId = ledgerId;
  }

  /**
   * The segments that still describe the ledger (every job's result at the same row, a job of this sweep, no job
   * claimed twice), in name order; every other segment, and the folders of other sweep texts, are removed.
   */
  scan(resultRows: ReadonlyMap<string, number>): Segment[] {
    const root = join(this.dir, '..');
    if (existsSync(root)) {
      for (const name of readdirSync(root)) if (join(root, name) !== this.dir) rmSync(join(root, name), { recursive: true, force: true });
    }
    if (!existsSync(this.dir)) return [];
    const names = readdirSync(this.dir);
    const claimed = new Set<string>();
    const kept: Segment[] = [];
    for (const name of names.filter((n) => n.endsWith('.json')).sort()) {
      const base = name.slice(0, -'.json'.length);
      const file = join(this.dir, `${base}.parquet`);
      let m: SegmentManifest | null = null;
      try {
        m = JSON.parse(readFileSync(join(this.dir, name), 'utf8')) as SegmentManifest;
      } catch {
        m = null;
      }
      const ok =
        m !== null &&
        m.format === SEGMENT_FORMAT &&
        m.ledger_id === this.ledgerId &&
        Array.isArray(m.jobs) &&
        existsSync(file) &&
        m.jobs.every(([id, row]) => resultRows.get(id) === row && this.byId.has(id) && !claimed.has(id));
      if (!ok) {
        rmSync(join(this.dir, name), { force: true });
        rmSync(file, { force: true });
        continue;
      }
      for (const [id] of m!.jobs) claimed.add(id);
      kept.push({ file, jobs: m!.jobs });
    }
    // Files without a manifest (a writer stopped between the two) hold nothing anyone reads; a temporary file
    // may be another writer's at work, so only an old one goes.
    const manifested = new Set(kept.map((s) => s.file));
    const hourAgo = Date.now() - 3600_000;
    for (const name of names) {
      const path = join(this.dir, name);
      if (name.endsWith('.json') || manifested.has(path)) continue;
      if (!name.startsWith('.') || statSync(path).mtimeMs < hourAgo) rmSync(path, { recursive: true, force: true });
    }
    return kept;
  }

  /**
   * Write the field rows of `results` (jobs of other sweeps are skipped) as segments of about SEGMENT_ROWS rows,
   * each file and then its manifest renamed into place. Returns the segments written.
   */
  async write(store: DuckTableStore, results: Iterable<StoredResultText>): Promise<Segment[]> {
    mkdirSync(this.dir, { recursive: true });
    const raw = 'raw_results';
    const columns = rawColumns(this.params);
    const written: Segment[] = [];
    let jobs: Array<[string, number]> = [];
    let rows = 0;
    let appender: Awaited<ReturnType<DuckTableStore['appender']>> | null = null;
    const finish = async () => {
      if (appender === null) return;
      appender.flushSync();
      appender.closeSync();
      appender = null;
      const base = `seg-${Date.now().toString(36)}-${process.pid}-${(this.serial++).toString().padStart(6, '0')}`;
      const file = join(this.dir, `${base}.parquet`);
      await store.copyToParquet(fieldSelect(raw, this.params, 'true', true), file);
      const manifest: SegmentManifest = { format: SEGMENT_FORMAT, ledger_id: this.ledgerId, jobs };
      const tmp = join(this.dir, `.${base}.json.tmp`);
      writeFileSync(tmp, JSON.stringify(manifest));
      renameSync(tmp, join(this.dir, `${base}.json`));
      written.push({ file, jobs });
      jobs = [];
      rows = 0;
    };
    try {
      for (const { row, job_id, result_json } of results) {
        const job = this.byId.get(job_id);
        if (!job) continue;
        if (appender === null) {
          await store.createTable(raw, columns, { temp: true });
          appender = await store.appender(raw);
        }
        const cells: Record<string, CellValue> = { job_id, idx: job.index, result: negativeZeroAsDouble(result_json) };
        this.params.forEach((p, k) => (cells[`p${k}`] = paramCell(job, p)));
        appendRowTo(appender, columns, cells);
        jobs.push([job_id, row]);
        rows += job.case.receivers.ranges_m.length;
        // Commit every few jobs: an open append is held in memory until committed.
        if (jobs.length % FLUSH_EVERY_JOBS === 0) appender.flushSync();
        if (rows >= SEGMENT_ROWS) await finish();
      }
      await finish();
    } finally {
      (appender as Awaited<ReturnType<DuckTableStore['appender']>> | null)?.closeSync();
      await store.conn.run(`DROP TABLE IF EXISTS ${sqlName(raw)}`);
    }
    return written;
  }

  /**
   * Write `fields/part=<n>/data.parquet` under `fieldsDir` from `segments`, partition n holding the jobs
   * n·jobsPerPart … (n+1)·jobsPerPart − 1 by expansion index, rows in index, job and receiver order. With no
   * segment at all, one empty partition keeps `read_parquet('fields/**\/*.parquet')` valid (zero rows). Returns
   * the rows written and the partitions.
   */
  async assemble(store: DuckTableStore, segments: readonly Segment[], jobsPerPart: number, fieldsDir: string): Promise<{ rows: number; parts: number[] }> {
    const filesOf = new Map<number, Set<string>>();
    for (const s of segments) {
      for (const [id] of s.jobs) {
        const part = Math.floor(this.byId.get(id)!.index / jobsPerPart);
        let set = filesOf.get(part);
        if (!set) filesOf.set(part, (set = new Set()));
        set.add(s.file);
      }
    }
    const names = finalNames(this.params).map(sqlName).join(', ');
    let rows = 0;
    const parts = [...filesOf.keys()].sort((a, b) => a - b);
    for (const part of parts) {
      const files = [...filesOf.get(part)!].map(sqlString).join(', ');
      const dir = join(fieldsDir, `part=${part}`);
      mkdirSync(dir, { recursive: true });
      rows += await store.copyToParquet(
        `SELECT ${names} FROM read_parquet([${files}]) WHERE ${IDX} >= ${part * jobsPerPart} AND ${IDX} < ${(part + 1) * jobsPerPart}
         ORDER BY ${IDX}, job_id, ${ORD}`,
        join(dir, 'data.parquet'),
      );
    }
    if (parts.length === 0) {
      // No result yet: one empty partition keeps `read_parquet('fields/**\/*.parquet')` valid (zero rows).
      const raw = 'raw_empty';
      await store.createTable(raw, rawColumns(this.params), { temp: true });
      mkdirSync(join(fieldsDir, 'part=0'), { recursive: true });
      await store.copyToParquet(fieldSelect(raw, this.params, 'false'), join(fieldsDir, 'part=0', 'data.parquet'));
      await store.conn.run(`DROP TABLE ${sqlName(raw)}`);
      parts.push(0);
    }
    return { rows, parts };
  }
}
