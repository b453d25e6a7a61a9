// Latin hypercube sampling, standardised regression coefficients and elementary effects against known answers.
import { describe, expect, it } from 'vitest';
import { latinHypercube } from '../coordinator/sampling/latin-hypercube.js';
import { elementaryEffectRows, elementaryEffects } from '../coordinator/analysis/morris.js';
import { regressionRows, standardisedRegression } from '../coordinator/analysis/regression.js';
import { SensitivityRowSchema } from '../schemas/analysis-rows.js';

describe('Latin hypercube', () => {
  it.each([
    [10, 3],
    [64, 5],
  ])('when drawing %i points in %i dimensions then each coordinate has one point in each of the n strata', (n, d) => {
    // Defining property of a Latin hypercube (McKay, Beckman & Conover, Technometrics 21(2), 1979).
    const pts = latinHypercube(n, d, 17);
    for (let j = 0; j < d; j++) {
      const strata = pts.map((p) => Math.floor(p[j] * n)).sort((a, b) => a - b);
      expect(strata).toEqual(Array.from({ length: n }, (_, k) => k));
    }
  });

  it('when the seed repeats then the sample repeats; another seed gives another sample', () => {
    const a = latinHypercube(20, 4, 1).map((p) => Array.from(p));
    expect(latinHypercube(20, 4, 1).map((p) => Array.from(p))).toEqual(a);
    expect(latinHypercube(20, 4, 2).map((p) => Array.from(p))).not.toEqual(a);
  });

  it('when centred then every coordinate is a stratum midpoint (k + 1/2)/n', () => {
    const pts = latinHypercube(8, 2, 3, { centred: true });
    for (const p of pts) for (const v of p) expect((v * 8 - 0.5) % 1).toBe(0);
  });
});

describe('standardised regression coefficients', () => {
  // Linear model y = 3x1 − 2x2 + 0.5x3 + 7, x_i ~ U(0, 1) independent: SRC_i = b_i·σ_i/σ_y with σ_i² = 1/12 and
  // σ_y² = Σ b_i²/12, so SRC = b_i/√(Σ b²) = (3, −2, 0.5)/√13.25 and R² = 1 (Saltelli et al., Global sensitivity
  // analysis: the primer, 2008, §1.2.5).
  const b = [3, -2, 0.5];
  const norm = Math.sqrt(b.reduce((s, v) => s + v * v, 0));
  const x = latinHypercube(256, 3, 99);
  const y = x.map((p) => 7 + b[0] * p[0] + b[1] * p[1] + b[2] * p[2]);
  const fit = standardisedRegression(x, y);

  it('when the model is linear then the SRCs are the analytic b_i/√Σb² within sampling error of the variances', () => {
    // With 256 LHS points the sample standard deviations are within about 0.3 % of 1/√12 (measured SRC errors
    // at most 0.0013): tolerance 0.01.
    fit.src.forEach((v, i) => expect(Math.abs(v - b[i] / norm)).toBeLessThan(0.01));
    expect(fit.rSquared).toBeCloseTo(1, 10);
  });

  it('when the model is linear then the raw coefficients and intercept are recovered exactly', () => {
    fit.coefficients.forEach((v, i) => expect(v).toBeCloseTo(b[i], 9));
    expect(fit.intercept).toBeCloseTo(7, 9);
  });

  it('when half the variance is not linear then R² falls to the linear share', () => {
    // y = x1 + c·(x2 − 1/2)²: the quadratic term is uncorrelated with x2 (symmetric about 1/2), so
    // R² → Var(x1)/Var(y) = (1/12)/(1/12 + c²/180) (Var((U − 1/2)²) = 1/180). With c = √15 that is 1/2
    // (measured 0.4993 with 4000 points).
    const c = Math.sqrt(15);
    const xs = latinHypercube(4000, 2, 5);
    const ys = xs.map((p) => p[0] + c * (p[1] - 0.5) ** 2);
    expect(Math.abs(standardisedRegression(xs, ys).rSquared - 0.5)).toBeLessThan(0.03);
  });

  it('when the output never varies then every SRC is 0 and the row carries no R²', () => {
    const r = standardisedRegression(x, x.map(() => 5));
    expect(r.src).toEqual([0, 0, 0]);
    const rows = regressionRows('flat', ['a', 'b', 'c'], r);
    expect(rows.map((row) => row.r_squared)).toEqual([null, null, null]);
    for (const row of rows) expect(SensitivityRowSchema.parse(row)).toEqual(row);
  });

  it('when a parameter never varies then it gets no coefficient and no table row', () => {
    const xs = x.map((p) => [p[0], 4]);
    const r = standardisedRegression(xs, xs.map((p) => 2 * p[0]));
    expect(r.src[0]).toBeCloseTo(1, 10);
    expect(Number.isNaN(r.src[1])).toBe(true);
    const rows = regressionRows('f', ['a', 'b'], r);
    expect(rows.map((row) => row.parameter)).toEqual(['a']);
    expect(SensitivityRowSchema.parse(rows[0])).toEqual(rows[0]);
  });
});

describe('elementary effects on a full factorial grid', () => {
  // f = a·x1 + c·x2² on the grid x1, x2 ∈ {0, 0.5, 1}: by the definition of Morris 1991 (eq. 1, range 1):
  // EE_1 = a everywhere; EE_2 = 0.5c (0 → 0.5) or 1.5c (0.5 → 1), three of each. So μ*_1 = a, σ_1 = 0;
  // μ_2 = μ*_2 = c, σ_2 = c·√(6·0.25/5) = c·√0.3 (sample standard deviation).
  const a = 2;
  const c = -4;
  const levels = [0, 0.5, 1];
  const rows = levels.flatMap((x1) => levels.map((x2) => ({ x1, x2 })));
  const y = rows.map((r) => a * r.x1 + c * r.x2 ** 2);
  const ee = elementaryEffects(rows, y, ['x1', 'x2']);

  it.each([
    // [parameter index, μ, μ*, σ, count]
    [0, a, Math.abs(a), 0, 6],
    [1, c, Math.abs(c), Math.abs(c) * Math.sqrt(0.3), 6],
  ])('when parameter %i steps across the grid then μ, μ*, σ match the analytic values', (i, mu, muStar, sigma, count) => {
    expect(ee[i].mu).toBeCloseTo(mu, 12);
    expect(ee[i].muStar).toBeCloseTo(muStar, 12);
    expect(ee[i].sigma).toBeCloseTo(sigma, 12);
    expect(ee[i].count).toBe(count);
  });

  it('when a parameter spans decades on a log scale then steps are measured in decades', () => {
    // y = 10·log10(σ) over σ ∈ {1e-4, 1e-3, 1e-2}: one decade is half the log range, so EE = 10·1/0.5 = 20.
    const grid = [1e-4, 1e-3, 1e-2].map((s) => ({ s }));
    const res = elementaryEffects(grid, grid.map((g) => 10 * Math.log10(g.s)), ['s'], { scales: { s: 'log' } });
    expect(res[0].mu).toBeCloseTo(20, 9);
    expect(res[0].sigma).toBeCloseTo(0, 9);
  });

  it('when turned into table rows then they fit the sensitivity table schema', () => {
    const out = elementaryEffectRows('f', ee);
    expect(out.map((r) => `${r.parameter}:${r.measure}`)).toEqual(['x1:mu_star', 'x1:mu', 'x1:sigma', 'x2:mu_star', 'x2:mu', 'x2:sigma']);
    for (const r of out) expect(SensitivityRowSchema.parse(r)).toEqual(r);
  });
});
