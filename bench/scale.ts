// `npm run bench:scale [-- 100k 1M 10M]`: the output stage at scale, on made-up results inserted straight into a
// ledger (no solving): a full-factorial sweep of 5 frequencies × k conductivities × 4 grid resolutions × 500
// receivers (100 k, 1 M, 10 M field rows = 200, 2,000, 20,000 jobs). Each size runs in child processes, so each peak
// RSS (process.resourceUsage().maxRSS) is that stage's own: filling the ledger, the output stage
// (runs.parquet, fields/, convergence.parquet, sensitivity.parquet), and `loamwave status`.
// The numbers are invented (a 1/d fall with a frequency- and conductivity-dependent loss, and a resolution-dependent
// error that shrinks with the grid): this measures time, memory and file sizes, not physics.
import { spawnSync } from 'node:child_process';
import { once } from 'node:events';
import { isMainThread, Worker } from 'node:worker_threads';
import { mkdtempSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { JobResult } from '../schemas/result.js';
import type { OutputSummary } from '../coordinator/outputs/tables.js';
import { C0 } from '../solver/constants.js';
import { SOLVER_VERSION } from '../solver/version.js';

const HERE = dirname(fileURLToPath(import.meta.url));
const RECEIVERS = 500;
const FREQUENCIES = [16e3, 20e3, 24e3, 28e3, 32e3];
const LEVELS = [8, 12, 16, 24];

function sweepText(fieldRows: number): string {
  const conductivities = Math.max(1, Math.round(fieldRows / (RECEIVERS * FREQUENCIES.length * LEVELS.length)));
  const sigma = Array.from({ length: conductivities }, (_, k) => Number((1e-4 * 10 ** ((4 * k) / Math.max(1, conductivities - 1))).toPrecision(6)));
  const ranges = Array.from({ length: RECEIVERS }, (_, k) => (k + 1) * 1000);
  return [
    '# made-up scale sweep (invented): results are inserted into the ledger, nothing is solved',
    `name: scale-${fieldRows}`,
    'base:',
    '  frequency_hz: 20000',
    '  ground: {model: impedance, segments: [{start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 15}]}',
    '  domain: {range_m: 510000, height_m: 60000}',
    `  receivers: {ranges_m: [${ranges.join(', ')}]}`,
    'vary:',
    `  frequency_hz: {values: [${FREQUENCIES.join(', ')}]}`,
    `  ground.segments[0].conductivity_s_per_m: {values: [${[...new Set(sigma)].join(', ')}]}`,
    `  grid.cells_per_wavelength: {values: [${LEVELS.join(', ')}]}`,
    'resolution_axis: grid.cells_per_wavelength',
    '',
  ].join('\n');
}

/** A made-up result for a job: the shape the worker returns, numbers invented. */
function madeUpResult(jobId: string, frequencyHz: number, sigma: number, cpw: number, ranges: readonly number[]): JobResult {
  const loss = 1e-5 * Math.sqrt(frequencyHz / 2e4) / Math.sqrt(sigma * 100 + 0.01);
  const gridError = 3 / (cpw * cpw);
  return {
    solver_version: SOLVER_VERSION,
    geometry: 'axisymmetric',
    frequency_hz: frequencyHz,
    receivers: ranges.map((r) => {
      const db = 120 - 20 * Math.log10(r / 1000) - loss * r + gridError;
      const amp = 10 ** (db / 20) * 1e-6;
      const phaseDeg = ((((-360 * frequencyHz * r) / C0 - 0.001 * r * loss + gridError + 180) % 360) + 360) % 360 - 180;
      const ph = (phaseDeg * Math.PI) / 180;
      return {
        range_m: r,
        height_m: 0,
        ez: { re: amp * Math.cos(ph), im: amp * Math.sin(ph) },
        e_horizontal: { re: amp * 0.01, im: -amp * 0.02 },
        h: { re: amp / 377, im: amp / 400 },
        ez_db_uv_per_m: db,
        ez_phase_deg: phaseDeg,
      };
    }),
    grid: {
      cell_size_m: C0 / frequencyHz / cpw,
      time_step_s: 1e-6,
      steps: 4000,
      steps_per_period: 50,
      cells_range: 1000,
      cells_height: 100,
      cells_ground: 0,
      cells_total: 100000,
      courant: 0.9,
      memory_bytes: 4_000_000,
      cell_updates: 4e8,
      settled: true,
      settling_change: 1e-5,
    },
    warnings: [],
    job_id: jobId,
    wall_time_s: 1.5,
  };
}

/**
 * Fill the ledger as a run would, a hundred results at a time in longest-first order (finest grid first), and
 * with `live` write the field segments as a run does while its jobs finish (here one after the other, as the
 * time they take is reported apart).
 */
async function childFill(dir: string, live: boolean): Promise<void> {
  const { loadSweep } = await import('../coordinator/sweep/file.js');
  const { expandSweep } = await import('../coordinator/sweep/expand.js');
  const { Ledger } = await import('../coordinator/ledger/ledger.js');
  const { LiveFieldSegments } = await import('../coordinator/outputs/live-segments.js');
  const { sweep, text } = loadSweep(join(dir, 'sweep.yaml'));
  const jobs = expandSweep(sweep, 'sweep.yaml');
  const ledger = Ledger.open(dir);
  ledger.addJobs(jobs);
  const segments = live ? new LiveFieldSegments({ ledger, sweep, text, outDir: join(dir, 'out'), jobs }) : null;
  const cpw = (j: (typeof jobs)[number]) => (j.params as Record<string, number>)['grid.cells_per_wavelength'];
  const order = [...jobs].sort((a, b) => cpw(b) - cpw(a) || a.index - b.index);
  let segmentSeconds = 0;
  for (let k = 0; k < order.length; k += 100) {
    const batch = order.slice(k, k + 100);
    ledger.commitResults(
      batch.map((j) => {
        const p = j.params as Record<string, number>;
        return madeUpResult(j.job_id, p.frequency_hz, p['ground.segments[0].conductivity_s_per_m'], p['grid.cells_per_wavelength'], j.case.receivers.ranges_m);
      }),
    );
    if (segments) {
      const t = performance.now();
      for (const j of batch) segments.jobDone(j.job_id);
      await segments.idle();
      segmentSeconds += (performance.now() - t) / 1000;
    }
  }
  await segments?.close();
  ledger.close();
  process.stdout.write(JSON.stringify({ segmentSeconds, segments: segments?.written ?? 0 }) + '\n');
}

/**
 * A ledger of `jobs` jobs for timing `status` alone: three quarters done (with a one-receiver made-up result, enough
 * for a count), one in twenty failed, the rest pending.
 */
async function childStatusLedger(dir: string): Promise<void> {
  const { loadSweep } = await import('../coordinator/sweep/file.js');
  const { expandSweep } = await import('../coordinator/sweep/expand.js');
  const { Ledger } = await import('../coordinator/ledger/ledger.js');
  const { sweep } = loadSweep(join(dir, 'sweep.yaml'));
  const jobs = expandSweep(sweep, 'sweep.yaml');
  const ledger = Ledger.open(dir);
  ledger.addJobs(jobs);
  const done = jobs.slice(0, Math.floor(jobs.length * 0.75));
  for (let k = 0; k < done.length; k += 500) {
    ledger.commitResults(done.slice(k, k + 500).map((j) => madeUpResult(j.job_id, 2e4, 0.01, 8, [1000])));
  }
  for (const j of jobs.slice(done.length, done.length + Math.floor(jobs.length / 20))) ledger.markFailed(j.job_id, 'made-up failure', 1);
  ledger.close();
}

async function childOutputs(dir: string): Promise<void> {
  const { loadSweep } = await import('../coordinator/sweep/file.js');
  const { Ledger } = await import('../coordinator/ledger/ledger.js');
  const { writeOutputs } = await import('../coordinator/outputs/tables.js');
  const { sweep, text } = loadSweep(join(dir, 'sweep.yaml'));
  const ledger = Ledger.open(dir);
  const t0 = performance.now();
  // each stage's time and peak RSS (sampled every 50 ms; the process's own peak is reported on exit)
  const stageSeconds: Record<string, number> = {};
  const stageRssMiB: Record<string, number> = {};
  let clock = t0;
  let peak = 0;
  let heapPeak = 0;
  let externalPeak = 0;
  const stageHeapMiB: Record<string, [heap: number, external: number]> = {};
  const sampler = setInterval(() => {
    const m = process.memoryUsage();
    peak = Math.max(peak, m.rss);
    heapPeak = Math.max(heapPeak, m.heapTotal);
    externalPeak = Math.max(externalPeak, m.external + m.arrayBuffers);
  }, 50);
  const summary: OutputSummary & { reportBytes?: number } = await writeOutputs(ledger, sweep, text, join(dir, 'out'), {
    onStage: (name) => {
      const now = performance.now();
      stageSeconds[name] = (now - clock) / 1000;
      stageRssMiB[name] = Math.max(peak, process.memoryUsage().rss) / 2 ** 20;
      stageHeapMiB[name] = [heapPeak / 2 ** 20, externalPeak / 2 ** 20];
      clock = now;
      peak = 0;
      heapPeak = 0;
      externalPeak = 0;
    },
  });
  // the report, as `run` writes it after the tables (from the tables just written)
  const { writeReport } = await import('../coordinator/report/write.js');
  const report = await writeReport(join(dir, 'out'));
  const now = performance.now();
  stageSeconds.report = (now - clock) / 1000;
  stageRssMiB.report = Math.max(peak, process.memoryUsage().rss) / 2 ** 20;
  clearInterval(sampler);
  const seconds = (now - t0) / 1000;
  summary.reportBytes = report.bytes;
  ledger.close();
  process.stdout.write(JSON.stringify({ seconds, summary, stageSeconds, stageRssMiB, stageHeapMiB }) + '\n');
}

interface ChildRun {
  seconds: number;
  maxRssMiB: number;
  stdout: string;
}

function child(args: string[]): ChildRun {
  const t0 = performance.now();
  // The child reports its own peak RSS on exit (kB in resourceUsage), after whatever it printed.
  const r = spawnSync(process.execPath, [fileURLToPath(import.meta.url), ...args], { encoding: 'utf8', maxBuffer: 1 << 26 });
  const seconds = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`child ${args.join(' ')} failed (${r.status}): ${r.stderr}`);
  const lines = r.stdout.trim().split('\n');
  const rss = JSON.parse(lines.pop()!) as { maxRSSkB: number };
  return { seconds, maxRssMiB: rss.maxRSSkB / 1024, stdout: lines.join('\n') };
}

function bytesUnder(path: string): number {
  const s = statSync(path);
  if (!s.isDirectory()) return s.size;
  return readdirSync(path).reduce((n, f) => n + bytesUnder(join(path, f)), 0);
}

function statusChild(dir: string): ChildRun {
  const cli = join(HERE, '..', '..', 'bin', 'loamwave.js');
  const t0 = performance.now();
  const r = spawnSync(process.execPath, [cli, 'status', join(dir, 'sweep.yaml'), '--out', dir, '--json'], { encoding: 'utf8' });
  const seconds = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`status failed (${r.status}): ${r.stderr}`);
  return { seconds, maxRssMiB: Number.NaN, stdout: r.stdout };
}

/** Seconds of `loamwave --version`: the command line's own start-up, for comparison. */
function versionTime(): number {
  const t0 = performance.now();
  spawnSync(process.execPath, [join(HERE, '..', '..', 'bin', 'loamwave.js'), '--version'], { encoding: 'utf8' });
  return (performance.now() - t0) / 1000;
}

const MiB = 2 ** 20;
const fmt = (n: number, d = 1) => n.toFixed(d);

async function parent(sizes: string[]): Promise<void> {
  const parse = (s: string) => {
    const m = /^(\d+(?:\.\d+)?)([kKmM]?)$/.exec(s);
    if (!m) throw new Error(`bench:scale: size ${s}: give field rows as 100k, 1M or a number`);
    return Math.round(Number(m[1]) * (m[2].toLowerCase() === 'k' ? 1e3 : m[2].toLowerCase() === 'm' ? 1e6 : 1));
  };
  console.log(`bench:scale, ${new Date().toISOString()}, node ${process.version}; targets: output stage peak RSS <= 1024 MiB, <= 30 s after the last job at 1 M rows, report <= 5 MB, status <= 1 s at 20,000 jobs`);
  {
    // status at 20,000 jobs (the 10 M-row sweep's job count), on a ledger of jobs without their field rows.
    const dir = mkdtempSync(join(tmpdir(), 'loamwave-scale-status-'));
    try {
      writeFileSync(join(dir, 'sweep.yaml'), sweepText(10_000_000));
      child(['--status-ledger', dir]);
      const times = [0, 1, 2].map(() => statusChild(dir).seconds).sort((a, b) => a - b);
      const bare = [0, 1, 2].map(() => versionTime()).sort((a, b) => a - b);
      console.log(`status at 20,000 jobs: ${fmt(times[1], 2)} s median of 3 (whole command; \`loamwave --version\` alone takes ${fmt(bare[1], 2)} s)`);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }
  for (const size of sizes.map(parse)) {
    const dir = mkdtempSync(join(tmpdir(), 'loamwave-scale-'));
    try {
      writeFileSync(join(dir, 'sweep.yaml'), sweepText(size));
      const fill = child(['--fill', dir]);
      const live = JSON.parse(fill.stdout) as { segmentSeconds: number; segments: number };
      const ledgerBytes = bytesUnder(join(dir, 'ledger.sqlite'));
      const out = child(['--outputs', dir]);
      const { seconds, summary, stageSeconds, stageRssMiB } = JSON.parse(out.stdout) as { seconds: number; stageSeconds: Record<string, number>; stageRssMiB: Record<string, number>; summary: { runs: number; fieldRows: number; parts: number; convergenceRows: number | null; sensitivityRows: number | null; reportBytes: number } };
      const o = join(dir, 'out');
      const status = statusChild(dir);
      console.log(
        [
          `${summary.fieldRows} field rows (${summary.runs} jobs x ${RECEIVERS} receivers):`,
          `  ledger fill ${fmt(fill.seconds)} s, of which ${fmt(live.segmentSeconds)} s writing ${live.segments} field segments as a run does while its jobs run (peak RSS ${fmt(fill.maxRssMiB, 0)} MiB); ledger ${fmt(ledgerBytes / MiB)} MiB = ${fmt(ledgerBytes / summary.fieldRows, 0)} bytes per field row`,
          `  after the last job (tables and report): ${fmt(seconds)} s (child ${fmt(out.seconds)} s), peak RSS ${fmt(out.maxRssMiB, 0)} MiB; ` +
            Object.entries(stageSeconds).map(([k, v]) => `${k} ${fmt(v)} s (peak ~${fmt(stageRssMiB[k], 0)} MiB)`).join(', '),
          `  runs.parquet ${fmt(bytesUnder(join(o, 'runs.parquet')) / MiB, 2)} MiB; fields/ ${fmt(bytesUnder(join(o, 'fields')) / MiB)} MiB in ${summary.parts} parts` +
            ` (${fmt(bytesUnder(join(o, 'fields')) / summary.fieldRows, 1)} bytes per row)`,
          `  convergence.parquet ${summary.convergenceRows} rows, ${fmt(bytesUnder(join(o, 'convergence.parquet')) / MiB, 2)} MiB; sensitivity.parquet ${summary.sensitivityRows} rows, ${fmt(bytesUnder(join(o, 'sensitivity.parquet')) / MiB, 2)} MiB`,
          `  report.html ${fmt(summary.reportBytes / MiB, 2)} MiB`,
          `  status ${fmt(status.seconds, 2)} s (whole command, node start-up included)`,
        ].join('\n'),
      );
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }
}

const [flag, arg, size] = process.argv.slice(2);
if (flag === '--outputs' && isMainThread) {
  // The output stage as `run` and `collect` run it: in a thread whose heap is capped (commands/output-thread.ts);
  // this process's peak RSS, reported after, counts that thread too.
  const { outputHeapMb } = await import('../coordinator/commands/finish-outputs.js');
  const worker = new Worker(new URL(import.meta.url), { argv: process.argv.slice(2), resourceLimits: { maxOldGenerationSizeMb: outputHeapMb() } });
  const [code] = (await once(worker, 'exit')) as [number];
  if (code !== 0) process.exit(code);
  process.stdout.write(JSON.stringify({ maxRSSkB: process.resourceUsage().maxRSS }) + '\n');
} else if (flag === '--outputs') {
  await childOutputs(arg);
} else if (flag === '--sweep') {
  // for profiling one stage by hand: `--sweep DIR ROWS`, then `--fill DIR`, then `node --cpu-prof … --outputs DIR`
  writeFileSync(join(arg, 'sweep.yaml'), sweepText(Number(size)));
} else if (flag === '--fill' || flag === '--status-ledger') {
  await (flag === '--fill' ? childFill(arg, size !== 'no-live') : childStatusLedger(arg));
  process.stdout.write(JSON.stringify({ maxRSSkB: process.resourceUsage().maxRSS }) + '\n');
} else {
  await parent(process.argv.slice(2).length > 0 ? process.argv.slice(2) : ['100k', '1M']);
}
