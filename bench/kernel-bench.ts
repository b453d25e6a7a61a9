// `npm run bench`: single-threaded cell-updates per second of our update kernels on three grid sizes, beside the
// shared native C reference's `base` variant measured in the same run, the wall time of one demo solve(), and the
// start-up time of the command line.
// A benchmark, not a test: it asserts nothing and prints a table (or `--json`); speed targets are read from it.
import { execFileSync } from 'node:child_process';
import { cpus, loadavg } from 'node:os';
import { Command, InvalidArgumentError, Option } from 'commander';
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

/**
 * Cell updates per timed run: about 1 s of our kernel, 0.3 s of the native one; five measurements on three grids at
 * three repeats take about two minutes on a quiet machine (`--measures`, `--grids` and `--kernels-only` for less).
 */
const CELL_UPDATES_PER_RUN = 1.2e8;
/** Steps run once before timing so the JIT has compiled the kernels (not counted). */
const WARMUP_STEPS_SMALL_GRID = 200;

/**
 * What is timed on each grid: `plain`, leapfrogStep on per-cell coefficient arrays (the native reference's layout)
 * with the surface-impedance row; `cpml`, the same with both absorbing layers; `profiles`, the plain step with
 * coefficients shared by column profile, as solve() lays them out; `inTurn` and `cpmlInTurn`, the plain and CPML
 * steps as the five updates one after another (the kernel before leapfrogStep: the same numbers, for the
 * before/after ratio).
 */
const MEASURES = ['plain', 'cpml', 'profiles', 'inTurn', 'cpmlInTurn'] as const;
type Measure = (typeof MEASURES)[number];

interface MeasureResult {
  /** Median of the runs, Mcells/s (nx·nz·steps / seconds / 1e6, the reference's own definition). */
  mcellsPerS: number;
  /** Median over the alternations of (ours ÷ native base) of the same alternation; null without the reference. */
  ratio: number | null;
  /** Smallest and largest of those per-alternation ratios: how noisy the machine was. */
  ratioRange: [number, number] | null;
  /** Every run's Mcells/s, for the record. */
  runs: number[];
}

interface SizeResult {
  grid: string;
  nx: number;
  nz: number;
  steps: number;
  nativeBaseMcellsPerS: number | null;
  nativeRuns: number[];
  measures: Partial<Record<Measure, MeasureResult>>;
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
  fields: 'float64' | 'float32';
  native: { build: string } | { skipped: string };
  repeats: number;
  sizes: SizeResult[];
  measures: Measure[];
  /** Absent with --kernels-only. */
  demo?: { description: string; cells: number; steps: number; wallS: number[]; medianWallS: number; mcellsPerS: number };
  startup?: StartupTimes;
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
  measures: readonly Measure[],
  ref: NativeReference | undefined,
  log: (s: string) => void,
  fields32: boolean,
): SizeResult {
  const { nx, nz } = size;
  const steps = Math.max(1, Math.round(CELL_UPDATES_PER_RUN / (nx * nz)));
  const cells = nx * nz * steps;
  const variantOf: Record<Measure, KernelVariant> = { plain: 'plain', cpml: 'cpml', profiles: 'profiles', inTurn: 'plain', cpmlInTurn: 'cpml' };
  const grids = new Map<Measure, BenchGrid>();
  for (const m of measures) grids.set(m, buildBenchGrid(nx, nz, m === 'profiles' ? 'profiles' : 'per-cell', fields32));
  const nativeRuns: number[] = [];
  const runs = new Map<Measure, number[]>(measures.map((m) => [m, []]));
  const nativeShares: number[] = [];
  const ourShares: number[] = [];
  // alternate the native run and ours so drifting load on the shared machine touches each alike
  for (let r = 0; r < repeats; r++) {
    if (ref) {
      const run = runNativeReference(ref, nx, nz, steps, 'base');
      nativeRuns.push(run.mcellsPerS);
      if (run.cpuShare !== null) nativeShares.push(run.cpuShare);
    }
    for (const m of measures) {
      const t = runKernel(grids.get(m)!, variantOf[m], steps, m === 'inTurn' || m === 'cpmlInTurn' ? 'in-turn' : 'step');
      runs.get(m)!.push(cells / t.wallS / 1e6);
      ourShares.push(t.cpuS / t.wallS);
    }
    log(`  ${size.name} ${nx}×${nz}, ${steps} steps: run ${r + 1}/${repeats}`);
  }
  const results: Partial<Record<Measure, MeasureResult>> = {};
  for (const m of measures) {
    if (!Number.isFinite(fieldEnergy(grids.get(m)!))) throw new Error(`bench grid ${size.name} (${m}) diverged`);
    const ours = runs.get(m)!;
    const paired = ref ? ours.map((x, r) => x / nativeRuns[r]) : [];
    results[m] = {
      mcellsPerS: median(ours),
      ratio: ref ? median(paired) : null,
      ratioRange: ref ? [Math.min(...paired), Math.max(...paired)] : null,
      runs: ours,
    };
  }
  return {
    grid: size.name,
    nx,
    nz,
    steps,
    nativeBaseMcellsPerS: ref ? median(nativeRuns) : null,
    nativeRuns,
    measures: results,
    cpuShare: { nativeBase: nativeShares.length ? median(nativeShares) : null, ours: median(ourShares) },
  };
}

function benchDemo(repeats: number): NonNullable<BenchReport['demo']> {
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
  out.push(`node ${rep.node}, ${rep.cpu}, main thread ${rep.pinnedToCore0 ? 'pinned to core 0' : 'not pinned'}; fields in ${rep.fields}${rep.fields === 'float32' ? ' (the C reference stays double)' : ''}`);
  const loads = (l: number[]): string => l.map((x) => x.toFixed(2)).join(' ');
  out.push(`load average before ${loads(rep.loadAverageBefore)}, after ${loads(rep.loadAverageAfter)}`);
  out.push('build' in rep.native ? `native reference: ${rep.native.build}, base variant` : `native reference skipped: ${rep.native.skipped}`);
  out.push(`Mcells/s = nx·nz·steps / wall s / 1e6, median of ${rep.repeats}, one core; ours/C = median over the alternations of`);
  out.push('each one\'s ratio [smallest–largest]; CPU share = CPU s / wall s (1: the core was ours)');
  out.push('plain: leapfrogStep, per-cell coefficients; +CPML: with both layers; profiles: solve()\'s coefficient layout;');
  out.push('in turn: the plain (+CPML) step as updateH, (updateHCpml,) applySurfaceImpedance, updateE (, updateECpml) called one\nafter another, the kernel before leapfrogStep (the same numbers)');
  out.push('');
  const shown = MEASURES.filter((m) => rep.sizes.some((s) => s.measures[m]));
  const label: Record<Measure, string> = { plain: 'plain', cpml: '+CPML', profiles: 'profiles', inTurn: 'in turn', cpmlInTurn: '+CPML in turn' };
  const header = ['grid', 'nx×nz', 'steps', 'C base', ...shown.flatMap((m) => [`ours ${label[m]}`, `${label[m]}/C`]), 'CPU share C/ours'];
  const rows = rep.sizes.map((s) => [
    s.grid,
    `${s.nx}×${s.nz}`,
    String(s.steps),
    fmt(s.nativeBaseMcellsPerS, 0),
    ...shown.flatMap((m) => {
      const r = s.measures[m];
      if (!r) return ['—', '—'];
      const range = r.ratioRange ? ` [${r.ratioRange[0].toFixed(2)}–${r.ratioRange[1].toFixed(2)}]` : '';
      return [fmt(r.mcellsPerS, 0), `${fmt(r.ratio, 2)}${range}`];
    }),
    `${fmt(s.cpuShare.nativeBase, 2)} / ${fmt(s.cpuShare.ours, 2)}`,
  ]);
  const widths = header.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j].length)));
  const line = (cells: string[]): string => cells.map((c, j) => (j < 2 ? c.padEnd(widths[j]) : c.padStart(widths[j]))).join('  ');
  out.push(line(header));
  for (const r of rows) out.push(line(r));
  out.push('');
  const d = rep.demo;
  if (d) {
    out.push(`demo solve(): ${d.description}`);
    out.push(`  ${d.cells} cells, ${d.steps} steps: ${d.medianWallS.toFixed(2)} s wall (median of ${d.wallS.length}), ${d.mcellsPerS.toFixed(0)} Mcells/s overall`);
  }
  const st = rep.startup;
  if (st) {
    out.push(`start-up: loamwave --version ${st.versionS.toFixed(3)} s, --help ${st.helpS.toFixed(3)} s (median of ${st.runs} fresh processes; target ≤ 0.3 s)`);
  }
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

function measureList(v: string): Measure[] {
  const names = v.split(',').map((s) => s.trim());
  for (const n of names) {
    if (!(MEASURES as readonly string[]).includes(n)) throw new InvalidArgumentError(`unknown measurement "${n}"; choose from ${MEASURES.join(', ')}.`);
  }
  return MEASURES.filter((m) => names.includes(m));
}

async function main(): Promise<void> {
  const program = new Command('kernel-bench')
    .description('cell-updates per second of the FDTD kernels beside the native C reference')
    .option('--json', 'print the report as JSON on stdout')
    .option("--repeats <n>", "timed runs per measurement, alternated with the native runs (the median is reported)", positiveInt, 5)
    .option('--grids <names>', 'comma-separated grids: small, medium, large', sizeList, SIZES.map((s) => s.name))
    .option('--measures <names>', `comma-separated kernel measurements: ${MEASURES.join(', ')}`, measureList, [...MEASURES])
    .option('--kernels-only', 'skip the demo solve() and the start-up time')
    .addOption(
      new Option('--fields <precision>', 'storage of the field arrays (grid.field_precision); run float32 in a process of its own, as npm run bench does: one process timing both would make every kernel serve two array types')
        .choices(['float64', 'float32'])
        .default('float64'),
    )
    .option('--no-native', 'skip the native C reference')
    .option('--native-dir <path>', 'folder holding fdtd2d.c', defaultReferenceDir())
    .parse();
  const opts = program.opts<{
    json?: boolean;
    repeats: number;
    grids: string[];
    measures: Measure[];
    kernelsOnly?: boolean;
    fields: 'float64' | 'float32';
    native: boolean;
    nativeDir: string;
  }>();
  const log = (s: string): void => void process.stderr.write(s + '\n');

  const loadAverageBefore = loadavg();
  const pinned = pinMainThread();
  const built = opts.native ? buildNativeReference(opts.nativeDir) : 'skipped with --no-native';
  const ref = typeof built === 'string' ? undefined : built;
  if (typeof built === 'string') log(`native reference skipped: ${built}`);
  try {
    // warm-up: compile every kernel path before anything is timed
    const fields32 = opts.fields === 'float32';
    const warm = buildBenchGrid(200, 100, 'per-cell', fields32);
    for (const entry of ['step', 'in-turn'] as const) {
      runKernel(warm, 'plain', WARMUP_STEPS_SMALL_GRID, entry);
      runKernel(warm, 'cpml', WARMUP_STEPS_SMALL_GRID, entry);
    }
    const sizes = SIZES.filter((s) => opts.grids.includes(s.name)).map((s) => benchSize(s, opts.repeats, opts.measures, ref, log, fields32));
    let demo: BenchReport['demo'];
    let startup: BenchReport['startup'];
    if (!opts.kernelsOnly) {
      log('  demo solve()');
      demo = benchDemo(opts.repeats);
      log('  start-up of the command line');
      startup = measureStartup();
    }
    const report: BenchReport = {
      date: new Date().toISOString(),
      node: process.version,
      cpu: `${cpus()[0]?.model ?? 'unknown cpu'} × ${cpus().length}`,
      loadAverageBefore,
      loadAverageAfter: loadavg(),
      pinnedToCore0: pinned && (ref?.pinned ?? true),
      fields: opts.fields,
      native: ref ? { build: ref.build } : { skipped: String(built) },
      repeats: opts.repeats,
      measures: opts.measures,
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
