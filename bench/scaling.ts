// `npm run bench:scaling`: how the local solver pool (worker/thread-pool.ts, the pool the embedded `run` dispatches
// to) scales from one thread to two. (a) Equal jobs: wall time of the same set of equal small cases on one thread
// and on two (target: two ≥ 1.9× faster). (b) Unequal jobs: the makespan on two threads, jobs started longest
// first by the solver's own cost estimate as `run` orders them, against the lower bound max(longest job, total
// work / threads) from the same jobs' durations measured one at a time (target: within 5 %).
// The two settings alternate, each ratio is taken within one alternation, and the median and range are printed:
// on a shared two-core machine other work takes a core now and then, and the range says how much.
// A benchmark, not a test: it asserts nothing and prints a table (or `--json`).
import { cpus, loadavg } from 'node:os';
import { Command, InvalidArgumentError } from 'commander';
import type { CaseInput } from '../schemas/case.js';
import { parseCase } from '../schemas/case.js';
import { estimateCost } from '../solver/index.js';
import { SolverPool } from '../worker/thread-pool.js';

/** An invented small case (0.3–1.5 s of solving on this machine kind, by range): 30 kHz over wet farmland. */
function smallCase(rangeM: number): CaseInput {
  return {
    geometry: 'axisymmetric',
    frequency_hz: 30_000,
    ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 15 }] },
    domain: { range_m: rangeM, height_m: 20_000 },
    grid: { cells_per_wavelength: 25, absorbing_cells: 10 },
    receivers: { ranges_m: [rangeM / 2] },
  };
}

/** Equal jobs: four of one range (two per thread when there are two). */
const EQUAL_RANGES_M = [80_000, 80_000, 80_000, 80_000];
/** Unequal jobs: ranges whose costs differ by up to about 5×, given in no particular order. */
const UNEQUAL_RANGES_M = [40_000, 120_000, 60_000, 160_000, 80_000, 50_000, 100_000];

function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

interface Timed {
  wallS: number;
  /** CPU seconds of the whole process (all its threads) over wall seconds: 2 means both cores were ours. */
  cpuShare: number;
}

/**
 * Wall seconds from handing `inputs` to a fresh pool of `threads` threads, in the given order, to the last result.
 * The pool's threads are started, and one warm-up case solved on each, before the clock starts.
 */
async function timeOnPool(inputs: readonly CaseInput[], threads: number, warmUp: CaseInput): Promise<Timed> {
  const pool = new SolverPool({ threads });
  try {
    await Promise.all(Array.from({ length: threads }, (_, t) => pool.run(warmUp, `warm-up-${t}`)));
    const cpu0 = process.cpuUsage();
    const t0 = performance.now();
    await Promise.all(inputs.map((input, j) => pool.run(input, `scaling-${j}`)));
    const wallS = (performance.now() - t0) / 1000;
    const cpu = process.cpuUsage(cpu0);
    return { wallS, cpuShare: (cpu.user + cpu.system) / 1e6 / wallS };
  } finally {
    await pool.close();
  }
}

/** Each job alone on one thread, one after another: its own duration, no other job beside it. */
async function timeAlone(inputs: readonly CaseInput[], warmUp: CaseInput): Promise<number[]> {
  const pool = new SolverPool({ threads: 1 });
  try {
    await pool.run(warmUp, 'warm-up');
    const out: number[] = [];
    for (let j = 0; j < inputs.length; j++) {
      const t0 = performance.now();
      await pool.run(inputs[j], `alone-${j}`);
      out.push((performance.now() - t0) / 1000);
    }
    return out;
  } finally {
    await pool.close();
  }
}

interface EqualRound {
  oneThreadS: number;
  twoThreadsS: number;
  speedup: number;
  cpuShareOne: number;
  cpuShareTwo: number;
}

interface UnequalRound {
  aloneS: number[];
  lowerBoundS: number;
  makespanS: number;
  ratio: number;
  cpuShareTwo: number;
}

interface ScalingReport {
  date: string;
  node: string;
  cpu: string;
  loadAverageBefore: number[];
  loadAverageAfter: number[];
  repeats: number;
  equal: { rangesM: number[]; rounds: EqualRound[]; medianSpeedup: number; speedupRange: [number, number]; target: string };
  unequal: {
    rangesM: number[];
    startOrderRangesM: number[];
    rounds: UnequalRound[];
    medianRatio: number;
    ratioRange: [number, number];
    target: string;
  };
}

function positiveInt(v: string): number {
  const n = Number(v);
  if (!Number.isInteger(n) || n < 1 || n > 25) throw new InvalidArgumentError('expected a whole number from 1 to 25.');
  return n;
}

async function main(): Promise<void> {
  const program = new Command('scaling')
    .description('one solver thread against two: equal jobs (speed-up) and unequal jobs (makespan against its bound)')
    .option('--json', 'print the report as JSON on stdout')
    .option('--repeats <n>', 'alternations of the two settings (the median ratio is reported)', positiveInt, 5)
    .parse();
  const opts = program.opts<{ json?: boolean; repeats: number }>();
  const log = (s: string): void => void process.stderr.write(s + '\n');
  const loadAverageBefore = loadavg();
  const warmUp = smallCase(20_000);

  const equalInputs = EQUAL_RANGES_M.map(smallCase);
  // longest first by the solver's cost estimate, the order `run` dispatches in (coordinator/sweep/plan.ts)
  const cost = (r: number): number => estimateCost(parseCase(smallCase(r), 'scaling case')).cell_updates;
  const startOrder = [...UNEQUAL_RANGES_M].sort((a, b) => cost(b) - cost(a));
  const unequalInputs = startOrder.map(smallCase);

  const equalRounds: EqualRound[] = [];
  const unequalRounds: UnequalRound[] = [];
  for (let r = 0; r < opts.repeats; r++) {
    const one = await timeOnPool(equalInputs, 1, warmUp);
    const two = await timeOnPool(equalInputs, 2, warmUp);
    equalRounds.push({ oneThreadS: one.wallS, twoThreadsS: two.wallS, speedup: one.wallS / two.wallS, cpuShareOne: one.cpuShare, cpuShareTwo: two.cpuShare });
    log(`  equal jobs, round ${r + 1}/${opts.repeats}: 1 thread ${one.wallS.toFixed(2)} s, 2 threads ${two.wallS.toFixed(2)} s`);
    const aloneS = await timeAlone(unequalInputs, warmUp);
    const made = await timeOnPool(unequalInputs, 2, warmUp);
    const total = aloneS.reduce((s, x) => s + x, 0);
    const lowerBoundS = Math.max(Math.max(...aloneS), total / 2);
    unequalRounds.push({ aloneS, lowerBoundS, makespanS: made.wallS, ratio: made.wallS / lowerBoundS, cpuShareTwo: made.cpuShare });
    log(`  unequal jobs, round ${r + 1}/${opts.repeats}: bound ${lowerBoundS.toFixed(2)} s, makespan ${made.wallS.toFixed(2)} s`);
  }
  const speedups = equalRounds.map((x) => x.speedup);
  const ratios = unequalRounds.map((x) => x.ratio);
  const report: ScalingReport = {
    date: new Date().toISOString(),
    node: process.version,
    cpu: `${cpus()[0]?.model ?? 'unknown cpu'} × ${cpus().length}`,
    loadAverageBefore,
    loadAverageAfter: loadavg(),
    repeats: opts.repeats,
    equal: {
      rangesM: EQUAL_RANGES_M,
      rounds: equalRounds,
      medianSpeedup: median(speedups),
      speedupRange: [Math.min(...speedups), Math.max(...speedups)],
      target: '≥ 1.9× faster on two threads',
    },
    unequal: {
      rangesM: UNEQUAL_RANGES_M,
      startOrderRangesM: startOrder,
      rounds: unequalRounds,
      medianRatio: median(ratios),
      ratioRange: [Math.min(...ratios), Math.max(...ratios)],
      target: 'makespan ≤ 1.05 × max(longest job, total work / 2)',
    },
  };
  if (opts.json) {
    process.stdout.write(JSON.stringify(report, null, 2) + '\n');
    return;
  }
  const loads = (l: number[]): string => l.map((x) => x.toFixed(2)).join(' ');
  const out: string[] = [];
  out.push(`loamwave pool scaling benchmark, ${report.date}`);
  out.push(`node ${report.node}, ${report.cpu}; load average before ${loads(loadAverageBefore)}, after ${loads(report.loadAverageAfter)}`);
  out.push(`${opts.repeats} alternations; each ratio within one alternation, median [smallest–largest]; CPU share = the`);
  out.push('process\'s CPU s (all threads) / wall s, median: 1 thread ≈ 1 and 2 threads ≈ 2 when the cores were ours');
  out.push('');
  const e = report.equal;
  out.push(`(a) ${EQUAL_RANGES_M.length} equal jobs (${EQUAL_RANGES_M[0] / 1000} km each): 1 thread ${median(equalRounds.map((x) => x.oneThreadS)).toFixed(2)} s, 2 threads ${median(equalRounds.map((x) => x.twoThreadsS)).toFixed(2)} s (medians)`);
  out.push(`    speed-up ${e.medianSpeedup.toFixed(2)}× [${e.speedupRange[0].toFixed(2)}–${e.speedupRange[1].toFixed(2)}]; target ${e.target}`);
  out.push(`    CPU share 1 thread ${median(equalRounds.map((x) => x.cpuShareOne)).toFixed(2)}, 2 threads ${median(equalRounds.map((x) => x.cpuShareTwo)).toFixed(2)}`);
  const u = report.unequal;
  out.push(`(b) ${UNEQUAL_RANGES_M.length} unequal jobs, started longest first (${startOrder.map((x) => x / 1000).join(', ')} km):`);
  out.push(`    bound ${median(unequalRounds.map((x) => x.lowerBoundS)).toFixed(2)} s, makespan ${median(unequalRounds.map((x) => x.makespanS)).toFixed(2)} s (medians)`);
  out.push(`    makespan / bound ${u.medianRatio.toFixed(3)} [${u.ratioRange[0].toFixed(3)}–${u.ratioRange[1].toFixed(3)}]; target ${u.target}`);
  out.push(`    CPU share on 2 threads ${median(unequalRounds.map((x) => x.cpuShareTwo)).toFixed(2)}`);
  process.stdout.write(out.join('\n') + '\n');
}

await main();
