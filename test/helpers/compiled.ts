// Worker threads and spawned commands load compiled JavaScript from dist/ (a .ts file cannot be a thread entry);
// `npm test` compiles first, and this helper compiles when a test is run on its own with stale or missing output.
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';

export const PROJECT_ROOT = new URL('../..', import.meta.url).pathname.replace(/\/$/, '');

function newestSourceMs(dir: string): number {
  let newest = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, entry.name);
    if (entry.isDirectory()) newest = Math.max(newest, newestSourceMs(p));
    else if (entry.name.endsWith('.ts')) newest = Math.max(newest, statSync(p).mtimeMs);
  }
  return newest;
}

/** Compile to dist/ unless every compiled file the tests load is newer than the sources. */
export function ensureCompiled(): void {
  const outputs = ['dist/worker/solve-thread.js', 'dist/worker/queue-processor.js', 'dist/coordinator/cli.js'].map((p) => join(PROJECT_ROOT, p));
  const sources = Math.max(...['schemas', 'solver', 'worker', 'coordinator'].map((d) => newestSourceMs(join(PROJECT_ROOT, d))));
  if (outputs.every((o) => existsSync(o) && statSync(o).mtimeMs >= sources)) return;
  // Type errors elsewhere in the tree still emit JavaScript; only missing output is fatal here.
  spawnSync('npx', ['tsc', '-p', '.'], { cwd: PROJECT_ROOT, stdio: 'ignore' });
  const missing = outputs.filter((o) => !existsSync(o));
  if (missing.length > 0) throw new Error(`compiling with \`npx tsc -p .\` did not produce ${missing.join(', ')}`);
}
