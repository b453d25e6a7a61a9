// Running the built command line from tests as a real process: to completion (sync or async, so that other
// processes' output keeps flowing), or in the background with its log and exit, plus polling for a condition.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { join } from 'node:path';
import { PROJECT_ROOT } from './compiled.js';

export const CLI = join(PROJECT_ROOT, 'bin', 'loamwave.js');

export interface Finished {
  code: number | null;
  stdout: string;
  stderr: string;
}

/** Run `loamwave args…` to completion, blocking this process. */
export function runCliSync(args: string[], cwd: string, env: NodeJS.ProcessEnv = {}): Finished {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd, env: { ...process.env, ...env }, encoding: 'utf8' });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Run `loamwave args…` to completion without blocking (background workers' logs keep flowing meanwhile). */
export function runCli(args: string[], cwd: string): Promise<Finished> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [CLI, ...args], { cwd });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => (stderr += d));
    child.on('close', (code) => resolve({ code, stdout, stderr }));
  });
}

export interface Background {
  readonly child: ChildProcess;
  /** stdout and stderr so far, interleaved. */
  log(): string;
  readonly exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

/** Start `loamwave args…` in the background (the queue fixture's `start` also kills it after the tests). */
export function startCli(args: string[], cwd: string): Background {
  const child = spawn(process.execPath, [CLI, ...args], { cwd, stdio: ['ignore', 'pipe', 'pipe'] });
  let text = '';
  child.stdout!.on('data', (d) => (text += d));
  child.stderr!.on('data', (d) => (text += d));
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) =>
    child.once('exit', (code, signal) => resolve({ code, signal })),
  );
  return { child, log: () => text, exited };
}

/** Poll `test` every 50 ms until it holds; fail naming `what` after `timeoutMs`. */
export async function until(what: string, test: () => boolean, timeoutMs = 60_000): Promise<void> {
  const end = Date.now() + timeoutMs;
  while (!test()) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}
