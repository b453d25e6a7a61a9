// Grid convergence: Celik et al. 2008 worked example, behaviour flags, and the grouping of sweep runs.
import { describe, expect, it } from 'vitest';
import { apparentOrder, convergenceTable, describeGroup, gridConvergence, type ConvergenceRun } from '../coordinator/analysis/grid-convergence.js';
import { unwrapNearDeg } from '../solver/phase.js';
import { ConvergenceRowSchema } from '../schemas/analysis-rows.js';

// Celik, Ghia, Roache, Freitas, Coleman & Raad, "Procedure for estimation and reporting of uncertainty due to
// discretization in CFD applications", J. Fluids Eng. 130(7), 078001, 2008, Table 1, first column (published):
// N1, N2, N3 = 18000, 8000, 4500 cells in 2-D, so h ∝ N^(−1/2); φ = 6.063, 5.972, 5.863.
const celik = [18000, 8000, 4500].map((cells, k) => ({ h: cells ** -0.5, phi: [6.063, 5.972, 5.863][k] }));

describe('grid convergence after Celik et al. 2008', () => {
  const r = gridConvergence(celik);

  it.each([
    // [figure, computed, published value, tolerance: half a unit of the last published digit]
    ['r21', () => r.r21, 1.5, 0.005],
    ['r32', () => r.r32, 1.333, 0.0005],
    ['apparent order p', () => r.apparentOrder, 1.53, 0.005],
    ['φ_ext21', () => r.phiExtrapolated, 6.1685, 0.00005],
    ['e_a21', () => r.relativeError21, 0.015, 0.0005],
    ['e_ext21', () => r.extrapolatedRelativeError21, 0.017, 0.0005],
    ['GCI_fine21', () => r.gciFine21, 0.022, 0.0005],
  ])('when given the worked example then %s matches the published table', (_name, value, published, tol) => {
    expect(Math.abs(value() - published)).toBeLessThanOrEqual(tol);
  });

  it('when the example converges monotonically then it is flagged monotone with the GCI band in φ units', () => {
    expect(r.behaviour).toBe('monotone');
    // Absolute band = GCI_fine21·|φ1| (same formula, Celik eq. 5c, times φ1).
    expect(r.uncertainty).toBeCloseTo(r.gciFine21 * Math.abs(r.phi1), 12);
  });

  it('when the solution follows φ = φ0 + C·h² exactly then the order is 2 and φ_ext recovers φ0', () => {
    // Richardson extrapolation is exact for a pure power-law error (Roache, Verification and Validation in
    // Computational Science and Engineering, 1998, ch. 5): unequal ratios exercise the q(p) term.
    const levels = [1, 1.7, 2.3].map((h) => ({ h, phi: 3 + 0.05 * h * h }));
    const g = gridConvergence(levels);
    expect(g.apparentOrder).toBeCloseTo(2, 9);
    expect(g.phiExtrapolated).toBeCloseTo(3, 9);
  });

  it.each([
    // [case, φ1, φ2, φ3, expected behaviour, expected verdict]
    ['the solution swings from side to side', 1.0, 1.1, 0.95, 'oscillatory', 'refine'],
    ['differences grow with refinement', 1.0, 1.3, 1.4, 'divergent', 'unreliable'],
    ['two grids agree exactly', 1.0, 1.0, 1.2, 'zero_difference', 'unreliable'],
    ['all grids agree exactly', 1.0, 1.0, 1.0, 'zero_difference', 'converged'],
  ])('when %s then the behaviour and verdict say so', (_c, p1, p2, p3, behaviour, verdict) => {
    const g = gridConvergence([{ h: 1, phi: p1 }, { h: 2, phi: p2 }, { h: 4, phi: p3 }], { tolerance: 0.01 });
    expect(g.behaviour).toBe(behaviour);
    expect(g.verdict).toBe(verdict);
  });

  it('when an oscillating series swings by less than the tolerance then it counts as converged', () => {
    const g = gridConvergence([{ h: 1, phi: 1.0 }, { h: 2, phi: 1.004 }, { h: 4, phi: 0.999 }], { tolerance: 0.01 });
    // Stern et al., J. Fluids Eng. 123, 2001: oscillatory uncertainty = half the range of the solutions.
    expect(g.uncertainty).toBeCloseTo(0.0025, 12);
    expect(g.verdict).toBe('converged');
  });

  it('when the refinement ratios are equal then the iteration reduces to the closed form ln(ε32/ε21)/ln r', () => {
    // With r21 = r32, q(p) = 0 (Celik et al. 2008, eq. 3b with s = 1).
    expect(apparentOrder(2, 2, 0.1, 0.4)).toBeCloseTo(2, 12);
  });

  it('when fewer than three levels are given then it refuses', () => {
    expect(() => gridConvergence(celik.slice(0, 2))).toThrow(/three grid levels/);
  });
});

describe('convergence rows for a sweep', () => {
  // Synthetic runs from a known error model: dB = 60 − 0.02·range_km + 40/cpw², phase = −170 − 30/cpw² (wraps).
  const cpws = [10, 14, 20, 28];
  const runs: ConvergenceRun[] = [];
  for (const freq of [20000, 40000]) {
    for (const cpw of cpws) {
      runs.push({
        params: { frequency_hz: freq, grid_cells_per_wavelength: cpw },
        resolution: cpw,
        receivers: [50000, 100000].map((range) => {
          const phase = -170 - 30 / cpw ** 2 - freq / 4000;
          return {
            range_m: range,
            height_m: 0,
            ez_db_uv_per_m: 60 - 0.02 * (range / 1000) + 40 / cpw ** 2,
            // Report phases wrapped into (−180, 180] as the solver does.
            ez_phase_deg: ((((phase + 180) % 360) + 360) % 360) - 180,
          };
        }),
      });
    }
  }
  // A group with only two levels: no convergence row.
  runs.push(...[10, 20].map((cpw) => ({ params: { frequency_hz: 60000 }, resolution: cpw, receivers: runs[0].receivers })));
  const rows = convergenceTable(runs, { axis: 'cells_per_wavelength', toleranceDb: 0.1, tolerancePhaseDeg: 0.5 });

  it('when runs differ only in resolution then each group, receiver and output gets one schema-valid row', () => {
    // 2 frequency groups × 2 receivers × 2 outputs; the two-level group is left out.
    expect(rows).toHaveLength(8);
    for (const row of rows) expect(ConvergenceRowSchema.parse(row)).toEqual(row);
    expect(new Set(rows.map((r) => r.group))).toEqual(new Set(['{"frequency_hz":20000}', '{"frequency_hz":40000}']));
    expect(describeGroup(rows[0].group)).toBe('frequency_hz = 20000');
    expect(describeGroup('{}')).toBe('all runs');
  });

  it('when the error goes as 1/cpw² then the apparent order is 2 and the extrapolation removes it', () => {
    for (const row of rows) {
      expect(row.apparent_order).toBeCloseTo(2, 6);
      expect(JSON.parse(row.levels_json).map((l: number[]) => l[0])).toEqual([28, 20, 14, 10]);
      expect([row.resolution1, row.resolution2, row.resolution3, row.levels]).toEqual([28, 20, 14, 4]);
      const exact =
        row.output === 'ez_db_uv_per_m'
          ? 60 - 0.02 * (row.range_m / 1000)
          : -170 - JSON.parse(row.group).frequency_hz / 4000;
      // Phases are compared modulo whole turns.
      const got = row.output === 'ez_phase_deg' ? unwrapNearDeg(row.phi_extrapolated!, exact) : row.phi_extrapolated!;
      expect(got).toBeCloseTo(exact, 6);
    }
  });

  it('when the phase wraps through ±180° between levels then it is unwrapped against the finest level', () => {
    const phase = rows.find((r) => r.output === 'ez_phase_deg' && r.group === '{"frequency_hz":20000}')!;
    const values = JSON.parse(phase.levels_json).map((l: number[]) => l[1]);
    const spread = Math.max(...values) - Math.min(...values);
    expect(spread).toBeLessThan(1);
    expect(unwrapNearDeg(-179, 179)).toBe(181);
  });

  it('when the finest phase is exactly 0° then the relative error is null and the row still fits the schema', () => {
    // e_a21 = |(φ1 − φ2)/φ1| has no value at φ1 = 0 (Celik et al. 2008, eq. 5a); the absolute band still does.
    const zeroRuns: ConvergenceRun[] = [10, 20, 40].map((cpw) => ({
      params: {},
      resolution: cpw,
      receivers: [{ range_m: 1000, height_m: 0, ez_db_uv_per_m: 50 + 1 / cpw ** 2, ez_phase_deg: cpw === 40 ? 0 : 8 / cpw ** 2 - 8 / 1600 }],
    }));
    const phase = convergenceTable(zeroRuns, { axis: 'cells_per_wavelength' }).find((r) => r.output === 'ez_phase_deg')!;
    expect(phase.e_a21).toBeNull();
    expect(phase.apparent_order).toBeCloseTo(2, 9);
    expect(ConvergenceRowSchema.parse(phase)).toEqual(phase);
  });

  it('when the finest band exceeds the tolerance then the verdict asks for a finer grid', () => {
    const db = rows.find((r) => r.output === 'ez_db_uv_per_m')!;
    // Band at cpw 28 vs 20: 1.25·40·(1/20² − 1/28²)/((28/20)² − 1) = 0.0638 dB < 0.1 dB: converged.
    expect(db.uncertainty).toBeCloseTo((1.25 * 40 * (1 / 400 - 1 / 784)) / (1.4 ** 2 - 1), 6);
    expect(db.verdict).toBe('converged');
    const strict = convergenceTable(runs, { axis: 'cells_per_wavelength', toleranceDb: 0.01 });
    expect(strict.find((r) => r.output === 'ez_db_uv_per_m')!.verdict).toBe('refine');
  });
});
