// `loamwave plan SWEEP`: validate a sweep, count its jobs and duplicates, and estimate cells, steps, memory,
// core-hours and the wall time on N workers before anything runs; refuse a sweep whose largest job exceeds the
// memory cap.
import { availableParallelism } from 'node:os';
import { basename } from 'node:path';
import { Option, type Command } from 'commander';
import { UserError } from '../../schemas/errors.js';
import type { SweepPlan } from '../sweep/plan.js';
import { integerOption, memoryOption, mibToBytes } from './options.js';

const GIB = 1024 ** 3;
/** Jobs listed in the readable table; `--json` lists all. */
const TABLE_JOBS = 12;

interface PlanOptions {
  json?: boolean;
  workers?: number;
  maxMemoryMib?: number;
  remeasure?: boolean;
}

export function registerPlan(program: Command): void {
  program
    .command('plan')
    .description('validate a sweep and estimate its jobs, memory, core-hours and wall time before running it')
    .argument('<sweep>', 'sweep file (.yaml or .json)')
    .option('--json', 'print the plan as JSON (every job listed)')
    .addOption(new Option('--workers <n>', 'workers the sweep will run on, for the wall-time estimate (default: cores here)').argParser(integerOption(1, 1_000_000)))
    .addOption(memoryOption(''))
    .option('--remeasure', 'measure the solver speed on this machine again instead of using the cached value')
    .action(async (sweepPath: string, opts: PlanOptions) => {
      const [{ defaultMemoryCapBytes }, { kernelSpeed, runOverhead }, { expandSweepDetailed }, { loadSweep }, { describeJob, planSweep }] = await Promise.all([
        import('../../worker/run-case.js'),
        import('../sweep/kernel-speed.js'),
        import('../sweep/expand.js'),
        import('../sweep/file.js'),
        import('../sweep/plan.js'),
      ]);
      const workers = opts.workers ?? availableParallelism();
      const capBytes = opts.maxMemoryMib === undefined ? defaultMemoryCapBytes(1) : mibToBytes(opts.maxMemoryMib);
      const { sweep, path } = loadSweep(sweepPath);
      const source = basename(path);
      const expansion = expandSweepDetailed(sweep, source);
      const speed = kernelSpeed({ remeasure: opts.remeasure });
      const overhead = runOverhead();
      const plan = planSweep(expansion, workers, speed, capBytes, overhead);
      if (opts.json) {
        const out = {
          sweep: sweep.name,
          design: sweep.design.kind,
          resolution_axis: sweep.resolution_axis ?? null,
          kernel: speed,
          ...plan,
          duplicate_points: expansion.duplicates,
        };
        process.stdout.write(JSON.stringify(out, null, 2) + '\n');
      } else {
        process.stdout.write(renderPlan(sweep.name, sweep.design.kind, sweep.resolution_axis, plan, speed.cached, describeJob, overhead.runs));
      }
      if (!plan.fits) {
        const big = plan.per_job.find((p) => p.index === plan.largest_memory_job)!;
        throw new UserError(
          `${source}: ${describeJob(big)} needs ${gib(big.memory_bytes)} GiB, more than the cap of ${gib(capBytes)} GiB; ` +
            'coarsen grid.cells_per_wavelength, shrink the domain, or raise --max-memory-mib',
          'loamwave.plan.too_large',
        );
      }
    });
}

function gib(bytes: number): string {
  return (bytes / GIB).toPrecision(3);
}

/** 1 234 567 → "1.23 M"; small counts as they are. */
function count(n: number): string {
  if (n >= 1e9) return `${(n / 1e9).toPrecision(3)} G`;
  if (n >= 1e6) return `${(n / 1e6).toPrecision(3)} M`;
  if (n >= 1e4) return `${(n / 1e3).toPrecision(3)} k`;
  return String(n);
}

function bytes(b: number): string {
  if (b >= GIB) return `${(b / GIB).toPrecision(3)} GiB`;
  return `${(b / 1024 ** 2).toPrecision(3)} MiB`;
}

/** Hours as "2 h 05 min", "12 min", "40 s". */
export function duration(hours: number): string {
  const s = hours * 3600;
  if (s < 60) return `${s.toPrecision(2)} s`;
  if (s < 3600) return `${Math.round(s / 60)} min`;
  const h = Math.floor(s / 3600);
  return `${h} h ${String(Math.round((s - h * 3600) / 60)).padStart(2, '0')} min`;
}

function renderPlan(
  name: string,
  design: string,
  axis: string | undefined,
  p: SweepPlan,
  cached: boolean,
  describeJob: (j: SweepPlan['per_job'][number]) => string,
  overheadRuns: number,
): string {
  const lines: string[] = [];
  const dup = p.duplicates > 0 ? `, ${p.duplicates} duplicate point(s) collapsed into earlier jobs` : ', no duplicates';
  lines.push(`sweep ${name}: ${p.design_points} design point(s), ${p.jobs} job(s)${dup}`);
  lines.push(`design ${design}${axis ? `; resolution axis ${axis}` : ''}`);
  lines.push('');
  const shown = [...p.per_job].sort((a, b) => b.cell_updates - a.cell_updates || a.index - b.index).slice(0, TABLE_JOBS);
  const rows = [['job', 'cells', 'steps', 'memory', 'core-h', 'parameters']];
  for (const j of shown) {
    rows.push([String(j.index), count(j.cells_total), count(j.steps), bytes(j.memory_bytes), j.core_hours.toPrecision(2), describeJob(j).replace(/^job \d+ \((.*)\)$/, '$1')]);
  }
  const widths = rows[0].map((_, c) => Math.max(...rows.map((r) => r[c].length)));
  for (const r of rows) lines.push(r.map((cell, c) => (c === r.length - 1 ? cell : cell.padStart(widths[c]))).join('  '));
  if (p.jobs > shown.length) lines.push(`… and ${p.jobs - shown.length} more (largest first; --json lists every job)`);
  lines.push('');
  const speedNote = cached ? 'cached measurement on this machine' : 'measured now on this machine';
  lines.push(
    `kernel speed ${count(p.cell_updates_per_s)} cell updates/s per worker, ${(p.job_overhead_s * 1000).toPrecision(2)} ms per job, ` +
      `${(p.receiver_step_s * 1e9).toPrecision(2)} ns per receiver and step (${speedNote}; large grids may run slower)`,
  );
  lines.push(`total ${count(p.total_cell_updates)} cell updates ≈ ${p.total_core_hours.toPrecision(3)} core-hours`);
  const learned = overheadRuns > 0 ? `learned from ${overheadRuns} earlier run(s) here` : 'no earlier run measured here yet';
  lines.push(`wall time on ${p.workers} worker(s), longest first: ≈ ${duration(p.wall_hours)} (of which start-up, ledger and outputs ≈ ${duration(p.overhead_s / 3600)}, ${learned})`);
  const verdict = p.fits ? 'within' : 'OVER';
  lines.push(`largest job needs ${bytes(p.largest_memory_bytes)} (job ${p.largest_memory_job ?? '-'}): ${verdict} the cap of ${bytes(p.memory_cap_bytes)}`);
  return lines.join('\n') + '\n';
}
