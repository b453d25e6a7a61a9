// `npm run bench:scaling`: how the local solver pool (worker/thread-pool.ts, the pool the embedded `run` dispatches
// to) scales from one thread to two. (a) Equal jobs: wall time of the same set of equal small cases on one thread
// and on two (target: two ≥ 1.9× faster). (b) Unequal jobs: the makespan on two threads, jobs started longest
// first by the solver's own cost estimate as `run` orders them, against the lower bound max(longest job, total
// work / threads) from the same jobs' durations measured one at a time (target: within 5 %).
// (b) also gives the makespan over the bound from the durations the jobs took on two threads, which leaves out the
// slow-down of sharing the machine, and (c) how the machine itself scales: two copies of the C reference kernel at
// once against one. The two settings alternate, each ratio is taken within one alternation, and the median and range are printed:
// on a shared two-core machine other work takes a core now and then, and the range says how much.
// A benchmark, not a test: it asserts nothing and prints a table (or `--json`).
import { cpus, loadavg } from 'node:os';
import { Command, InvalidArgumentError } from 'commander';
import type { CaseInput } from '../schemas/case.js';
import { parseCase } from '../schemas/case.js';
import { estimateCost } from '../solver/index.js';
import { SolverPool } from '../worker/thread-pool.js';
import { buildNativeReference, defaultReferenceDir, nativePairScaling } from './native-reference.js';

/** An invented case (about 0.1 s of solving at 80 km on this machine kind, growing as the range squared): 30 kHz over wet farmland. */
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

/**
 * Equal jobs: four of one range (two per thread when there are two), 0.3–1 s each on this machine kind, so that a thread's start-up
 * and the pool's messages weigh as little beside the solving as in a real sweep.
 */
const EQUAL_RANGES_M = [240_000, 240_000, 240_000, 240_000];
/** Unequal jobs: ranges whose costs differ by up to about 16× (0.15–2.5 s), given in no particular order. */
const UNEQUAL_RANGES_M = [100_000, 300_000, 150_000, 400_000, 200_000, 125_000, 250_000];

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
 * The warm-up cases each thread solves before the clock starts: a small one, then the timed jobs' kinds (two of the
 * equal jobs; one of each unequal size). A sweep runs hundreds of cases a thread, so what it sees is the threads'
 * steady state. V8 compiles the per-case functions (case parsing, grid building, `solve` itself) with its
 * optimizing compiler only after they have run a few times, and a grid of another column parity takes kernel
 * paths a first time; that compiling runs on helper threads, which on one solver thread have the idle core and on
 * two compete with the solver threads. With one small warm-up case only, it happened inside the timed window: the
 * speed-up read 1.81–1.92× where it reads 1.94–1.95× warmed, and single unequal jobs took 15–20 % longer beside
 * another than alone (2026-12-03, 12:25 UTC, three rounds each).
 */
function warmUpCases(rangesM: readonly number[]): CaseInput[] {
  return [smallCase(20_000), ...rangesM.map(smallCase)];
}

/** Solve the warm-up cases on every thread of `pool`, one round per case (each thread takes one per round). */
async function warmUpPool(pool: SolverPool, threads: number, warmUp: readonly CaseInput[]): Promise<void> {
  for (const [w, c] of warmUp.entries()) await Promise.all(Array.from({ length: threads }, (_, t) => pool.run(c, `warm-up-${w}-${t}`)));
}

/**
 * Wall seconds from handing `inputs` to a fresh pool of `threads` threads, in the given order, to the last result.
 * The pool's threads are started, and warmed up (warmUpCases), before the clock starts.
 */
async function timeOnPool(inputs: readonly CaseInput[], threads: number, warmUp: readonly CaseInput[]): Promise<Timed & { jobS: number[] }> {
  const pool = new SolverPool({ threads });
  try {
    await warmUpPool(pool, threads, warmUp);
    const cpu0 = process.cpuUsage();
    const t0 = performance.now();
    const results = await Promise.all(inputs.map((input, j) => pool.run(input, `scaling-${j}`)));
    const wallS = (performance.now() - t0) / 1000;
    const cpu = process.cpuUsage(cpu0);
    // each job's own wall time as the solver thread measured it, beside the other thread's job
    return { wallS, cpuShare: (cpu.user + cpu.system) / 1e6 / wallS, jobS: results.map((r) => r.wall_time_s) };
  } finally {
    await pool.close();
  }
}

/** Each job alone on one thread, one after another: its own duration, no other job beside it. */
async function timeAlone(inputs: readonly CaseInput[], warmUp: readonly CaseInput[]): Promise<number[]> {
  const pool = new SolverPool({ threads: 1 });
  try {
    await warmUpPool(pool, 1, warmUp);
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
  /** The bound from the durations the jobs took on two threads (each slowed by the other), and the makespan over it. */
  sharedBoundS: number;
  sharedRatio: number;
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
    medianSharedRatio: number;
  };
  native: { skipped: string } | { grids: Array<{ nx: number; nz: number; medianScaling: number; range: [number, number] }> } | null;
}

/** Grids of the C reference pair (nx, nz, steps): one in the cache and one beyond it, about a second each. */
const NATIVE_GRIDS: ReadonlyArray<readonly [number, number, number]> = [
  [400, 200, 3000],
  [2000, 400, 300],
];

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
    .option('--no-native', 'skip the C reference pair (the machine\'s own one-to-two-core scaling)')
    .option('--native-dir <dir>', 'folder holding fdtd2d.c', defaultReferenceDir())
    .parse();
  const opts = program.opts<{ json?: boolean; repeats: number; native: boolean; nativeDir: string }>();
  const log = (s: string): void => void process.stderr.write(s + '\n');
  const loadAverageBefore = loadavg();

  const equalInputs = EQUAL_RANGES_M.map(smallCase);
  const equalWarmUp = warmUpCases(EQUAL_RANGES_M.slice(0, 2));
  const unequalWarmUp = warmUpCases(UNEQUAL_RANGES_M);
  // longest first by the solver's cost estimate, the order `run` dispatches in (coordinator/sweep/plan.ts)
  const cost = (r: number): number => estimateCost(parseCase(smallCase(r), 'scaling case')).cell_updates;
  const startOrder = [...UNEQUAL_RANGES_M].sort((a, b) => cost(b) - cost(a));
  const unequalInputs = startOrder.map(smallCase);

  const equalRounds: EqualRound[] = [];
  const unequalRounds: UnequalRound[] = [];
  for (let r = 0; r < opts.repeats; r++) {
    const one = await timeOnPool(equalInputs, 1, equalWarmUp);
    const two = await timeOnPool(equalInputs, 2, equalWarmUp);
    equalRounds.push({ oneThreadS: one.wallS, twoThreadsS: two.wallS, speedup: one.wallS / two.wallS, cpuShareOne: one.cpuShare, cpuShareTwo: two.cpuShare });
    log(`  equal jobs, round ${r + 1}/${opts.repeats}: 1 thread ${one.wallS.toFixed(2)} s, 2 threads ${two.wallS.toFixed(2)} s`);
    const aloneS = await timeAlone(unequalInputs, unequalWarmUp);
    const made = await timeOnPool(unequalInputs, 2, unequalWarmUp);
    const total = aloneS.reduce((s, x) => s + x, 0);
    const lowerBoundS = Math.max(Math.max(...aloneS), total / 2);
    const sharedBoundS = Math.max(Math.max(...made.jobS), made.jobS.reduce((s, x) => s + x, 0) / 2);
    unequalRounds.push({
      aloneS,
      lowerBoundS,
      makespanS: made.wallS,
      ratio: made.wallS / lowerBoundS,
      cpuShareTwo: made.cpuShare,
      sharedBoundS,
      sharedRatio: made.wallS / sharedBoundS,
    });
    log(`  unequal jobs, round ${r + 1}/${opts.repeats}: bound ${lowerBoundS.toFixed(2)} s, makespan ${made.wallS.toFixed(2)} s`);
  }
  // (c) the machine itself: the C reference kernel, one copy against two at once on the two cores
  let native: ScalingReport['native'] = null;
  if (!opts.native) native = { skipped: 'not asked for (--no-native)' };
  else {
    const ref = buildNativeReference(opts.nativeDir);
    if (typeof ref === 'string') native = { skipped: ref };
    else {
      try {
        const grids = NATIVE_GRIDS.map(([nx, nz, steps]) => ({ nx, nz, steps }));
        const rows: Array<{ nx: number; nz: number; scalings: number[] }> = [];
        for (const g of grids) {
          const scalings: number[] = [];
          for (let r = 0; r < Math.min(3, opts.repeats); r++) scalings.push((await nativePairScaling(ref, g.nx, g.nz, g.steps)).scaling);
          rows.push({ nx: g.nx, nz: g.nz, scalings });
          log(`  C reference pair on ${g.nx}x${g.nz}: ${scalings.map((x) => x.toFixed(2)).join(', ')}`);
        }
        native = { grids: rows.map((r) => ({ nx: r.nx, nz: r.nz, medianScaling: median(r.scalings), range: [Math.min(...r.scalings), Math.max(...r.scalings)] as [number, number] })) };
      } finally {
        ref.dispose();
      }
    }
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
      medianSharedRatio: median(unequalRounds.map((x) => x.sharedRatio)),
    },
    native,
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
  out.push('process\'s CPU s (all threads) / wall s, median: 1 thread ≈ 1 and 2 threads ≈ 2 when the cores were ours;');
  out.push('each pool\'s threads first solve a small case and the timed jobs\' kinds (a sweep\'s steady state: see warmUpCases)');
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
  out.push(`    makespan / the bound from the durations the jobs took on two threads: ${u.medianSharedRatio.toFixed(3)} (the order's own loss, the slow-down of sharing left out)`);
  const n = report.native;
  if (n === null || 'skipped' in n) out.push(`(c) native reference pair skipped: ${n === null ? 'no reference' : n.skipped}`);
  else {
    out.push('(c) the machine itself: two copies of the C reference kernel (`base`) at once, pinned to cores 0 and 1, against one alone');
    for (const g of n.grids) out.push(`    ${g.nx}×${g.nz}: ${g.medianScaling.toFixed(2)}× the throughput of one [${g.range[0].toFixed(2)}–${g.range[1].toFixed(2)}]`);
  }
  process.stdout.write(out.join('\n') + '\n');
}

await main();
