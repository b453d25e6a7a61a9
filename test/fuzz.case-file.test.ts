// Property: whatever is done to a valid case file (examples/cases/*.json, and the base cases of examples/*.yaml),
// parsing it, the solver's pre-step checks, the cost estimate and the job id end in a valid case or in one line
// naming the field (a UserError), never in another exception; and `loamwave solve` refuses every case the checks
// refuse with exit 2 and one line. Nothing is solved: valid mutations stop after the checks.
// Property-based testing after Claessen & Hughes, ICFP 2000 (common practice).
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { parse as parseYaml } from 'yaml';
import { parseCase } from '../schemas/case.js';
import { UserError } from '../schemas/errors.js';
import { checkSolvable, estimateCost } from '../solver/index.js';
import { main } from '../coordinator/cli.js';
import { jobIdFor } from '../coordinator/sweep/job-id.js';
import { PROJECT_ROOT } from './helpers/compiled.js';
import { applyMutations, applyTextMutation, checkOneLine, mutationsArb, textMutationArb, type Json } from './helpers/fuzz-mutations.js';

const CASES = join(PROJECT_ROOT, 'examples', 'cases');
const EXAMPLES = join(PROJECT_ROOT, 'examples');
const docs: Json[] = [
  ...readdirSync(CASES)
    .filter((f) => f.endsWith('.json'))
    .sort()
    .map((f) => JSON.parse(readFileSync(join(CASES, f), 'utf8')) as Json),
  ...readdirSync(EXAMPLES)
    .filter((f) => f.endsWith('.yaml'))
    .sort()
    .map((f) => (parseYaml(readFileSync(join(EXAMPLES, f), 'utf8')) as { base: Json }).base),
];

const IN_MEMORY_RUNS = 4000;
const CLI_RUNS = 200;

const dir = mkdtempSync(join(tmpdir(), 'loamwave-fuzz-case-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

type Outcome = 'valid' | 'refused';

/** Parse, check, estimate and identify; a refusal must be one line (naming the file for the schema's). */
function throughChecks(input: unknown, source: string): Outcome {
  let stage = 'parse';
  try {
    const c = parseCase(input, source);
    stage = 'checks';
    checkSolvable(c);
    const cost = estimateCost(c);
    if (!(cost.cells_total > 0 && Number.isFinite(cost.cell_updates))) throw new Error(`implausible cost ${JSON.stringify(cost)}`);
    if (!/^[0-9a-f]{64}$/.test(jobIdFor(c))) throw new Error('bad job id');
    return 'valid';
  } catch (e) {
    if (!(e instanceof UserError)) throw e;
    const bad = checkOneLine(e.message, stage === 'parse' ? source : undefined);
    if (bad) throw new Error(`${bad}: ${JSON.stringify(e.message)}`);
    return 'refused';
  }
}

describe('fuzzing the case file', () => {
  it('when the example cases are checked unchanged then every one is valid (the starting points)', () => {
    expect(docs.length).toBeGreaterThanOrEqual(4);
    for (const d of docs) expect(throughChecks(d, 'case.json')).toBe('valid');
  });

  it(`when ${IN_MEMORY_RUNS} mutated cases are parsed, checked, estimated and identified then each is valid or refused with one line naming the field`, () => {
    const seen: Record<Outcome, number> = { valid: 0, refused: 0 };
    fc.assert(
      fc.property(fc.nat({ max: docs.length - 1 }), mutationsArb, (which, ms) => {
        seen[throughChecks(applyMutations(docs[which], ms), 'case.json')]++;
      }),
      { numRuns: IN_MEMORY_RUNS },
    );
    expect(seen.valid).toBeGreaterThan(IN_MEMORY_RUNS / 20);
    expect(seen.refused).toBeGreaterThan(IN_MEMORY_RUNS / 4);
  });

  it('when a resolved ground lists 150 000 segments then the checks and the estimate end without a stack overflow', () => {
    // found by hand beside the fuzzing: Math.min(...list) over so many arguments overflowed the call stack
    const segments = Array.from({ length: 150_000 }, (_, i) => ({ start_m: i * 0.5, conductivity_s_per_m: i % 2 ? 5 : 0.01, relative_permittivity: 70 }));
    const input = { frequency_hz: 20000, ground: { model: 'resolved', segments }, domain: { range_m: 1e5, height_m: 1e4 }, receivers: { ranges_m: [100] } };
    expect(throughChecks(input, 'case.json')).toBe('valid');
  });

  it(`when ${CLI_RUNS} damaged case files that the checks refuse go to \`loamwave solve\` then it exits 2 with one line`, async () => {
    let n = 0;
    let solvedNone = 0;
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
              ? JSON.stringify(applyMutations(docs[which], damage.ms))
              : damage.ms.reduce(applyTextMutation, JSON.stringify(docs[which], null, 2));
          // predict in memory (the command reads JSON, then parses and solves); valid cases are not solved here
          let refused = false;
          try {
            const c = parseCase(JSON.parse(text), 'case.json');
            checkSolvable(c);
          } catch {
            refused = true;
          }
          if (!refused) {
            solvedNone++;
            return;
          }
          const file = join(dir, `case-${n++}.json`);
          writeFileSync(file, text);
          const r = await cli('solve', file, '--json');
          expect(r.err).not.toContain('internal error');
          expect(r.code).toBe(2);
          expect(r.out).toBe('');
          const line = r.err.replace(/\n$/, '');
          expect(line.startsWith('error: ')).toBe(true);
          const message = line.slice('error: '.length);
          // the schema's and the reader's lines start with the file, the solver's checks with the field
          expect(checkOneLine(message, message.startsWith(file) ? file : undefined)).toBeUndefined();
        },
      ),
      { numRuns: CLI_RUNS },
    );
    expect(n).toBeGreaterThan(CLI_RUNS / 4);
    expect(solvedNone).toBeGreaterThan(0);
  });
});

/** Run the command line in-process; stdout and stderr captured, exit code as main() sets it. */
async function cli(...args: string[]): Promise<{ out: string; err: string; code: number }> {
  let out = '';
  let err = '';
  vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => ((out += String(s)), true));
  vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => ((err += String(s)), true));
  process.exitCode = undefined;
  try {
    await main(['node', 'loamwave', ...args]);
  } finally {
    vi.restoreAllMocks();
  }
  const code = Number(process.exitCode ?? 0);
  process.exitCode = undefined;
  return { out, err, code };
}
