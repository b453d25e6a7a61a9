// Property: whatever is done to a valid sweep file (examples/*.yaml), reading, expanding and planning it ends in a
// plan or in one line naming the file and the field (a UserError), never in another exception. In memory for the
// many cases (parse, expansion with the solver's pre-step checks, plan estimate), and through the command line's
// own path for a few hundred (`plan`, and `run` for those `plan` refuses: same exit, nothing written). Nothing is
// solved: a mutation that stays valid only has to pass expansion and plan. Property-based testing after Claessen &
// Hughes, "QuickCheck: a lightweight tool for random testing of Haskell programs", ICFP 2000 (common practice).
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { parse as parseYaml, stringify as stringifyYaml } from 'yaml';
import { UserError } from '../schemas/errors.js';
import { main } from '../coordinator/cli.js';
import { countDesignPoints, expandSweepDetailed } from '../coordinator/sweep/expand.js';
import { parseSweep, parseSweepText } from '../coordinator/sweep/file.js';
import { planSweep } from '../coordinator/sweep/plan.js';
import { PROJECT_ROOT } from './helpers/compiled.js';
import { applyMutations, applyTextMutation, checkOneLine, mutationsArb, textMutationArb, type Json } from './helpers/fuzz-mutations.js';

const EXAMPLES = join(PROJECT_ROOT, 'examples');
const sweeps = readdirSync(EXAMPLES)
  .filter((f) => f.endsWith('.yaml'))
  .sort()
  .map((f) => ({ name: f, text: readFileSync(join(EXAMPLES, f), 'utf8') }));
const docs = sweeps.map((s) => parseYaml(s.text) as Json);

/** Cases in memory and through the command line; fast-check's seed is printed with any failure to replay it. */
const IN_MEMORY_RUNS = 4000;
const CLI_RUNS = Number(process.env.LOAMWAVE_FUZZ_CLI_RUNS ?? 300);
/** Sweeps with more design points than this are parsed and counted but not expanded (time, not correctness). */
const EXPAND_AT_MOST = 400;

const dir = mkdtempSync(join(tmpdir(), 'loamwave-fuzz-sweep-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

type Outcome = 'planned' | 'refused' | 'counted';

/** Parse, expand and plan in memory; a refusal must be one line naming the file. Throws on anything else. */
function throughPlan(input: unknown, source: string): Outcome {
  try {
    const sweep = parseSweep(input, source);
    if (countDesignPoints(sweep) > EXPAND_AT_MOST) return 'counted';
    const expansion = expandSweepDetailed(sweep, source);
    const plan = planSweep(expansion, 2, 1e8, 2 ** 33);
    if (!(plan.jobs >= 1 && Number.isFinite(plan.total_core_hours))) throw new Error(`implausible plan: ${plan.jobs} jobs, ${plan.total_core_hours} core-hours`);
    return 'planned';
  } catch (e) {
    if (!(e instanceof UserError)) throw e;
    const bad = checkOneLine(e.message, source);
    if (bad) throw new Error(`${bad}: ${JSON.stringify(e.message)}`);
    return 'refused';
  }
}

describe('fuzzing the sweep file', () => {
  it('when the examples are read unchanged then every one plans (the starting points are valid)', () => {
    expect(sweeps.length).toBeGreaterThanOrEqual(3);
    for (const s of sweeps) expect(throughPlan(parseSweepText(s.text, s.name), s.name)).toBe('planned');
  });

  it(`when ${IN_MEMORY_RUNS} mutated sweeps are parsed, expanded and planned then each ends in a plan or one line naming the field`, () => {
    const seen: Record<Outcome, number> = { planned: 0, refused: 0, counted: 0 };
    fc.assert(
      fc.property(fc.nat({ max: docs.length - 1 }), mutationsArb, (which, ms) => {
        seen[throughPlan(applyMutations(docs[which], ms), 'fuzz.yaml')]++;
      }),
      { numRuns: IN_MEMORY_RUNS },
    );
    // the mutations must reach both ends: some stay valid (and are planned), most are refused
    expect(seen.planned).toBeGreaterThan(IN_MEMORY_RUNS / 20);
    expect(seen.refused).toBeGreaterThan(IN_MEMORY_RUNS / 4);
  });

  it(`when ${CLI_RUNS} damaged sweep files go through \`loamwave plan\` (and \`run\` where plan refuses) then the exit is 0 or 2 with one line, and a refused run writes nothing`, async () => {
    const cache = join(dir, 'cache');
    const saved = process.env.LOAMWAVE_CACHE_DIR;
    process.env.LOAMWAVE_CACHE_DIR = cache;
    let n = 0;
    const seen = { planned: 0, refused: 0 };
    try {
      await fc.assert(
        fc.asyncProperty(
          fc.nat({ max: docs.length - 1 }),
          fc.oneof(
            fc.record({ how: fc.constant('object' as const), ms: mutationsArb }),
            fc.record({ how: fc.constant('text' as const), ms: fc.array(textMutationArb, { minLength: 1, maxLength: 3 }) }),
          ),
          async (which, damage) => {
            const text =
              damage.how === 'object'
                ? stringifyYaml(applyMutations(docs[which], damage.ms))
                : damage.ms.reduce(applyTextMutation, sweeps[which].text);
            const file = join(dir, `fuzz-${n++}.yaml`);
            writeFileSync(file, text);
            const plan = await cli('plan', file, '--json', '--workers', '2');
            expect(plan.err).not.toContain('internal error');
            expect([0, 2]).toContain(plan.code);
            if (plan.code === 0) {
              seen.planned++;
              expect(JSON.parse(plan.out).jobs).toBeGreaterThanOrEqual(1);
              return;
            }
            seen.refused++;
            mustBeUndefined(oneLineError(plan.err, basename(file)), text);
            const out = join(dir, `out-${n}`);
            const run = await cli('run', file, '--out', out, '--workers', '1');
            expect(run.code).toBe(2);
            mustBeUndefined(oneLineError(run.err, basename(file)), text);
            expect(existsSync(out)).toBe(false);
          },
        ),
        { numRuns: CLI_RUNS },
      );
    } finally {
      if (saved === undefined) delete process.env.LOAMWAVE_CACHE_DIR;
      else process.env.LOAMWAVE_CACHE_DIR = saved;
    }
    expect(seen.planned).toBeGreaterThan(0);
    expect(seen.refused).toBeGreaterThan(CLI_RUNS / 4);
  });

  it.each([
    ['an alias bomb', 'name: a\nbase: &a [x,x,x,x,x,x,x,x,x]\nb: &b [*a,*a,*a,*a,*a,*a,*a,*a,*a]\nc: &c [*b,*b,*b,*b,*b,*b,*b,*b,*b]\nd: [*c,*c,*c,*c,*c,*c,*c,*c,*c,*c,*c,*c]\n', /^fuzz\.yaml: not valid YAML: .*alias/i],
    ['an alias to a missing anchor', 'name: a\nbase: *nowhere\n', /^fuzz\.yaml: not valid YAML.*alias/i],
    ['an anchor that contains its own alias', 'name: a\nbase: &b\n  ground: *b\n', /^fuzz\.yaml: not valid YAML: .*refers to itself/],
    ['an unknown tag', 'name: a\nbase: !secret {}\n', /^fuzz\.yaml: not valid YAML at line 2, column 7: .*tag/i],
    // found by the command-line fuzzing: the reader printed a process warning about the key before the error line
    ['a collection as a key', 'name: a\nbase: {? [x]: 1}\n', /^fuzz\.yaml: job 0 \(base case\): .*\(and \d+ more problem/],
  ])('when the sweep file holds %s then it is refused with one line naming the file, and nothing else is printed', async (_what, text, line) => {
    const warnings: unknown[] = [];
    const listener = (w: unknown) => warnings.push(w);
    process.on('warning', listener);
    let message = '';
    try {
      expandSweepDetailed(parseSweep(parseSweepText(text, 'fuzz.yaml'), 'fuzz.yaml'), 'fuzz.yaml');
    } catch (e) {
      expect(e).toBeInstanceOf(UserError);
      message = (e as Error).message;
    }
    expect(message).toMatch(line);
    expect(checkOneLine(message, 'fuzz.yaml')).toBeUndefined();
    // process warnings are delivered on a later tick
    await new Promise((r) => setTimeout(r, 10));
    process.off('warning', listener);
    expect(warnings).toEqual([]);
  });
});

/** Fails with the whole problem and the input (an expect() message would be cut short). */
function mustBeUndefined(problem: string | undefined, input: string): void {
  if (problem !== undefined) throw new Error(`${problem}\ninput:\n${input}`);
}

/** `error: <file>: …` on one line, or what is wrong with it. */
function oneLineError(stderr: string, file: string): string | undefined {
  const text = stderr.replace(/\n$/, '');
  if (!text.startsWith('error: ')) return `stderr does not start with "error: ": ${JSON.stringify(stderr.slice(0, 300))}`;
  const bad = checkOneLine(text.slice('error: '.length), file);
  return bad ? `${bad}: ${JSON.stringify(stderr.slice(0, 300))}` : undefined;
}

/** Run the command line in-process; stdout and stderr captured (warnings of the YAML reader included). */
async function cli(...args: string[]): Promise<{ out: string; err: string; code: number }> {
  let out = '';
  let err = '';
  vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => ((out += String(s)), true));
  vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => ((err += String(s)), true));
  const warn = vi.spyOn(process, 'emitWarning').mockImplementation((w: string | Error) => void (err += `warning: ${String(w)}\n`));
  process.exitCode = undefined;
  try {
    await main(['node', 'loamwave', ...args]);
  } finally {
    warn.mockRestore();
    vi.restoreAllMocks();
  }
  const code = Number(process.exitCode ?? 0);
  process.exitCode = undefined;
  return { out, err, code };
}
