// `loamwave verify --fields float32`: the reference checks with the fields stored in single precision, from the
// command line (the checks themselves, with their published sources, are asserted in solver.references.test.ts).
import { beforeAll, describe, expect, it } from 'vitest';
import { runCliSync } from './helpers/cli-process.js';
import { ensureCompiled, PROJECT_ROOT } from './helpers/compiled.js';

beforeAll(() => ensureCompiled());

interface Row {
  check: string;
  got: string;
  pass: boolean;
}

describe('verify --fields', () => {
  it('when asked for float32 fields then the chosen checks run with them, pass, and read the same to the digits shown', () => {
    const args = ['verify', '--only', 'yee-dispersion,pec-ground-axisymmetric', '--json'];
    const r64 = runCliSync(args, PROJECT_ROOT);
    const r32 = runCliSync([...args, '--fields', 'float32'], PROJECT_ROOT);
    expect(r64.code, r64.stderr).toBe(0);
    expect(r32.code, r32.stderr).toBe(0);
    const a = JSON.parse(r64.stdout) as Row[];
    const b = JSON.parse(r32.stdout) as Row[];
    expect(b.length).toBe(a.length);
    expect(b.length).toBeGreaterThanOrEqual(5);
    for (const [q, row] of b.entries()) {
      expect(row.pass, row.check).toBe(true);
      expect(row.check).toBe(a[q].check);
      // float32 moves these values by 1e-7 of a unit or less (README, "How accurate"): below the digits printed
      expect(row.got, row.check).toBe(a[q].got);
    }
  });

  it('when the precision is not float64 or float32 then a one-line error names the option and the choices, exit 2', () => {
    const r = runCliSync(['verify', '--fields', 'float16'], PROJECT_ROOT);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/--fields/);
    expect(lines[0]).toMatch(/float64/);
    expect(lines[0]).toMatch(/float32/);
  });
});
