// Field rows written while the jobs run. The dispatcher (local pool or queue collector) says when a job is done;
// once SEGMENT_ROWS field rows are done and in no segment yet, they are written as segments in the background,
// one write at a time, by a DuckDB on one thread (the solver threads keep the cores). The outputs written at the
// end then have only the jobs finished since the last segment to turn into rows. A failure here costs the run
// nothing: one warning line, and the final write writes what is missing from the ledger.
import { mkdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import type { Ledger } from '../ledger/ledger.js';
import type { ExpandedJob } from '../sweep/expand.js';
import type { Sweep } from '../../schemas/sweep.js';
import type { FieldSegments } from './fields.js';
import type { DuckTableStore } from './parquet.js';
import { SEGMENT_ROWS } from './segment-rows.js';

export interface LiveSegmentsOptions {
  /** Field rows done and unwritten that start a write. @defaultValue SEGMENT_ROWS */
  readonly rowsPerWrite?: number;
  /** Where a warning goes. @defaultValue stderr */
  readonly warn?: (line: string) => void;
}

export class LiveFieldSegments {
  private readonly byId: Map<string, ExpandedJob>;
  private segments: FieldSegments | null = null;
  private store: DuckTableStore | null = null;
  private readonly covered = new Set<string>();
  private afterRow = 0;
  private pendingRows = 0;
  private writing: Promise<void> | null = null;
  private failed = false;
  private closed = false;
  /** Segments written by this writer (for tests and the benches). */
  written = 0;

  constructor(
    private readonly run: { readonly ledger: Ledger; readonly sweep: Sweep; readonly text: string; readonly outDir: string; readonly jobs: readonly ExpandedJob[] },
    private readonly options: LiveSegmentsOptions = {},
  ) {
    this.byId = new Map(run.jobs.map((j) => [j.job_id, j]));
  }

  /** A job's result is in the ledger: count its rows, and start a write when enough are waiting. */
  jobDone(jobId: string): void {
    const job = this.byId.get(jobId);
    if (!job || this.failed || this.closed) return;
    this.pendingRows += job.case.receivers.ranges_m.length;
    if (this.pendingRows >= (this.options.rowsPerWrite ?? SEGMENT_ROWS) && this.writing === null) {
      this.pendingRows = 0;
      this.writing = this.writeNow().finally(() => (this.writing = null));
    }
  }

  /** Resolves when no write is in progress. */
  async idle(): Promise<void> {
    await this.writing;
  }

  /** Wait for a write in progress, then let the DuckDB go; what is left is for the final write. */
  async close(): Promise<void> {
    this.closed = true;
    await this.writing;
    if (this.store) {
      this.store.close();
      rmSync(this.workDir(), { recursive: true, force: true });
      this.store = null;
    }
  }

  private workDir(): string {
    return join(this.run.outDir, `.loamwave-work-${process.pid}`);
  }

  private async writeNow(): Promise<void> {
    try {
      if (this.segments === null) {
        // loaded only now: a sweep too small for a segment never loads DuckDB while it runs
        const [{ paramColumns }, { DuckTableStore }, { FieldSegments }] = await Promise.all([import('./tables.js'), import('./parquet.js'), import('./fields.js')]);
        const segments = new FieldSegments(this.run.outDir, this.run.text, this.byId, paramColumns(this.run.jobs, this.run.sweep), this.run.ledger.id());
        for (const s of segments.scan(this.run.ledger.resultRows())) {
          for (const [id, row] of s.jobs) {
            this.covered.add(id);
            this.afterRow = Math.max(this.afterRow, row);
          }
        }
        mkdirSync(this.workDir(), { recursive: true });
        this.store = await DuckTableStore.open(this.workDir(), { memoryLimit: '128MB', threads: 1 });
        this.segments = segments;
      }
      const fresh = this.run.ledger.resultTextsAfter(this.afterRow);
      const covered = this.covered;
      const uncovered = (function* () {
        for (const r of fresh) if (!covered.has(r.job_id)) yield r;
      })();
      for (const s of await this.segments.write(this.store!, uncovered)) {
        for (const [id, row] of s.jobs) {
          this.covered.add(id);
          this.afterRow = Math.max(this.afterRow, row);
        }
        this.written++;
      }
    } catch (e) {
      this.failed = true;
      const line = String((e as Error)?.message ?? e).split('\n')[0];
      (this.options.warn ?? ((l: string) => process.stderr.write(`${l}\n`)))(
        `warning: field rows not written ahead of the end (${line}); the outputs write them from the ledger at the end`,
      );
    }
  }
}
