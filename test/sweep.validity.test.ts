// A sweep whose jobs the solver would refuse is refused when it is expanded: `plan`, `submit` and `run` stop with
// one line naming the job (its index and varied values), the field and the fix, exit 2, and nothing is written.
// The checks are the solver's own (solver/validity.ts), so the line at plan time is the line solve() gives.
import { existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, afterEach, describe, expect, it, vi } from 'vitest';
import { parseCase, type CaseInput } from '../schemas/case.js';
import { UserError } from '../schemas/errors.js';
import { ExitCode } from '../schemas/exit-codes.js';
import { checkSolvable, solve } from '../solver/index.js';
import { MAX_GRID_CELLS, planGrid } from '../solver/grid.js';
import { main } from '../coordinator/cli.js';
import { expandSweep } from '../coordinator/sweep/expand.js';
import { parseSweep } from '../coordinator/sweep/file.js';

const dir = mkdtempSync(join(tmpdir(), 'loamwave-validity-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
afterEach(() => {
  vi.restoreAllMocks();
  process.exitCode = undefined;
});

/** ε0, F/m (CODATA 2018 recommended value, Tiesinga et al., Rev. Mod. Phys. 93, 025010, 2021). */
const EPS0 = 8.8541878128e-12;
/** Loss tangent σ/(ωε0εr) (the definition, e.g. Balanis, Advanced Engineering Electromagnetics, 1989, ch. 2; from memory). */
const lossTangent = (fHz: number, sigma: number, epsR: number) => sigma / (2 * Math.PI * fHz * EPS0 * epsR);

// At 20 kHz over εr = 15 the loss tangent is 180 at 3 mS/m (valid) and 0.599 at 10 µS/m (below 1: refused).
const LOW_SIGMA = 1e-5;
const SWEEP_TEXT = `name: validity-test
base:
  frequency_hz: 20000
  ground: {model: impedance, segments: [{start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15}]}
  domain: {range_m: 40000, height_m: 15000}
  grid: {cells_per_wavelength: 8, absorbing_cells: 8}
  receivers: {ranges_m: [10000, 20000]}
vary:
  ground.segments[0].conductivity_s_per_m: {values: [0.003, ${LOW_SIGMA}]}
`;

/** Run the command line in-process from `cwd`; stdout and stderr captured, exit code as main() sets it. */
async function cli(cwd: string, ...args: string[]): Promise<{ out: string; err: string; code: number }> {
  let out = '';
  let err = '';
  vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => ((out += String(s)), true));
  vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => ((err += String(s)), true));
  const savedCwd = process.cwd();
  const savedCache = process.env.LOAMWAVE_CACHE_DIR;
  process.env.LOAMWAVE_CACHE_DIR = join(cwd, 'cache');
  process.chdir(cwd);
  process.exitCode = undefined;
  try {
    await main(['node', 'loamwave', ...args]);
  } finally {
    process.chdir(savedCwd);
    if (savedCache === undefined) delete process.env.LOAMWAVE_CACHE_DIR;
    else process.env.LOAMWAVE_CACHE_DIR = savedCache;
    vi.restoreAllMocks();
  }
  return { out, err, code: Number(process.exitCode ?? 0) };
}

/** A fresh, empty working folder, and the sweep file written beside it (outside it). */
function workspace(name: string, text = SWEEP_TEXT): { cwd: string; sweep: string } {
  const cwd = mkdtempSync(join(dir, `${name}-`));
  const sweep = `${cwd}.validity-test.yaml`;
  writeFileSync(sweep, text);
  return { cwd, sweep };
}

const EXPECTED_LINE = new RegExp(
  // job 1 is the second value; the loss tangent printed to 3 significant figures; the fix names the resolved model
  String.raw`^error: \S*validity-test\.yaml: job 1 \(ground\.segments\[0\]\.conductivity_s_per_m=0\.00001\): ground\.segments\[0\]: ` +
    String.raw`loss tangent σ/\(ωε0εr\) = ${lossTangent(20000, LOW_SIGMA, 15).toPrecision(3).replace('.', '\\.')} is below 1, .*use "ground": \{"model": "resolved"\}`,
);

describe('validity at plan time', () => {
  it('when one job of the vary falls below loss tangent 1 then the expected value is 0.599 (the definition)', () => {
    // a guard on the fixture itself: the first value is far inside the model, the second just outside
    expect(lossTangent(20000, 0.003, 15)).toBeGreaterThan(10);
    expect(lossTangent(20000, LOW_SIGMA, 15)).toBeCloseTo(0.599, 3);
  });

  it.each([
    ['plan', [] as string[]],
    ['plan', ['--json']],
    ['run', []],
    ['run', ['--out', 'elsewhere']],
    // an unreachable queue: refused with exit 2 before connecting (a connection attempt would give exit 3)
    ['submit', ['--redis', 'redis://127.0.0.1:1']],
    ['run', ['--redis', 'redis://127.0.0.1:1']],
  ])('when `%s %j` is given that sweep then it refuses with one line naming job 1, exit 2, and writes nothing', async (command, extra) => {
    const { cwd, sweep } = workspace(`${command}-${extra.join('')}`.replace(/[^a-z0-9-]/gi, '_'));
    const { out, err, code } = await cli(cwd, command, sweep, ...extra);
    expect(code).toBe(ExitCode.inputMistake);
    expect(out).toBe('');
    const lines = err.trimEnd().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(EXPECTED_LINE);
    expect(err).not.toMatch(/\bat .*\.(ts|js):\d+/); // no stack trace
    // no ledger, no outputs, not even the kernel-speed cache: the folder is as it was
    expect(readdirSync(cwd)).toEqual([]);
    expect(existsSync(join(cwd, 'out'))).toBe(false);
  });

  it('when the same low-loss case goes to solve() then it is refused with the very line the expansion gives after the job', () => {
    const sweep = parseSweep({
      name: 'one-home',
      base: {
        frequency_hz: 20000,
        ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: LOW_SIGMA, relative_permittivity: 15 }] },
        domain: { range_m: 40000, height_m: 15000 },
        grid: { cells_per_wavelength: 8, absorbing_cells: 8 },
        receivers: { ranges_m: [10000] },
      },
    });
    let expansionLine = '';
    try {
      expandSweep(sweep, 's.yaml');
    } catch (e) {
      expansionLine = (e as Error).message;
    }
    const c = parseCase(sweep.base);
    expect(() => solve(c)).toThrow(UserError);
    let solveLine = '';
    try {
      solve(c);
    } catch (e) {
      solveLine = (e as Error).message;
    }
    expect(expansionLine).toBe(`s.yaml: job 0 (base case): ${solveLine}`);
  });

  it('when `run --max-memory-mib` is below a job\'s need then run refuses before the ledger exists', async () => {
    const valid = SWEEP_TEXT.replace(`${LOW_SIGMA}]`, '0.01]');
    const { cwd, sweep } = workspace('memory', valid);
    const { err, code } = await cli(cwd, 'run', sweep, '--max-memory-mib', '0.01');
    expect(code).toBe(ExitCode.inputMistake);
    expect(err.trimEnd().split('\n')).toHaveLength(1);
    expect(err).toMatch(/^error: \S*validity-test\.yaml: job 0 \(ground\.segments\[0\]\.conductivity_s_per_m=0\.003\): grid: the case needs about .* MiB .*more than the 0\.010 MiB allowed per case; coarsen/);
    expect(readdirSync(cwd)).toEqual([]);
  });
});

/** A small valid case; `patch` replaces top-level blocks. */
function caseWith(patch: Partial<CaseInput>): CaseInput {
  return {
    frequency_hz: 20000,
    ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.01, relative_permittivity: 15 }] },
    domain: { range_m: 40000, height_m: 15000 },
    receivers: { ranges_m: [10000] },
    ...patch,
  };
}

describe('the pre-step checks, one by one', () => {
  it.each<[string, Partial<CaseInput>, RegExp]>([
    ['the source above the domain', { source: { height_m: 15000 } }, /^source\.height_m: must be below domain\.height_m \(15000\) \(got 15000\); lower the source/],
    ['the source above a pec ceiling', { source: { height_m: 9000 }, upper_boundary: { kind: 'pec', height_m: 8000 } }, /^source\.height_m: must be below upper_boundary\.height_m \(8000\)/],
    ['receivers above a pec ceiling', { receivers: { ranges_m: [10000], height_m: 9000 }, upper_boundary: { kind: 'pec', height_m: 8000 } }, /^receivers\.height_m: must be below the ceiling upper_boundary\.height_m \(8000\) \(got 9000\)/],
    // 1 mm cells over 40 km × 15 km: 4e7 × 1.5e7 cells, far beyond 2^32
    ['a grid beyond the longest typed array', { grid: { cell_size_m: 0.001 } }, /^grid: the case needs \d+ × \d+ cells, more than one grid can hold \(4294967296 cells, 16777216 rows\); coarsen/],
    // resolved ground: rows of a quarter of the sea's skin depth (1.6 m at 20 kHz, 5 S/m) down to 4 skin depths of
    // a 1e-14 S/m ground (3.6e7 m): 3.6e8 rows, over 2^32 cells with the 62 columns
    ['a resolved ground too deep to mesh', { ground: { model: 'resolved', segments: [{ start_m: 0, conductivity_s_per_m: 5, relative_permittivity: 70 }, { start_m: 20000, conductivity_s_per_m: 1e-14, relative_permittivity: 15 }] } }, /^grid: the case needs .* of the rows in the resolved ground\)/],
  ])('when %s then checkSolvable refuses with one line naming the field', (_what, patch, line) => {
    const c = parseCase(caseWith(patch));
    let message = '';
    try {
      checkSolvable(c);
    } catch (e) {
      expect(e).toBeInstanceOf(UserError);
      message = (e as Error).message;
    }
    expect(message).toMatch(line);
    expect(message).not.toContain('\n');
  });

  it('when a grid is refused for its size then planGrid says so before allocating (no RangeError)', () => {
    const c = parseCase(caseWith({ grid: { cell_size_m: 1e-6 } }));
    expect(() => planGrid(c)).toThrow(UserError);
    expect(MAX_GRID_CELLS).toBe(2 ** 32);
  });

  it('when a valid case is checked then it passes, with the grid plan solve() will use and no warnings far from the limit', () => {
    const c = parseCase(caseWith({}));
    const checked = checkSolvable(c, { maxMemoryBytes: 2 ** 30 });
    expect(checked.grid).toEqual(planGrid(c));
    // 10 mS/m at 20 kHz over εr 15: loss tangent 599 (the definition), far above the warning threshold of 10
    expect(lossTangent(20000, 0.01, 15)).toBeGreaterThan(500);
    expect(checked.warnings).toEqual([]);
  });
});
