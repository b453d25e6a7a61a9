// One version everywhere: the command line's --version, the solver version written into every result and report,
// and package.json's version are the same string.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { SOLVER_VERSION } from '../solver/version.js';
import { runCliSync } from './helpers/cli-process.js';
import { ensureCompiled, PROJECT_ROOT } from './helpers/compiled.js';

beforeAll(() => ensureCompiled());

describe('version', () => {
  it('when asked for its version then loamwave prints the one in package.json, which is the solver version', () => {
    const pkg = JSON.parse(readFileSync(join(PROJECT_ROOT, 'package.json'), 'utf8')) as { version: string };
    expect(pkg.version).toBe(SOLVER_VERSION);
    const r = runCliSync(['--version'], PROJECT_ROOT);
    expect(r.code).toBe(0);
    expect(r.stdout.trim()).toBe(pkg.version);
  });

  it('when a usage error happens then the exit code is 2 (a mistake in the input), not 1 (failed jobs)', () => {
    for (const args of [['bogus-command'], ['run'], ['plan', 'x.yaml', '--workers', 'x'], ['run', 'x.yaml', '--workers', 'x']]) {
      const r = runCliSync(args, PROJECT_ROOT);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr.trim().split('\n'), args.join(' ')).toHaveLength(1);
    }
  });
});
