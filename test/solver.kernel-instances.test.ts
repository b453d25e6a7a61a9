// Float32 fields step on a kernel instance of their own (solver/kernel-instances.ts), so that a process that runs
// both precisions keeps each kernel specialized to one kind of typed array. These tests hold that the instance is
// really a second one, under the test runner and in the compiled program the workers run, and that it is the
// same code: on the same grid both instances give the same bits (reordering nothing, common practice).
import { execFileSync } from 'node:child_process';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseCase } from '../schemas/case.js';
import { buildYeeGrid } from '../solver/index.js';
import { kernelFor } from '../solver/kernel-instances.js';
import { ensureCompiled, PROJECT_ROOT } from './helpers/compiled.js';

const CASE = parseCase({
  frequency_hz: 20_000,
  ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
  domain: { range_m: 20_000, height_m: 10_000 },
  grid: { cells_per_wavelength: 10, absorbing_cells: 10 },
  receivers: { ranges_m: [10_000] },
});

describe('kernel instances by field precision', () => {
  beforeAll(() => ensureCompiled());

  it('when float32 is asked for then a second instance of the kernel module is given, with every function its own', () => {
    const k64 = kernelFor('float64');
    const k32 = kernelFor('float32');
    expect(k32).not.toBe(k64);
    expect(Object.keys(k32).sort()).toEqual(Object.keys(k64).sort());
    expect(k32.leapfrogStep).not.toBe(k64.leapfrogStep);
    expect(k32.updateH).not.toBe(k64.updateH);
  });

  it('when the compiled program loads the instances then they are distinct there too', () => {
    const url = new URL(`file://${join(PROJECT_ROOT, 'dist', 'solver', 'kernel-instances.js')}`).href;
    const out = execFileSync(process.execPath, ['--input-type=module', '-e', `const { kernelFor } = await import(${JSON.stringify(url)}); console.log(kernelFor('float32').leapfrogStep !== kernelFor('float64').leapfrogStep);`], { encoding: 'utf8' });
    expect(out.trim()).toBe('true');
  });

  it('when both instances step copies of one float64 grid then the fields agree bit for bit', () => {
    const a = buildYeeGrid(CASE);
    const b = buildYeeGrid(CASE);
    for (const g of [a, b]) g.f.ez[g.f.S * 3 + 5] = 1; // a pulse off the axis, above the ground
    for (let n = 0; n < 40; n++) {
      kernelFor('float64').leapfrogStep(a.f, a.pml, a.zrow);
      kernelFor('float32').leapfrogStep(b.f, b.pml, b.zrow);
    }
    let moved = 0;
    for (const name of ['ex', 'ez', 'hy'] as const) {
      for (let q = 0; q < a.f[name].length; q++) {
        expect(Object.is(a.f[name][q], b.f[name][q]), `${name}[${q}]`).toBe(true);
        if (a.f[name][q] !== 0) moved++;
      }
    }
    expect(moved).toBeGreaterThan(100); // the pulse spread: the comparison has teeth
  });
});
