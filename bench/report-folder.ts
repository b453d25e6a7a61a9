// The made-up tables of bench/large-sweep-tables.ts written out as an output folder (runs.parquet, fields/,
// sensitivity.parquet, the sweep copy) through DuckDB, and the child process that builds report.html from such a
// folder and says how much memory it took: bench/report-size.ts measures the report stage as `loamwave report` runs it
// (reading the Parquet files, assembling, rendering), in a process of its own so the peak RSS is the build's alone.
import { spawnSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { DuckDBInstance } from '@duckdb/node-api';
import type { FolderTables } from '../coordinator/analysis/read-tables.js';
import { writeReport } from '../coordinator/report/write.js';

function sqlText(s: string): string {
  return `'${s.replace(/'/g, "''")}'`;
}

/** Write `tables` (field rows as records) into `dir` as an output folder the report reads. */
export async function writeReportFolder(dir: string, tables: FolderTables): Promise<void> {
  mkdirSync(join(dir, 'fields', 'part=0'), { recursive: true });
  writeFileSync(join(dir, 'sweep.json'), JSON.stringify(tables.sweep));
  const runsJson = join(dir, 'runs.ndjson');
  writeFileSync(runsJson, tables.runs.map((r) => JSON.stringify(r)).join('\n') + '\n');
  const sensJson = join(dir, 'sensitivity.ndjson');
  writeFileSync(sensJson, (tables.sensitivity ?? []).map((r) => JSON.stringify(r)).join('\n') + '\n');
  const db = await DuckDBInstance.create(':memory:');
  const conn = await db.connect();
  try {
    await conn.run(`COPY (SELECT * FROM read_json_auto(${sqlText(runsJson)})) TO ${sqlText(join(dir, 'runs.parquet'))} (FORMAT parquet)`);
    if ((tables.sensitivity ?? []).length > 0) {
      await conn.run(`COPY (SELECT * FROM read_json_auto(${sqlText(sensJson)})) TO ${sqlText(join(dir, 'sensitivity.parquet'))} (FORMAT parquet)`);
    }
    await conn.run('CREATE TABLE f (job_id VARCHAR, range_m DOUBLE, height_m DOUBLE, ez_db_uv_per_m DOUBLE, ez_phase_deg DOUBLE)');
    const app = await conn.createAppender('f');
    for (const r of tables.fields) {
      app.appendVarchar(r.job_id);
      app.appendDouble(r.range_m);
      app.appendDouble(r.height_m);
      app.appendDouble(r.ez_db_uv_per_m);
      app.appendDouble(r.ez_phase_deg);
      app.endRow();
    }
    app.flushSync();
    app.closeSync();
    await conn.run(`COPY f TO ${sqlText(join(dir, 'fields', 'part=0', 'data.parquet'))} (FORMAT parquet, COMPRESSION zstd)`);
  } finally {
    conn.closeSync();
    db.closeSync();
  }
}

export interface ReportBuildResult {
  /** Seconds from reading the folder to report.html written. */
  buildS: number;
  bytes: number;
  /** Peak resident set of the child process, bytes (process.resourceUsage().maxRSS). */
  peakRssBytes: number;
}

/** Build `dir`/report.html in a child process; its time and peak RSS. */
export function buildReportInChild(dir: string): ReportBuildResult {
  const r = spawnSync(process.execPath, [fileURLToPath(import.meta.url), dir], { encoding: 'utf8', maxBuffer: 1 << 20 });
  if (r.status !== 0) throw new Error(`report build child failed (${r.status}): ${(r.stderr || '').split('\n')[0]}`);
  return JSON.parse(r.stdout.trim().split('\n').pop()!) as ReportBuildResult;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const t0 = process.hrtime.bigint();
  writeReport(process.argv[2])
    .then(({ bytes }) => {
      const buildS = Number(process.hrtime.bigint() - t0) / 1e9;
      process.stdout.write(`${JSON.stringify({ buildS, bytes, peakRssBytes: process.resourceUsage().maxRSS * 1024 })}\n`);
    })
    .catch((e) => {
      process.stderr.write(`error: ${(e as Error).message}\n`);
      process.exitCode = 70;
    });
}
