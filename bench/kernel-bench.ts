// `npm run bench`: single-threaded cell-updates per second of our update kernels on three grid sizes, beside the
// shared native C reference's `base` variant measured in the same run, the wall time of one demo solve(), and the
// start-up time of the command line.
// A benchmark, not a test: it asserts nothing and prints a table (or `--json`); speed targets are read from it.
import { execFileSync } from 'node:child_process';
import { cpus, loadavg } from 'node:os';
import { Command, InvalidArgumentError } from 'commander';
import { solve } from '../solver/index.js';
import { demoCase } from './bench-cases.js';
import { buildBenchGrid, fieldEnergy, runKernel, type BenchGrid, type KernelVariant } from './bench-grid.js';
import {
  buildNativeReference,
  defaultReferenceDir,
  runNativeReference,
  type NativeReference,
} from './native-reference.js';
import { measureStartup, type StartupTimes } from './startup-time.js';

interface GridSize {
  name: string;
  nx: number;
  nz: number;
}

const SIZES: readonly GridSize[] = [
  { name: 'small', nx: 400, nz: 200 }, // ≈ 4.5 MB of fields and coefficients: inside the last-level cache
  { name: 'medium', nx: 2000, nz: 400 }, // ≈ 45 MB: just beyond it
  { name: 'large', nx: 4000, nz: 2000 }, // ≈ 450 MB: memory-bandwidth bound
];

/** Cell updates per timed run: about 1 s of our kernel, 0.3 s of the native one; the whole bench takes under a minute. */
const CELL_UPDATES_PER_RUN = 1.2e8;
/** Steps run once before timing so the JIT has compiled the kernels (not counted). */
const WARMUP_STEPS_SMALL_GRID = 200;

interface SizeResult {
  grid: string;
  nx: number;
  nz: number;
  steps: number;
  /** Medians of `repeats` runs, Mcells/s (nx·nz·steps / seconds / 1e6, the reference's own definition). */
  nativeBaseMcellsPerS: number | null;
  plainMcellsPerS: number;
  cpmlMcellsPerS: number;
  /** Ours ÷ native base, medians taken in the same run (null when the native reference was skipped). */
  plainRatio: number | null;
  cpmlRatio: number | null;
  profilesMcellsPerS: number;
  profilesRatio: number | null;
  /** Every run's Mcells/s, for the record. */
  runs: { nativeBase: number[]; plain: number[]; cpml: number[] };
  /** Median CPU-time ÷ wall-time share of the runs: below 1, other work took the core for the rest. */
  cpuShare: { nativeBase: number | null; ours: number };
}

interface BenchReport {
  date: string;
  node: string;
  cpu: string;
  loadAverageBefore: number[];
  loadAverageAfter: number[];
  pinnedToCore0: boolean;
  native: { build: string } | { skipped: string };
  repeats: number;
  sizes: SizeResult[];
  demo: { description: string; cells: number; steps: number; wallS: number[]; medianWallS: number; mcellsPerS: number };
  startup: StartupTimes;
}

function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Pin this process's main thread to core 0, as the native runs are (taskset without -a leaves helper threads). */
function pinMainThread(): boolean {
  try {
    execFileSync('taskset', ['-cp', '0', String(process.pid)], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

function benchSize(
  size: GridSize,
  repeats: number,
  ref: NativeReference | undefined,
  log: (s: string) => void,
): SizeResult {
  const { nx, nz } = size;
  const steps = Math.max(1, Math.round(CELL_UPDATES_PER_RUN / (nx * nz)));
  const cells = nx * nz * steps;
  const grids: Record<KernelVariant, BenchGrid> = {
    plain: buildBenchGrid(nx, nz),
    cpml: buildBenchGrid(nx, nz),
    profiles: buildBenchGrid(nx, nz, 'profiles'),
  };
  const runs = { nativeBase: [] as number[], plain: [] as number[], cpml: [] as number[], profiles: [] as number[] };
  const nativeShares: number[] = [];
  const ourShares: number[] = [];
  // interleave the three measurements so drifting load on the shared machine touches each alike
  for (let r = 0; r < repeats; r++) {
    if (ref) {
      const run = runNativeReference(ref, nx, nz, steps, 'base');
      runs.nativeBase.push(run.mcellsPerS);
      if (run.cpuShare !== null) nativeShares.push(run.cpuShare);
    }
    for (const v of ['plain', 'cpml', 'profiles'] as const) {
      const t = runKernel(grids[v], v, steps);
      runs[v].push(cells / t.wallS / 1e6);
      ourShares.push(t.cpuS / t.wallS);
    }
    log(`  ${size.name} ${nx}×${nz}, ${steps} steps: run ${r + 1}/${repeats}`);
  }
  for (const v of ['plain', 'cpml', 'profiles'] as const) {
    if (!Number.isFinite(fieldEnergy(grids[v]))) throw new Error(`bench grid ${size.name} (${v}) diverged`);
  }
  const nativeBase = ref ? median(runs.nativeBase) : null;
  const plain = median(runs.plain);
  const cpml = median(runs.cpml);
  const profiles = median(runs.profiles);
  return {
    grid: size.name,
    nx,
    nz,
    steps,
    nativeBaseMcellsPerS: nativeBase,
    plainMcellsPerS: plain,
    cpmlMcellsPerS: cpml,
    plainRatio: nativeBase ? plain / nativeBase : null,
    cpmlRatio: nativeBase ? cpml / nativeBase : null,
    profilesMcellsPerS: profiles,
    profilesRatio: nativeBase ? profiles / nativeBase : null,
    runs,
    cpuShare: { nativeBase: nativeShares.length ? median(nativeShares) : null, ours: median(ourShares) },
  };
}

function benchDemo(repeats: number): BenchReport['demo'] {
  const c = demoCase();
  const wallS: number[] = [];
  let cells = 0;
  let steps = 0;
  let updates = 0;
  for (let r = 0; r < repeats; r++) {
    const t0 = process.hrtime.bigint();
    const result = solve(c);
    wallS.push(Number(process.hrtime.bigint() - t0) / 1e9);
    cells = result.grid.cells_total;
    steps = result.grid.steps;
    updates = result.grid.cell_updates;
  }
  const medianWallS = median(wallS);
  return {
    description:
      'Dravelquine VLF transmitter (invented): 20 kHz, 1 kW, axisymmetric, impedance ground 3 mS/m εr 15, 300 km × 60 km, 20 cells/λ',
    cells,
    steps,
    wallS,
    medianWallS,
    mcellsPerS: updates / medianWallS / 1e6,
  };
}

function fmt(x: number | null, digits: number): string {
  return x === null ? '—' : x.toFixed(digits);
}

function printTable(rep: BenchReport): void {
  const out: string[] = [];
  out.push(`loamwave kernel benchmark, ${rep.date}`);
  out.push(`node ${rep.node}, ${rep.cpu}, main thread ${rep.pinnedToCore0 ? 'pinned to core 0' : 'not pinned'}`);
  const loads = (l: number[]): string => l.map((x) => x.toFixed(2)).join(' ');
  out.push(`load average before ${loads(rep.loadAverageBefore)}, after ${loads(rep.loadAverageAfter)}`);
  out.push('build' in rep.native ? `native reference: ${rep.native.build}, base variant` : `native reference skipped: ${rep.native.skipped}`);
  out.push(`Mcells/s = nx·nz·steps / wall s / 1e6, median of ${rep.repeats}, one core; CPU share = CPU s / wall s (1: the core was ours)`);
  out.push('');
  const header = ['grid', 'nx×nz', 'steps', 'C base', 'ours plain', 'plain/C', 'ours +CPML', 'CPML/C', 'ours profiles', 'profiles/C', 'CPU share C/ours'];
  const rows = rep.sizes.map((s) => [
    s.grid,
    `${s.nx}×${s.nz}`,
    String(s.steps),
    fmt(s.nativeBaseMcellsPerS, 0),
    fmt(s.plainMcellsPerS, 0),
    fmt(s.plainRatio, 2),
    fmt(s.cpmlMcellsPerS, 0),
    fmt(s.cpmlRatio, 2),
    fmt(s.profilesMcellsPerS, 0),
    fmt(s.profilesRatio, 2),
    `${fmt(s.cpuShare.nativeBase, 2)} / ${fmt(s.cpuShare.ours, 2)}`,
  ]);
  const widths = header.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j].length)));
  const line = (cells: string[]): string => cells.map((c, j) => (j < 2 ? c.padEnd(widths[j]) : c.padStart(widths[j]))).join('  ');
  out.push(line(header));
  for (const r of rows) out.push(line(r));
  out.push('');
  const d = rep.demo;
  out.push(`demo solve(): ${d.description}`);
  out.push(`  ${d.cells} cells, ${d.steps} steps: ${d.medianWallS.toFixed(2)} s wall (median of ${d.wallS.length}), ${d.mcellsPerS.toFixed(0)} Mcells/s overall`);
  const st = rep.startup;
  out.push(`start-up: loamwave --version ${st.versionS.toFixed(3)} s, --help ${st.helpS.toFixed(3)} s (median of ${st.runs} fresh processes; target ≤ 0.3 s)`);
  process.stdout.write(out.join('\n') + '\n');
}

function positiveInt(v: string): number {
  const n = Number(v);
  if (!Number.isInteger(n) || n < 1 || n > 25) throw new InvalidArgumentError('expected a whole number from 1 to 25.');
  return n;
}

function sizeList(v: string): string[] {
  const names = v.split(',').map((s) => s.trim());
  for (const n of names) {
    if (!SIZES.some((s) => s.name === n)) throw new InvalidArgumentError(`unknown grid "${n}"; choose from ${SIZES.map((s) => s.name).join(', ')}.`);
  }
  return names;
}

async function main(): Promise<void> {
  const program = new Command('kernel-bench')
    .description('cell-updates per second of the FDTD kernels beside the native C reference')
    .option('--json', 'print the report as JSON on stdout')
    .option('--repeats <n>', 'timed runs per measurement (the median is reported)', positiveInt, 3)
    .option('--grids <names>', 'comma-separated grids: small, medium, large', sizeList, SIZES.map((s) => s.name))
    .option('--no-native', 'skip the native C reference')
    .option('--native-dir <path>', 'folder holding fdtd2d.c', defaultReferenceDir())
    .parse();
  const opts = program.opts<{ json?: boolean; repeats: number; grids: string[]; native: boolean; nativeDir: string }>();
  const log = (s: string): void => void process.stderr.write(s + '\n');

  const loadAverageBefore = loadavg();
  const pinned = pinMainThread();
  const built = opts.native ? buildNativeReference(opts.nativeDir) : 'skipped with --no-native';
  const ref = typeof built === 'string' ? undefined : built;
  if (typeof built === 'string') log(`native reference skipped: ${built}`);
  try {
    // warm-up: compile both kernel paths before anything is timed
    const warm = buildBenchGrid(200, 100);
    runKernel(warm, 'plain', WARMUP_STEPS_SMALL_GRID);
    runKernel(warm, 'cpml', WARMUP_STEPS_SMALL_GRID);
    const sizes = SIZES.filter((s) => opts.grids.includes(s.name)).map((s) => benchSize(s, opts.repeats, ref, log));
    log('  demo solve()');
    const demo = benchDemo(opts.repeats);
    log('  start-up of the command line');
    const startup = measureStartup();
    const report: BenchReport = {
      date: new Date().toISOString(),
      node: process.version,
      cpu: `${cpus()[0]?.model ?? 'unknown cpu'} × ${cpus().length}`,
      loadAverageBefore,
      loadAverageAfter: loadavg(),
      pinnedToCore0: pinned && (ref?.pinned ?? true),
      native: ref ? { build: ref.build } : { skipped: String(built) },
      repeats: opts.repeats,
      sizes,
      demo,
      startup,
    };
    if (opts.json) process.stdout.write(JSON.stringify(report, null, 2) + '\n');
    else printTable(report);
  } finally {
    ref?.dispose();
  }
}

await main();
