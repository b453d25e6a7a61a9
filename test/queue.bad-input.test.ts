// Mistakes on the queue commands: an unreachable server, a malformed URL or prefix, a missing --redis. Each is one
// line naming the option and the fix, a non-zero exit, and no output folder left behind.
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCliSync } from './helpers/cli-process.js';
import { ensureCompiled, PROJECT_ROOT } from './helpers/compiled.js';

const SWEEP = join(PROJECT_ROOT, 'examples', 'quorvessin-vlf-coast.yaml');
let scratch: string;
beforeAll(() => {
  ensureCompiled();
  scratch = mkdtempSync(join(tmpdir(), 'loamwave-qbad-'));
});
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe('queue commands given bad input', () => {
  // Port 1 (tcpmux) has no Redis behind it on a test machine: the connection is refused at once.
  it.each<[string, string[], number, RegExp]>([
    ['submit to an unreachable server', ['submit', SWEEP, '--redis', 'redis://127.0.0.1:1'], 3, /^error: --redis: cannot reach redis:\/\/127\.0\.0\.1:1 \(connect ECONNREFUSED[^)]*\); start Redis or correct the URL$/],
    ['run with a password in an unreachable URL', ['run', SWEEP, '--redis', 'redis://:hush@127.0.0.1:1'], 3, /^error: --redis: cannot reach redis:\/\/:\*\*\*@127\.0\.0\.1:1 /],
    ['collect from a URL of the wrong scheme', ['collect', SWEEP, '--redis', 'http://127.0.0.1:6379'], 2, /^error: --redis: the URL must start with redis:\/\/ or rediss:\/\//],
    ['submit with a prefix holding a colon', ['submit', SWEEP, '--redis', 'redis://127.0.0.1:1', '--prefix', 'a:b'], 2, /^error: --prefix: "a:b" may hold only/],
    ['submit without --redis', ['submit', SWEEP], 2, /^error: required option '--redis <url>' not specified$/],
    ['a worker with zero concurrency', ['worker', '--redis', 'redis://127.0.0.1:1', '--concurrency', '0'], 2, /^error: option '--concurrency <n>' argument '0' is invalid\. expected a whole number from 1 to 1024$/],
  ])('when it is %s then one line says so and nothing is written', (_what, args, code, message) => {
    const out = join(scratch, `out-${args[0]}-${code}`);
    const withOut = args[0] === 'worker' ? args : [...args, '--out', out];
    const r = runCliSync(withOut, scratch, { [`LOAMWAVE_REDIS_URL`]: '' });
    expect(r.code).toBe(code);
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(message);
    expect(r.stderr).not.toContain('hush');
    expect(existsSync(out)).toBe(false);
  });
});
