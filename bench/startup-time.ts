// How long the command line takes to start: `loamwave --version` and `loamwave --help`, each as a fresh Node
// process, wall time from spawn to exit (the user's wait). Every command loads its heavy modules only when it runs,
// so these two load only the argument parser. Target ≤ 0.3 s each on the reference machine.
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

/** The project's command-line shim, from dist/bench/ two levels up. */
const CLI = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'bin', 'loamwave.js');

export interface StartupTimes {
  /** Median wall seconds of each command over `runs` fresh processes (the first, cold-cache run not counted). */
  versionS: number;
  helpS: number;
  runs: number;
}

function timeOnce(args: readonly string[]): number {
  const t0 = process.hrtime.bigint();
  const r = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8' });
  const s = Number(process.hrtime.bigint() - t0) / 1e9;
  if (r.status !== 0) throw new Error(`loamwave ${args.join(' ')} exited ${r.status}: ${r.stderr}`);
  return s;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

export function measureStartup(runs = 7): StartupTimes {
  const time = (args: string[]): number => {
    timeOnce(args); // warm the file cache
    return median(Array.from({ length: runs }, () => timeOnce(args)));
  };
  return { versionS: time(['--version']), helpS: time(['--help']), runs };
}
