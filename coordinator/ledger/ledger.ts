// The durable ledger of a sweep: every job, its status and its result, in one SQLite file (`ledger.sqlite`, WAL
// journal, full sync) in the output folder. A result is in it completely or not at all (one transaction each), and
// numbers come back bit for bit (exact JSON text). Knows storage only: nothing of queues, solvers or Parquet.
import { randomUUID } from 'node:crypto';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import type { Case } from '../../schemas/case.js';
import { UserError } from '../../schemas/errors.js';
import type { JobResult } from '../../schemas/result.js';
import { JOB_STATUSES, type JobStatus, type LedgerJob } from '../../schemas/table-rows.js';
import { toExactJson } from './exact-json.js';
import type { ExpandedJob } from '../sweep/expand.js';

export { JOB_STATUSES, type JobStatus, type LedgerJob } from '../../schemas/table-rows.js';

export interface LedgerOptions {
  /** Milliseconds since the epoch; @defaultValue Date.now */
  readonly nowMs?: () => number;
  /** Fault injection for tests: called inside the result transaction after the result row is written. */
  readonly faultInsideCommit?: (jobId: string) => void;
}

/** A result for a job id the ledger does not hold (a programming or wiring error, never the user's). */
export class UnknownJobError extends Error {
  constructor(jobId: string) {
    super(`ledger: no job ${jobId}; add the job before committing its result`);
    this.name = 'UnknownJobError';
  }
}

export const LEDGER_FILE = 'ledger.sqlite';

/** The ledger file is an SQLite database of some other program. */
class ForeignLedgerError extends UserError {
  constructor(path: string) {
    super(`${path}: not a Loamwave ledger (an SQLite file without its tables); move the file away or use another --out folder`, 'loamwave.ledger.foreign');
  }
}
const LEDGER_FORMAT = '1';
/** Rows fetched per page by `results()`; pages keep memory bounded and the connection free between them. */
const RESULTS_PAGE = 256;

/** A stored result as its JSON text, with its job, the job's index and the result's row in the ledger. */
export interface StoredResultText {
  row: number;
  job_id: string;
  idx: number;
  result_json: string;
}

/** A row of the jobs table: the job schema's fields, with the index and the JSON columns under their SQL names. */
type JobRow = Omit<LedgerJob, 'index' | 'params' | 'case'> & { idx: number; params_json: string; case_json: string };

const SCHEMA_SQL = `
CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS jobs (
  job_id TEXT PRIMARY KEY,
  idx INTEGER NOT NULL,
  params_json TEXT NOT NULL,
  case_json TEXT NOT NULL,
  status TEXT NOT NULL CHECK (status IN (${JOB_STATUSES.map((st) => `'${st}'`).join(', ')})),
  attempts INTEGER NOT NULL DEFAULT 0,
  error TEXT,
  queued_at_ms INTEGER,
  started_at_ms INTEGER,
  finished_at_ms INTEGER,
  design_role TEXT,
  design_sample INTEGER
);
CREATE INDEX IF NOT EXISTS jobs_by_status ON jobs (status, idx);
CREATE INDEX IF NOT EXISTS jobs_by_idx ON jobs (idx, job_id);
-- status's recent finishes without a scan of the job rows (which hold each case's JSON).
CREATE INDEX IF NOT EXISTS jobs_by_finish ON jobs (finished_at_ms, status);
CREATE TABLE IF NOT EXISTS results (
  job_id TEXT PRIMARY KEY REFERENCES jobs (job_id),
  result_json TEXT NOT NULL
);
-- The ledger's revision: one more on every change of a job or a result, so the outputs can record which state
-- they were written from and a rerun with nothing new can leave them alone.
INSERT OR IGNORE INTO meta (key, value) VALUES ('revision', '0');
CREATE TRIGGER IF NOT EXISTS revision_job_insert AFTER INSERT ON jobs
  BEGIN UPDATE meta SET value = CAST(value AS INTEGER) + 1 WHERE key = 'revision'; END;
CREATE TRIGGER IF NOT EXISTS revision_job_update AFTER UPDATE ON jobs
  BEGIN UPDATE meta SET value = CAST(value AS INTEGER) + 1 WHERE key = 'revision'; END;
CREATE TRIGGER IF NOT EXISTS revision_result_insert AFTER INSERT ON results
  BEGIN UPDATE meta SET value = CAST(value AS INTEGER) + 1 WHERE key = 'revision'; END;
CREATE TRIGGER IF NOT EXISTS revision_result_update AFTER UPDATE ON results
  BEGIN UPDATE meta SET value = CAST(value AS INTEGER) + 1 WHERE key = 'revision'; END;
CREATE TRIGGER IF NOT EXISTS revision_result_delete AFTER DELETE ON results
  BEGIN UPDATE meta SET value = CAST(value AS INTEGER) + 1 WHERE key = 'revision'; END;
`;

export class Ledger {
  readonly path: string;
  private readonly db: Database.Database;
  private readonly nowMs: () => number;
  private readonly fault?: (jobId: string) => void;
  private readonly stmt: ReturnType<Ledger['prepareAll']>;

  private constructor(path: string, db: Database.Database, options: LedgerOptions) {
    this.path = path;
    this.db = db;
    this.nowMs = options.nowMs ?? Date.now;
    this.fault = options.faultInsideCommit;
    this.stmt = this.prepareAll();
  }

  /** Open (or create) `<dir>/ledger.sqlite`; the folder is created if missing. */
  static open(dir: string, options: LedgerOptions = {}): Ledger {
    mkdirSync(dir, { recursive: true });
    const path = join(dir, LEDGER_FILE);
    let db: Database.Database;
    try {
      db = new Database(path);
      // WAL: readers never block the single writer; FULL: a commit survives power loss (SQLite docs, PRAGMA synchronous).
      db.pragma('journal_mode = WAL');
      db.pragma('synchronous = FULL');
      db.pragma('busy_timeout = 5000');
      db.pragma('foreign_keys = ON');
      // A database that has tables but none of ours is someone else's file: refuse it instead of adding to it.
      const tables = db.prepare<[], { name: string }>(`SELECT name FROM sqlite_master WHERE type = 'table'`).all().map((t) => t.name);
      if (tables.length > 0 && !(tables.includes('meta') && tables.includes('jobs'))) {
        db.close();
        throw new ForeignLedgerError(path);
      }
      db.exec(SCHEMA_SQL);
    } catch (e) {
      if (e instanceof ForeignLedgerError) throw e;
      const first = String((e as Error).message).split('\n')[0];
      throw new UserError(`${path}: cannot open the ledger (${first}); move the file away or use another --out folder`, 'loamwave.ledger.unreadable');
    }
    // An identity of this ledger file, so that what was written from it (the field segments) is never taken for
    // what another ledger holds; a ledger from before the identity existed gets one now.
    if (db.prepare(`SELECT 1 FROM meta WHERE key = 'ledger_id'`).get() === undefined) {
      db.prepare(`INSERT OR IGNORE INTO meta (key, value) VALUES ('ledger_id', ?)`).run(randomUUID());
    }
    const format = db.prepare<[], { value: string }>(`SELECT value FROM meta WHERE key = 'format'`).get();
    if (format === undefined) db.prepare(`INSERT INTO meta (key, value) VALUES ('format', ?)`).run(LEDGER_FORMAT);
    else if (format.value !== LEDGER_FORMAT) {
      db.close();
      throw new UserError(
        `${path}: ledger format ${format.value}, this loamwave reads format ${LEDGER_FORMAT}; use another --out folder`,
        'loamwave.ledger.format',
      );
    }
    return new Ledger(path, db, options);
  }

  private prepareAll() {
    const db = this.db;
    return {
      insertJob: db.prepare(
        `INSERT OR IGNORE INTO jobs (job_id, idx, params_json, case_json, status, design_role, design_sample)
         VALUES (?, ?, ?, ?, 'pending', ?, ?)`,
      ),
      get: db.prepare<[string], JobRow>(`SELECT * FROM jobs WHERE job_id = ?`),
      revision: db.prepare<[], { value: string }>(`SELECT value FROM meta WHERE key = 'revision'`),
      listAll: db.prepare<[], JobRow>(`SELECT * FROM jobs ORDER BY idx, job_id`),
      listBy: db.prepare<[string], JobRow>(`SELECT * FROM jobs WHERE status = ? ORDER BY idx, job_id`),
      counts: db.prepare<[], { status: JobStatus; n: number }>(`SELECT status, COUNT(*) AS n FROM jobs GROUP BY status`),
      queued: db.prepare(`UPDATE jobs SET status = 'queued', queued_at_ms = ?, error = NULL WHERE job_id = ? AND status <> 'done'`),
      running: db.prepare(
        `UPDATE jobs SET status = 'running', started_at_ms = ?, attempts = attempts + 1 WHERE job_id = ? AND status <> 'done'`,
      ),
      failed: db.prepare(
        `UPDATE jobs SET status = 'failed', error = ?, attempts = MAX(attempts, ?), finished_at_ms = ?
         WHERE job_id = ? AND status <> 'done'`,
      ),
      insertResult: db.prepare(`INSERT OR IGNORE INTO results (job_id, result_json) VALUES (?, ?)`),
      done: db.prepare(
        `UPDATE jobs SET status = 'done', error = NULL, finished_at_ms = COALESCE(finished_at_ms, ?) WHERE job_id = ?`,
      ),
      exists: db.prepare<[string], { status: JobStatus }>(`SELECT status FROM jobs WHERE job_id = ?`),
      reset: db.prepare(`UPDATE jobs SET status = 'pending' WHERE status = 'running'`),
      retryFailed: db.prepare(`UPDATE jobs SET status = 'pending', error = NULL, attempts = 0, finished_at_ms = NULL WHERE status = 'failed'`),
      resetQueued: db.prepare(`UPDATE jobs SET status = 'pending' WHERE status IN ('running', 'queued')`),
      result: db.prepare<[string], { result_json: string }>(`SELECT result_json FROM results WHERE job_id = ?`),
      // one json_extract with several paths parses the text once and gives a JSON array of the values
      summary: db.prepare<[string], { s: string }>(
        `SELECT json_extract(result_json, '$.grid', '$.wall_time_s', '$.solver_version', '$.warnings') AS s FROM results WHERE job_id = ?`,
      ),
      total: db.prepare<[], { n: number }>(`SELECT COUNT(*) AS n FROM jobs`),
      ledgerId: db.prepare<[], { value: string }>(`SELECT value FROM meta WHERE key = 'ledger_id'`),
      resultRows: db.prepare<[], { job_id: string; row: number }>(`SELECT job_id, rowid AS row FROM results`),
      textsAfter: db.prepare<[number, number], StoredResultText>(
        `SELECT results.rowid AS row, results.job_id, jobs.idx, results.result_json FROM results JOIN jobs USING (job_id)
         WHERE results.rowid > ? ORDER BY results.rowid LIMIT ?`,
      ),
      textsOf: db.prepare<[string], StoredResultText>(
        `SELECT results.rowid AS row, results.job_id, jobs.idx, results.result_json FROM results JOIN jobs USING (job_id)
         WHERE results.job_id IN (SELECT value FROM json_each(?)) ORDER BY results.rowid`,
      ),
      finishedSince: db.prepare<[number], { t: number }>(
        `SELECT finished_at_ms AS t FROM jobs INDEXED BY jobs_by_finish WHERE finished_at_ms >= ? AND status IN ('done', 'failed')`,
      ),
      firstFailures: db.prepare<[number], { job_id: string; error: string | null }>(
        `SELECT job_id, error FROM jobs INDEXED BY jobs_by_status WHERE status = 'failed' ORDER BY idx, job_id LIMIT ?`,
      ),
      resultsPage: db.prepare<[number, number, string, number], JobRow & { result_json: string }>(
        `SELECT jobs.*, results.result_json FROM jobs JOIN results USING (job_id)
         WHERE (jobs.idx > ?) OR (jobs.idx = ? AND jobs.job_id > ?)
         ORDER BY jobs.idx, jobs.job_id LIMIT ?`,
      ),
    };
  }

  /** Add jobs not yet in the ledger (insert-or-ignore by job id, in one transaction); returns how many were new. */
  addJobs(jobs: readonly ExpandedJob[]): number {
    return this.db.transaction((list: readonly ExpandedJob[]) => {
      let added = 0;
      for (const j of list) {
        added += this.stmt.insertJob.run(
          j.job_id,
          j.index,
          toExactJson(j.params),
          toExactJson(j.case),
          j.design?.role ?? null,
          j.design?.sample ?? null,
        ).changes;
      }
      return added;
    })(jobs);
  }

  get(jobId: string): LedgerJob | undefined {
    const row = this.stmt.get.get(jobId);
    return row ? toJob(row) : undefined;
  }

  /** Jobs in index order, all or those with one status. */
  list(status?: JobStatus): LedgerJob[] {
    const rows = status === undefined ? this.stmt.listAll.all() : this.stmt.listBy.all(status);
    return rows.map(toJob);
  }

  counts(): Record<JobStatus, number> {
    const out = Object.fromEntries(JOB_STATUSES.map((s) => [s, 0])) as Record<JobStatus, number>;
    for (const { status, n } of this.stmt.counts.all()) out[status] = n;
    return out;
  }

  /** Jobs handed to a queue or pool; a job already done stays done. */
  markQueued(ids: readonly string[]): void {
    const now = this.nowMs();
    this.db.transaction((list: readonly string[]) => {
      for (const id of list) this.stmt.queued.run(now, id);
    })(ids);
  }

  /** A worker started the job: counts one attempt. */
  markRunning(id: string): void {
    this.stmt.running.run(this.nowMs(), id);
  }

  /**
   * Store a result and mark its job done, in one transaction with a full sync: after a crash the result is
   * there completely or not at all. Committing the same job again keeps the first result (the solver is
   * deterministic, so both are the same). Throws NonFiniteNumberError for NaN/±Infinity anywhere in the result.
   */
  commitResult(result: JobResult): void {
    const text = toExactJson(result);
    this.db.transaction(() => {
      if (this.stmt.exists.get(result.job_id) === undefined) throw new UnknownJobError(result.job_id);
      this.stmt.insertResult.run(result.job_id, text);
      this.fault?.(result.job_id);
      this.stmt.done.run(this.nowMs(), result.job_id);
    }).immediate();
  }

  /**
   * Store several results in one transaction (one sync for all): each as `commitResult` would, all or none.
   * For a collector that drains a batch of finished jobs at once.
   */
  commitResults(results: readonly JobResult[]): void {
    const texts = results.map((r) => toExactJson(r));
    this.db.transaction(() => {
      results.forEach((result, k) => {
        if (this.stmt.exists.get(result.job_id) === undefined) throw new UnknownJobError(result.job_id);
        this.stmt.insertResult.run(result.job_id, texts[k]);
        this.fault?.(result.job_id);
        this.stmt.done.run(this.nowMs(), result.job_id);
      });
    }).immediate();
  }

  /** The job failed for good (after `attempts` tries); a job already done is left done. */
  markFailed(id: string, reason: string, attempts: number): void {
    this.stmt.failed.run(reason, attempts, this.nowMs(), id);
  }

  /**
   * Resume after a crash: jobs left `running` go back to `pending` (also `queued` ones, for the local pool, whose
   * queue died with the process). Returns how many jobs were reset.
   */
  resetInterrupted(options: { includeQueued?: boolean } = {}): number {
    return (options.includeQueued ? this.stmt.resetQueued : this.stmt.reset).run().changes;
  }

  /** Failed jobs go back to `pending` with their tries and reason cleared, to be solved again. Returns how many. */
  retryFailed(): number {
    return this.stmt.retryFailed.run().changes;
  }

  /** The stored result of one job, if any. */
  result(jobId: string): JobResult | undefined {
    const row = this.stmt.result.get(jobId);
    return row ? (JSON.parse(row.result_json) as JobResult) : undefined;
  }

  /**
   * Every job with a result, in index order, fetched a page at a time (memory bounded by a page; other calls on
   * this ledger may run between items).
   */
  *results(): Generator<{ job: LedgerJob; result: JobResult }, void, undefined> {
    let idx = -1;
    let id = '';
    for (;;) {
      const page = this.stmt.resultsPage.all(idx, idx, id, RESULTS_PAGE);
      for (const row of page) {
        yield { job: toJob(row), result: JSON.parse(row.result_json) as JobResult };
      }
      if (page.length < RESULTS_PAGE) return;
      const last = page[page.length - 1];
      idx = last.idx;
      id = last.job_id;
    }
  }

  /**
   * A stored result without its receivers (what runs.parquet needs), picked out by SQLite: at hundreds of
   * receivers a job, parsing whole results here was most of the runs table's time.
   */
  resultSummary(jobId: string): Pick<JobResult, 'grid' | 'wall_time_s' | 'solver_version' | 'warnings'> | undefined {
    const row = this.stmt.summary.get(jobId);
    if (!row) return undefined;
    const [grid, wall_time_s, solver_version, warnings] = JSON.parse(row.s) as [JobResult['grid'], number, string, string[]];
    return { grid, wall_time_s, solver_version, warnings };
  }

  /** This ledger's identity (a random id stored in it when it was first opened). */
  id(): string {
    return this.stmt.ledgerId.get()!.value;
  }

  /**
   * The row of each stored result, by job id: a result is written once and never changed (insert-or-ignore), so
   * the pair (job, row) names one result for as long as this ledger lives.
   */
  resultRows(): Map<string, number> {
    return new Map(this.stmt.resultRows.all().map((r) => [r.job_id, r.row]));
  }

  /** Stored results committed after row `afterRow`, as JSON texts, in commit order, a page at a time. */
  *resultTextsAfter(afterRow: number): Generator<StoredResultText, void, undefined> {
    let row = afterRow;
    for (;;) {
      const page = this.stmt.textsAfter.all(row, RESULTS_PAGE);
      yield* page;
      if (page.length < RESULTS_PAGE) return;
      row = page[page.length - 1].row;
    }
  }

  /** The stored results of these jobs (those that have one), as JSON texts, a page of ids at a time. */
  *resultTextsOf(jobIds: readonly string[]): Generator<StoredResultText, void, undefined> {
    for (let k = 0; k < jobIds.length; k += RESULTS_PAGE) {
      yield* this.stmt.textsOf.all(JSON.stringify(jobIds.slice(k, k + RESULTS_PAGE)));
    }
  }

  /** Number of jobs, by a COUNT (no rows loaded). */
  jobCount(): number {
    return this.stmt.total.get()!.n;
  }

  /** Finish times (ms) of the jobs done or failed at or after `sinceMs`. */
  finishedSince(sinceMs: number): number[] {
    return this.stmt.finishedSince.all(sinceMs).map((r) => r.t);
  }

  /** The first `limit` failed jobs in index order, with their errors. */
  firstFailures(limit: number): Array<{ job_id: string; error: string | null }> {
    return this.stmt.firstFailures.all(limit);
  }

  /** The ledger's revision: it changes whenever a job or a result does (triggers in SCHEMA_SQL). */
  revision(): number {
    return Number(this.stmt.revision.get()!.value);
  }

  /** Close the database; safe to call more than once. */
  close(): void {
    if (this.db.open) this.db.close();
  }
}

function toJob(row: JobRow): LedgerJob {
  return {
    job_id: row.job_id,
    index: row.idx,
    params: JSON.parse(row.params_json) as Record<string, number | string>,
    case: JSON.parse(row.case_json) as Case,
    status: row.status,
    attempts: row.attempts,
    error: row.error,
    queued_at_ms: row.queued_at_ms,
    started_at_ms: row.started_at_ms,
    finished_at_ms: row.finished_at_ms,
    design_role: row.design_role,
    design_sample: row.design_sample,
  };
}
