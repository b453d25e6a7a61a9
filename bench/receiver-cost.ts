// `npm run bench:receivers`: what receivers cost, and how close solve() comes to its kernel's own rate.
//  1. solve() of a small case (bench/receiver-cases.ts) with 1, 500 and 10,000 receivers on the ground row: median
//     wall and CPU time, and the ratio to one receiver (target: 500 receivers ≤ 1.3× one).
//  2. solve() of the demo case and of a long path on the sphere (bench/bench-cases.ts) beside its own kernel:
//     leapfrogStep alone on the very grid solve() builds (buildYeeGrid), the same number of steps, nothing else;
//     and beside the kernel on a synthetic grid of the same size without absorbing layers (target: solve ≥ 0.85×
//     its kernel).
// Runs are interleaved so drifting load on a shared machine touches each alike; CPU time (this process) is printed
// beside wall time, and ratios are given for both: on a busy machine the CPU ratio is the steadier one.
// Where solve()'s time goes: `node --cpu-prof dist/bench/receiver-cost.js --repeats 1` writes a profile whose
// self times split the kernel's loops (fusedPair…, topLayer…, farLayer…, groundRows) and solve() itself (receivers'
// DFT, source, settling test; inlined into solve).
// A benchmark, not a test: it asserts nothing.
import { cpus, loadavg } from 'node:os';
import type { Case } from '../schemas/case.js';
import { ExitCode } from '../schemas/exit-codes.js';
import { leapfrogStep } from '../solver/fdtd-kernel.js';
import { planGrid } from '../solver/grid.js';
import { buildYeeGrid, solve } from '../solver/index.js';
import { demoCase, longPathCase } from './bench-cases.js';
import { buildBenchGrid } from './bench-grid.js';
import { smallCostCase, spreadRanges } from './receiver-cases.js';

interface Timing {
  wallS: number;
  cpuS: number;
}

function timed(run: () => void): Timing {
  const cpu0 = process.cpuUsage();
  const t0 = process.hrtime.bigint();
  run();
  const wallS = Number(process.hrtime.bigint() - t0) / 1e9;
  const cpu = process.cpuUsage(cpu0);
  return { wallS, cpuS: (cpu.user + cpu.system) / 1e6 };
}

function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

function medians(ts: readonly Timing[]): Timing {
  return { wallS: median(ts.map((t) => t.wallS)), cpuS: median(ts.map((t) => t.cpuS)) };
}

function receiverCosts(repeats: number, log: (s: string) => void): string[] {
  const counts = [1, 500, 10_000];
  const cases = counts.map((n) => smallCostCase(spreadRanges(n, 10, 29_990), 20));
  const runs: Timing[][] = counts.map(() => []);
  let grid = '';
  cases.forEach((c) => solve(c)); // warm-up: compile every path first
  for (let r = 0; r < repeats; r++) {
    cases.forEach((c, j) => {
      let res: ReturnType<typeof solve> | undefined;
      runs[j].push(timed(() => (res = solve(c))));
      grid = `${res!.grid.cells_range} × ${res!.grid.cells_height} cells, ${res!.grid.steps} steps`;
    });
    log(`  receivers: round ${r + 1}/${repeats}`);
  }
  const m = runs.map(medians);
  const out = [`receivers on a small case (30 kHz, 30 km × 10 km, 20 cells/λ: ${grid}), median of ${repeats}:`];
  counts.forEach((n, j) => {
    out.push(
      `  ${String(n).padStart(6)} receivers: ${(m[j].wallS * 1e3).toFixed(1).padStart(7)} ms wall, ${(m[j].cpuS * 1e3).toFixed(1).padStart(7)} ms CPU;` +
        `  × one receiver: ${(m[j].wallS / m[0].wallS).toFixed(2)} wall, ${(m[j].cpuS / m[0].cpuS).toFixed(2)} CPU`,
    );
  });
  out.push('  target: 500 receivers ≤ 1.3× one receiver');
  return out;
}

/**
 * solve() of a case beside its own kernel: leapfrogStep alone on the very grid solve() builds (buildYeeGrid: the
 * same coefficients, absorbing layers and ground row), the same number of steps, with nothing else (no source,
 * receivers, DFT or settling test); and beside the kernel on a synthetic grid of the same size without absorbing
 * layers (bench/bench-grid.ts, column profiles), which shows what the layers cost.
 */
function solveRatio(label: string, c: Case, fixedSteps: number | undefined, repeats: number, log: (s: string) => void): string[] {
  const opts = fixedSteps === undefined ? {} : { fixedSteps };
  const first = solve(c, opts); // warm-up, and the grid and step count the kernel runs are timed on
  const { cells_range: nx, cells_height: nz, steps } = first.grid;
  const own = buildYeeGrid(c);
  const plain = buildBenchGrid(nx, nz, 'profiles');
  // a sine in the source's cell each step, so the fields fill as in solve() (not a grid of zeros)
  const src = own.f.colEz[0];
  const ownSteps = (n: number): void => {
    for (let s = 0; s < n; s++) {
      leapfrogStep(own.f, own.pml, own.zrow);
      own.f.ez[src] += Math.sin(0.05 * s);
    }
  };
  const plainSteps = (n: number): void => {
    for (let s = 0; s < n; s++) leapfrogStep(plain.fields, undefined, plain.zrow);
  };
  ownSteps(50);
  plainSteps(50);
  const runs = { solve: [] as Timing[], own: [] as Timing[], plain: [] as Timing[] };
  for (let r = 0; r < repeats; r++) {
    runs.solve.push(timed(() => solve(c, opts)));
    runs.own.push(timed(() => ownSteps(steps)));
    runs.plain.push(timed(() => plainSteps(steps)));
    log(`  ${label}: round ${r + 1}/${repeats}`);
  }
  const cells = nx * nz * steps;
  const rate = (t: Timing): string => `${(cells / t.wallS / 1e6).toFixed(1)} Mcells/s wall, ${(cells / t.cpuS / 1e6).toFixed(1)} per CPU s`;
  const s = medians(runs.solve);
  const k = medians(runs.own);
  const p = medians(runs.plain);
  // the ratio within each round, then the median and range over the rounds: a slow moment of the shared machine
  // touches one round's pair, not the whole comparison
  const ratio = (xs: Timing[], ys: Timing[]): string => {
    const wall = xs.map((x, r) => ys[r].wallS / x.wallS);
    const cpu = xs.map((x, r) => ys[r].cpuS / x.cpuS);
    return `${median(wall).toFixed(2)} wall [${Math.min(...wall).toFixed(2)}–${Math.max(...wall).toFixed(2)}], ${median(cpu).toFixed(2)} CPU`;
  };
  const g = planGrid(c);
  const layerShare = 1 - ((nx - g.pmlX) * (nz - g.pmlTop)) / (nx * nz);
  return [
    `${label} solve() (${nx} × ${nz} cells, ${steps} steps, ${c.receivers.ranges_m.length} receivers; absorbing layers ${g.pmlX} cells at the side, ${g.pmlTop} at the top: ${(100 * layerShare).toFixed(0)} % of the cells), median of ${repeats}:`,
    `  solve():                                  ${s.wallS.toFixed(2)} s wall, ${rate(s)}`,
    `  its kernel (leapfrogStep on its grid):    ${k.wallS.toFixed(2)} s wall, ${rate(k)}`,
    `  kernel, same size, no absorbing layers:   ${p.wallS.toFixed(2)} s wall, ${rate(p)}`,
    `  solve / its kernel:            ${ratio(runs.solve, runs.own)}   (target ≥ 0.85)`,
    `  solve / kernel without layers: ${ratio(runs.solve, runs.plain)}`,
  ];
}

function main(): void {
  const args = process.argv.slice(2);
  let repeats = 5;
  let demo = true;
  for (let a = 0; a < args.length; a++) {
    if (args[a] === '--repeats') {
      repeats = Number(args[++a]);
      if (!Number.isInteger(repeats) || repeats < 1 || repeats > 25) {
        process.stderr.write('error: --repeats: expected a whole number from 1 to 25, e.g. --repeats 5\n');
        process.exitCode = ExitCode.inputMistake;
        return;
      }
    } else if (args[a] === '--no-demo') demo = false;
    else {
      process.stderr.write(`error: unknown option ${args[a]}; use --repeats N or --no-demo\n`);
      process.exitCode = ExitCode.inputMistake;
      return;
    }
  }
  const log = (s: string): void => void process.stderr.write(s + '\n');
  const before = loadavg();
  const out = [`loamwave receiver-cost benchmark, ${new Date().toISOString()}`, `node ${process.version}, ${cpus()[0]?.model ?? 'unknown cpu'} × ${cpus().length}`];
  // the small case runs 15–25 ms: nine rounds at least, or one slow moment of the machine sets the median
  out.push(...receiverCosts(Math.max(9, repeats), log));
  if (demo) {
    const n = Math.max(1, Math.min(repeats, 3));
    out.push(...solveRatio('demo (Dravelquine VLF, invented)', demoCase(), undefined, Math.max(5, repeats), log));
    // the long path to its first DFT window (fixedSteps 1: the settling run, then one window), not to settling
    out.push(...solveRatio('long path (Yelquandor LF on the sphere, invented)', longPathCase(), 1, n, log));
  }
  const l = (x: number[]): string => x.map((v) => v.toFixed(2)).join(' ');
  out.push(`load average before ${l(before)}, after ${l(loadavg())}`);
  process.stdout.write(out.join('\n') + '\n');
}

main();
