// A full disk while the outputs are rewritten: the output folder sits on a small tmpfs (mounted here when the tests
// run as root, as in CI; skipped otherwise), filled up before the second write. The previous tables must survive
// unchanged and readable (DuckDB reads them back), and the error must be one line naming the folder and the cause.
// The ENOSPC behaviour itself is POSIX's (write(2): "ENOSPC: the device containing the file has no room").
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statfsSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { solve } from '../solver/index.js';
import { Ledger } from '../coordinator/ledger/ledger.js';
import { writeOutputs } from '../coordinator/outputs/tables.js';
import { expandSweep } from '../coordinator/sweep/expand.js';
import { parseSweep, parseSweepText } from '../coordinator/sweep/file.js';
import { UserError } from '../schemas/errors.js';

const SWEEP_TEXT = `# a small 20-24 kHz study over one ground (invented)
name: disk-full-test
base:
  frequency_hz: 20000
  ground: {model: impedance, segments: [{start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 30}]}
  domain: {range_m: 60000, height_m: 20000}
  grid: {cells_per_wavelength: 8}
  receivers: {ranges_m: [10000, 25000, 40000]}
vary:
  frequency_hz: {values: [20000, 22000, 24000]}
`;

const root = mkdtempSync(join(tmpdir(), 'loamwave-disk-full-'));
const mountPoint = join(root, 'small-disk');
let mounted = false;

beforeAll(() => {
  mkdirSync(mountPoint);
  if (process.getuid?.() !== 0) return;
  try {
    // 4 MiB: room for the first write's tables and DuckDB's scratch database, not for a second write once filled.
    execFileSync('mount', ['-t', 'tmpfs', '-o', 'size=4m', 'tmpfs', mountPoint], { stdio: 'ignore' });
    mounted = true;
  } catch {
    mounted = false;
  }
});

afterAll(() => {
  if (mounted) execFileSync('umount', [mountPoint], { stdio: 'ignore' });
  rmSync(root, { recursive: true, force: true });
});

/** Every file under `dir` (but the filler) with its bytes, to compare before and after. */
function snapshot(dir: string, prefix = ''): Record<string, string> {
  const out: Record<string, string> = {};
  for (const name of readdirSync(dir)) {
    if (name === 'filler') continue;
    const path = join(dir, name);
    if (statSync(path).isDirectory()) Object.assign(out, snapshot(path, `${prefix}${name}/`));
    else out[`${prefix}${name}`] = readFileSync(path).toString('base64');
  }
  return out;
}

describe('outputs on a full disk', () => {
  it('when the disk fills up during a rewrite then the old tables survive and the error is one line', async (ctx) => {
    if (!mounted) ctx.skip();
    const sweep = parseSweep(parseSweepText(SWEEP_TEXT, 'sweep.yaml'), 'sweep.yaml');
    const jobs = expandSweep(sweep, 'sweep.yaml');
    const ledgerDir = join(root, 'ledger');
    const ledger = Ledger.open(ledgerDir);
    try {
      ledger.addJobs(jobs);
      ledger.commitResult({ ...solve(jobs[0].case), job_id: jobs[0].job_id, wall_time_s: 0.1 });
      const out = join(mountPoint, 'out');
      await writeOutputs(ledger, sweep, SWEEP_TEXT, out);
      const before = snapshot(out);
      expect(Object.keys(before)).toContain('fields/part=0/data.parquet');

      // Fill the disk, leaving 16 KiB: less than one block of DuckDB's scratch database (256 KiB, DuckDB docs,
      // "Storage": the default block size).
      const fs = statfsSync(mountPoint);
      writeFileSync(join(out, 'filler'), Buffer.alloc(Math.max(0, fs.bavail * fs.bsize - 16 * 1024)));
      ledger.commitResult({ ...solve(jobs[1].case), job_id: jobs[1].job_id, wall_time_s: 0.1 });

      const error = await writeOutputs(ledger, sweep, SWEEP_TEXT, out).then(
        () => null,
        (e: unknown) => e as Error,
      );
      expect(error).toBeInstanceOf(UserError);
      expect(error!.message.split('\n')).toHaveLength(1);
      expect(error!.message).toMatch(/outputs not written, the disk is full .*the previous tables are unchanged/);
      // Nothing half-written: the same files, byte for byte, and no staging or temporary file left.
      expect(snapshot(out)).toEqual(before);

      // The old tables still read (DuckDB, an independent reader): one job's three receivers.
      rmSync(join(out, 'filler'));
      const db = await DuckDBInstance.create(':memory:');
      const conn = await db.connect();
      const n = (await conn.runAndReadAll(`SELECT count(*) AS n FROM read_parquet('${out}/fields/**/*.parquet')`)).getRowObjectsJS()[0].n;
      const runs = (await conn.runAndReadAll(`SELECT count(*) FILTER (WHERE status = 'done') AS n FROM read_parquet('${out}/runs.parquet')`)).getRowObjectsJS()[0].n;
      conn.closeSync();
      db.closeSync();
      expect(n).toBe(3n);
      expect(runs).toBe(1n);
    } finally {
      ledger.close();
    }
  });
});
