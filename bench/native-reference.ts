// Builds and runs the native C reference kernel (fdtd2d.c: an external yardstick, not part of the repository and
// never copied in; see docs/references.md) so the benchmark can set our kernels' speed beside it in one run.
// Build goes to a fresh temporary directory; a missing compiler or source is reported, not thrown.
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

/** Default location of the shared reference, seen from the compiled bench/ folder (dist/bench → ../../../shared). */
export function defaultReferenceDir(): string {
  const here = dirname(fileURLToPath(import.meta.url));
  return resolve(here, '..', '..', '..', 'shared', 'bench');
}

export interface NativeReference {
  /** Path of the built executable. */
  executable: string;
  /** Compiler command line used (for the report). */
  build: string;
  /** Whether runs are pinned with `taskset -c 0`. */
  pinned: boolean;
  /** Whether /usr/bin/time is there to report each run's CPU share. */
  timed: boolean;
  /** Remove the temporary build directory. */
  dispose(): void;
}

export interface NativeRun {
  variant: string;
  nx: number;
  nz: number;
  steps: number;
  seconds: number;
  mcellsPerS: number;
  /** CPU seconds over wall seconds of the whole process (set-up included), from /usr/bin/time; null without it. */
  cpuShare: number | null;
}

const TIME_BIN = '/usr/bin/time';

function onPath(cmd: string): boolean {
  return spawnSync('sh', ['-c', `command -v ${cmd}`], { stdio: 'ignore' }).status === 0;
}

/** Build the reference with gcc -O3 -march=native; a string says why it cannot be built. */
export function buildNativeReference(referenceDir = defaultReferenceDir()): NativeReference | string {
  const source = join(referenceDir, 'fdtd2d.c');
  if (!existsSync(source)) return `native reference not found at ${source}`;
  if (!onPath('gcc')) return 'gcc is not on PATH; install gcc to compare against the native reference';
  const dir = mkdtempSync(join(tmpdir(), 'loamwave-bench-'));
  const executable = join(dir, 'fdtd2d_o3');
  const args = ['-O3', '-march=native', '-o', executable, source, '-lm'];
  try {
    execFileSync('gcc', args, { stdio: ['ignore', 'ignore', 'pipe'] });
  } catch (e) {
    rmSync(dir, { recursive: true, force: true });
    return `gcc failed to build ${source}: ${String((e as { stderr?: Buffer }).stderr ?? e).trim().split('\n')[0]}`;
  }
  return {
    executable,
    build: `gcc ${args.join(' ').replace(executable, '<tmp>/fdtd2d_o3')}`,
    pinned: onPath('taskset'),
    timed: existsSync(TIME_BIN),
    dispose: () => rmSync(dir, { recursive: true, force: true }),
  };
}

/** Parse the reference's one output line (`key=value` pairs). */
export function parseNativeLine(line: string): NativeRun {
  const kv = new Map(
    line
      .trim()
      .split(/\s+/)
      .map((p) => p.split('=') as [string, string]),
  );
  const num = (key: string): number => {
    const v = Number(kv.get(key));
    if (!Number.isFinite(v)) throw new Error(`native reference output lacks ${key}: ${line}`);
    return v;
  };
  return {
    variant: kv.get('variant') ?? '?',
    nx: num('nx'),
    nz: num('nz'),
    steps: num('steps'),
    seconds: num('seconds'),
    mcellsPerS: num('mcells'),
    cpuShare: null,
  };
}

/** One timed run of the reference (`base` variant unless told), pinned to core 0 when taskset exists. */
export function runNativeReference(ref: NativeReference, nx: number, nz: number, steps: number, variant = 'base'): NativeRun {
  let argv = [ref.executable, String(nx), String(nz), String(steps), variant];
  if (ref.pinned) argv = ['taskset', '-c', '0', ...argv];
  if (ref.timed) argv = [TIME_BIN, '-f', 'loamwave-time user=%U sys=%S wall=%e', ...argv];
  const r = spawnSync(argv[0], argv.slice(1), { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`native reference failed (${argv.join(' ')}): ${r.stderr.trim()}`);
  const run = parseNativeLine(r.stdout);
  const t = /loamwave-time user=([\d.]+) sys=([\d.]+) wall=([\d.]+)/.exec(r.stderr);
  if (t && Number(t[3]) > 0) run.cpuShare = (Number(t[1]) + Number(t[2])) / Number(t[3]);
  return run;
}

/**
 * Two copies of the reference at once, pinned to cores 0 and 1 (unpinned without taskset), against one copy alone
 * on core 0: the machine's own scaling from one core to two on this kernel, whatever our code does. Returns the
 * throughput of the pair (both copies' cell updates over the pair's wall time) over the single copy's.
 */
export async function nativePairScaling(ref: NativeReference, nx: number, nz: number, steps: number, variant = 'base'): Promise<{ alone: NativeRun; pair: NativeRun[]; pairWallS: number; scaling: number }> {
  const alone = runNativeReference(ref, nx, nz, steps, variant);
  const start = (core: number) =>
    new Promise<NativeRun>((resolveRun, reject) => {
      let argv = [ref.executable, String(nx), String(nz), String(steps), variant];
      if (ref.pinned) argv = ['taskset', '-c', String(core), ...argv];
      const child = spawn(argv[0], argv.slice(1), { stdio: ['ignore', 'pipe', 'pipe'] });
      let out = '';
      child.stdout.on('data', (d: Buffer) => (out += d.toString()));
      child.on('error', reject);
      child.on('close', (code) => (code === 0 ? resolveRun(parseNativeLine(out)) : reject(new Error(`native reference failed (${argv.join(' ')}): exit ${code}`))));
    });
  const t0 = performance.now();
  const pair = await Promise.all([start(0), start(1)]);
  const pairWallS = (performance.now() - t0) / 1000;
  const cells = nx * nz * steps;
  return { alone, pair, pairWallS, scaling: (2 * cells) / pairWallS / (cells / alone.seconds) };
}
