// The fields/ table written while the jobs run: segments of finished jobs, assembled at the end. Whatever order the
// jobs finish in and however the rows were split into segments, fields/ holds the rows a write from the ledger
// alone gives, in the same order (read back with DuckDB, an independent Parquet reader); a segment that no longer
// describes the ledger (another ledger, a crash between its two files) is never used.
import { mkdtempSync, readdirSync, rmSync, unlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance, type DuckDBConnection } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { JobResult } from '../schemas/result.js';
import { solve } from '../solver/index.js';
import { Ledger } from '../coordinator/ledger/ledger.js';
import { writeOutputs } from '../coordinator/outputs/tables.js';
import { SEGMENTS_DIR } from '../coordinator/outputs/fields.js';
import { LiveFieldSegments } from '../coordinator/outputs/live-segments.js';
import { expandSweep, type ExpandedJob } from '../coordinator/sweep/expand.js';
import { parseSweep, parseSweepText } from '../coordinator/sweep/file.js';

const SWEEP_TEXT = `# a small 20-24 kHz study over three grounds (invented)
name: segments-test
base:
  frequency_hz: 20000
  ground: {model: impedance, segments: [{start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30}]}
  domain: {range_m: 60000, height_m: 20000}
  grid: {cells_per_wavelength: 8}
  receivers: {ranges_m: [10000, 25000, 40000]}
vary:
  frequency_hz: {values: [20000, 24000]}
  ground.segments[0].conductivity_s_per_m: {values: [0.003, 0.01, 5]}
`;

const dirs: string[] = [];
let db: DuckDBInstance;
let conn: DuckDBConnection;
const sweep = parseSweep(parseSweepText(SWEEP_TEXT, 'sweep.yaml'), 'sweep.yaml');
const jobs = expandSweep(sweep, 'sweep.yaml');
const results = new Map<string, JobResult>();

beforeAll(async () => {
  db = await DuckDBInstance.create(':memory:');
  conn = await db.connect();
  // The real solver on tiny cases (8 cells per wavelength, 60 km x 20 km): well under a second each.
  for (const j of jobs) results.set(j.job_id, { ...solve(j.case), job_id: j.job_id, wall_time_s: 0.25 });
});
afterAll(() => {
  conn.closeSync();
  db.closeSync();
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

function freshDir(): string {
  const d = mkdtempSync(join(tmpdir(), 'loamwave-segments-'));
  dirs.push(d);
  return d;
}

/** Every fields/ row as DuckDB reads the files, in file order, with the partition each came from. */
async function fieldRows(out: string): Promise<unknown[][]> {
  const r = await conn.runAndReadAll(`SELECT * FROM read_parquet('${out}/fields/**/*.parquet', hive_partitioning = true, filename = true)`);
  return r.getRowsJS().map((row) => row.map((v) => (typeof v === 'string' && v.startsWith(out) ? v.slice(out.length) : v)));
}

function segmentFiles(out: string): string[] {
  const root = join(out, SEGMENTS_DIR);
  return readdirSync(root).flatMap((k) => readdirSync(join(root, k)).map((f) => join(root, k, f)));
}

/** A ledger in `out` holding `done` (committed in that order), with the live writer told after each commit. */
async function runWithLiveSegments(out: string, done: readonly ExpandedJob[], rowsPerWrite: number): Promise<{ ledger: Ledger; written: number }> {
  const ledger = Ledger.open(out);
  ledger.addJobs(jobs);
  const live = new LiveFieldSegments({ ledger, sweep, text: SWEEP_TEXT, outDir: out, jobs }, { rowsPerWrite, warn: (l) => expect.fail(l) });
  for (const j of done) {
    ledger.commitResult(results.get(j.job_id)!);
    live.jobDone(j.job_id);
    await live.idle();
  }
  await live.close();
  return { ledger, written: live.written };
}

describe('field segments', () => {
  it('when jobs finish in any order and are written ahead in segments then fields/ holds exactly the rows of a write from the ledger alone', async () => {
    const reference = freshDir();
    const plainLedger = Ledger.open(reference);
    plainLedger.addJobs(jobs);
    for (const j of jobs) plainLedger.commitResult(results.get(j.job_id)!);
    // small partitions, so that several segments feed each partition and each segment several partitions
    await writeOutputs(plainLedger, sweep, SWEEP_TEXT, reference, { jobs, fieldRowsPerFile: 6 });
    plainLedger.close();
    const expected = await fieldRows(reference);
    expect(expected).toHaveLength(jobs.length * 3);

    const out = freshDir();
    const shuffled = [jobs[4], jobs[1], jobs[5], jobs[0], jobs[3], jobs[2]];
    // a write every second job: three segments of two jobs, none in index order
    const { ledger, written } = await runWithLiveSegments(out, shuffled, 6);
    expect(written).toBe(3);
    const before = segmentFiles(out).sort();
    await writeOutputs(ledger, sweep, SWEEP_TEXT, out, { jobs, fieldRowsPerFile: 6 });
    // every job was in a segment already: the final write wrote none
    expect(segmentFiles(out).sort()).toEqual(before);
    expect(await fieldRows(out)).toEqual(expected);
    ledger.close();
  });

  it('when some jobs finish after the last segment then the final write adds only those', async () => {
    const out = freshDir();
    const { ledger, written } = await runWithLiveSegments(out, jobs.slice(0, 4), 12);
    expect(written).toBe(1);
    for (const j of jobs.slice(4)) ledger.commitResult(results.get(j.job_id)!);
    await writeOutputs(ledger, sweep, SWEEP_TEXT, out, { jobs });
    // two manifests and two Parquet files: the one written ahead and the final write's
    expect(segmentFiles(out).filter((f) => f.endsWith('.json'))).toHaveLength(2);
    const got = await conn.runAndReadAll(`SELECT job_id, count(*) AS n FROM read_parquet('${out}/fields/**/*.parquet') GROUP BY job_id ORDER BY job_id`);
    expect(got.getRowsJS()).toEqual(jobs.map((j) => j.job_id).sort().map((id) => [id, 3n]));
    ledger.close();
  });

  it('when the ledger is replaced by another then segments written from the old one are removed, not used', async () => {
    const out = freshDir();
    const { ledger } = await runWithLiveSegments(out, jobs, 6);
    ledger.close();
    for (const f of readdirSync(out)) if (f.startsWith('ledger.sqlite')) unlinkSync(join(out, f));
    // a new ledger in the same folder: same jobs, only two results
    const fresh = Ledger.open(out);
    fresh.addJobs(jobs);
    for (const j of jobs.slice(0, 2)) fresh.commitResult(results.get(j.job_id)!);
    await writeOutputs(fresh, sweep, SWEEP_TEXT, out, { jobs });
    const got = await conn.runAndReadAll(`SELECT DISTINCT job_id FROM read_parquet('${out}/fields/**/*.parquet') ORDER BY job_id`);
    expect(got.getRowsJS().map((r) => r[0])).toEqual(jobs.slice(0, 2).map((j) => j.job_id).sort());
    expect(segmentFiles(out).filter((f) => f.endsWith('.json'))).toHaveLength(1);
    fresh.close();
  });

  it('when a segment lost its manifest (a crash between its two files) then it is removed and its jobs are written again', async () => {
    const out = freshDir();
    const { ledger } = await runWithLiveSegments(out, jobs, 6);
    const manifests = segmentFiles(out).filter((f) => f.endsWith('.json'));
    expect(manifests).toHaveLength(3);
    unlinkSync(manifests[1]);
    await writeOutputs(ledger, sweep, SWEEP_TEXT, out, { jobs });
    expect(segmentFiles(out).filter((f) => f.endsWith('.parquet'))).toHaveLength(3);
    const got = await conn.runAndReadAll(`SELECT count(*), count(DISTINCT job_id) FROM read_parquet('${out}/fields/**/*.parquet')`);
    expect(got.getRowsJS()).toEqual([[18n, 6n]]);
    ledger.close();
  });
});
