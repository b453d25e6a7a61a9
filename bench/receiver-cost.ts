// `npm run bench:receivers`: what receivers cost, and how close solve() comes to its kernel's own rate.
//  1. solve() of a small case (bench/receiver-cases.ts) with 1, 500 and 10,000 receivers on the ground row: median
//     wall and CPU time, and the ratio to one receiver (target: 500 receivers ≤ 1.3× one).
//  2. the demo case (examples/cases/vlf-transmitter-20khz-land-sea.json): solve()'s Mcells/s beside the kernel's
//     own, timed as bench/kernel-bench.ts times it (bench/bench-grid.ts: a grid of the same nx × nz in the
//     column-profile layout solve() uses, the same number of steps, nothing but the updates and the source), once
//     with the absorbing layers of the demo's thickness and once without (target: solve ≥ 0.85× the kernel).
// Runs are interleaved so drifting load on a shared machine touches each alike; CPU time (this process) is printed
// beside wall time, and ratios are given for both: on a busy machine the CPU ratio is the steadier one.
// Where solve()'s time goes: `node --cpu-prof dist/bench/receiver-cost.js --repeats 1` writes a profile whose
// self times split the updates (updateH, updateE, applySurfaceImpedance), the absorbing layers (updateHCpml,
// updateECpml) and solve() itself (receivers' DFT, source, settling test; inlined into solve).
// A benchmark, not a test: it asserts nothing.
import { readFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import { parseCase, type Case } from '../schemas/case.js';
import { ExitCode } from '../schemas/exit-codes.js';
import { applySurfaceImpedance, updateE, updateECpml, updateH, updateHCpml } from '../solver/fdtd-kernel.js';
import { solve } from '../solver/index.js';
import { BENCH_PML_CELLS, buildBenchGrid, type BenchGrid } from './bench-grid.js';
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

/** The step solve() runs (solver/index.ts), without the source's ramp, receivers or settling test. */
function kernelSteps(g: BenchGrid, steps: number, withPml: boolean): void {
  const { fields, pml, zrow, sourceIndex, omegaDt } = g;
  for (let n = 0; n < steps; n++) {
    updateH(fields);
    if (withPml) updateHCpml(fields, pml);
    applySurfaceImpedance(fields, zrow);
    updateE(fields);
    if (withPml) updateECpml(fields, pml);
    fields.ez[sourceIndex] += Math.sin(omegaDt * (n + 1));
  }
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

function demoRatio(repeats: number, log: (s: string) => void): string[] {
  const path = new URL('../../examples/cases/vlf-transmitter-20khz-land-sea.json', import.meta.url);
  const c: Case = parseCase(JSON.parse(readFileSync(path, 'utf8')), 'examples/cases/vlf-transmitter-20khz-land-sea.json');
  const first = solve(c); // warm-up, and the grid and step count the kernel runs are timed on
  const { cells_range: nx, cells_height: nz, steps } = first.grid;
  const absorbing = c.grid.absorbing_cells;
  const grids = { cpml: buildBenchGrid(nx, nz, 'profiles'), plain: buildBenchGrid(nx, nz, 'profiles') };
  kernelSteps(grids.cpml, 200, true);
  kernelSteps(grids.plain, 200, false);
  const runs = { solve: [] as Timing[], cpml: [] as Timing[], plain: [] as Timing[] };
  for (let r = 0; r < repeats; r++) {
    runs.solve.push(timed(() => solve(c)));
    runs.cpml.push(timed(() => kernelSteps(grids.cpml, steps, true)));
    runs.plain.push(timed(() => kernelSteps(grids.plain, steps, false)));
    log(`  demo: round ${r + 1}/${repeats}`);
  }
  const cells = nx * nz * steps;
  const rate = (t: Timing): string => `${(cells / t.wallS / 1e6).toFixed(1)} Mcells/s wall, ${(cells / t.cpuS / 1e6).toFixed(1)} per CPU s`;
  const s = medians(runs.solve);
  const k = medians(runs.cpml);
  const p = medians(runs.plain);
  const ratio = (a: Timing, b: Timing): string => `${(b.wallS / a.wallS).toFixed(2)} wall, ${(b.cpuS / a.cpuS).toFixed(2)} CPU`;
  return [
    `demo solve() (examples/cases/vlf-transmitter-20khz-land-sea.json: ${nx} × ${nz} cells, ${steps} steps, ${c.receivers.ranges_m.length} receivers), median of ${repeats}:`,
    `  solve():                                 ${(s.wallS).toFixed(2)} s wall, ${rate(s)}`,
    `  kernel with ${BENCH_PML_CELLS}-cell absorbing layers:    ${(k.wallS).toFixed(2)} s wall, ${rate(k)}  (the demo's layers: ${absorbing} cells)`,
    `  kernel without absorbing layers:         ${(p.wallS).toFixed(2)} s wall, ${rate(p)}`,
    `  solve / kernel with layers:    ${ratio(s, k)}`,
    `  solve / kernel without layers: ${ratio(s, p)}`,
    '  target: solve ≥ 0.85× its kernel',
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
  out.push(...receiverCosts(repeats, log));
  if (demo) out.push(...demoRatio(Math.max(1, Math.min(repeats, 3)), log));
  const l = (x: number[]): string => x.map((v) => v.toFixed(2)).join(' ');
  out.push(`load average before ${l(before)}, after ${l(loadavg())}`);
  process.stdout.write(out.join('\n') + '\n');
}

main();
