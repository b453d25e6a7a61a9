// Standardised regression coefficients (SRC) and R² of a linear fit of one output on the sampled parameters, for
// Latin hypercube and full factorial sweeps. Method: Saltelli et al., "Global sensitivity analysis: the primer",
// Wiley 2008, §1.2.5 (SRC_i = b_i·s_xi/s_y; Σ SRC_i² = R² for uncorrelated inputs). Pure: plain arrays in and out.
import { type SensitivityRow } from '../../schemas/analysis-rows.js';

export interface RegressionResult {
  /** SRC_i for each parameter (NaN for a parameter that never varies). */
  src: number[];
  /** Raw coefficients b_i of y ≈ b_0 + Σ b_i x_i (NaN for a constant parameter). */
  coefficients: number[];
  intercept: number;
  /** Coefficient of determination of the fit. */
  rSquared: number;
  samples: number;
}

function meanAndStd(values: ArrayLike<number>): { mean: number; std: number } {
  let mean = 0;
  for (let k = 0; k < values.length; k++) mean += values[k];
  mean /= values.length;
  let ss = 0;
  for (let k = 0; k < values.length; k++) ss += (values[k] - mean) ** 2;
  // Sample standard deviation (n − 1); the SRC is a ratio of two, so the divisor cancels.
  return { mean, std: Math.sqrt(ss / Math.max(values.length - 1, 1)) };
}

/** Solve M·x = r in place by Gaussian elimination with partial pivoting (Golub & Van Loan, Matrix Computations, §3.4). */
function solveLinear(m: number[][], r: number[]): number[] {
  const n = r.length;
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let row = col + 1; row < n; row++) if (Math.abs(m[row][col]) > Math.abs(m[pivot][col])) pivot = row;
    if (Math.abs(m[pivot][col]) < 1e-12) throw new Error('regression: parameters are collinear; the fit has no unique solution');
    [m[col], m[pivot]] = [m[pivot], m[col]];
    [r[col], r[pivot]] = [r[pivot], r[col]];
    for (let row = col + 1; row < n; row++) {
      const f = m[row][col] / m[col][col];
      for (let k = col; k < n; k++) m[row][k] -= f * m[col][k];
      r[row] -= f * r[col];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let row = n - 1; row >= 0; row--) {
    let s = r[row];
    for (let k = row + 1; k < n; k++) s -= m[row][k] * x[k];
    x[row] = s / m[row][row];
  }
  return x;
}

/**
 * Least-squares fit of y on the columns of x (x[k] is sample k's parameter vector), on standardised variables:
 * the normal equations R·β = c with R the input correlation matrix and c the input–output correlations give
 * β = SRC directly (Saltelli et al. 2008, §1.2.5). Parameters that never vary get NaN and stay out of the fit.
 */
export function standardisedRegression(x: ReadonlyArray<ArrayLike<number>>, y: ArrayLike<number>): RegressionResult {
  const samples = y.length;
  if (x.length !== samples) throw new Error(`regression: ${x.length} samples of x but ${samples} of y`);
  const d = samples > 0 ? x[0].length : 0;
  const columns = Array.from({ length: d }, (_, i) => Float64Array.from({ length: samples }, (_, k) => x[k][i]));
  const stats = columns.map(meanAndStd);
  const ys = meanAndStd(y);
  const active = stats.map((s, i) => i).filter((i) => stats[i].std > 0);
  if (samples < active.length + 2) throw new Error(`regression: need at least ${active.length + 2} samples (got ${samples})`);
  const src = new Array<number>(d).fill(Number.NaN);
  const coefficients = new Array<number>(d).fill(Number.NaN);
  if (!(ys.std > 0)) {
    for (const i of active) {
      src[i] = 0;
      coefficients[i] = 0;
    }
    return { src, coefficients, intercept: ys.mean, rSquared: Number.NaN, samples };
  }
  const z = (i: number, k: number) => (columns[i][k] - stats[i].mean) / stats[i].std;
  const zy = (k: number) => (y[k] - ys.mean) / ys.std;
  const p = active.length;
  const corr = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  const rhs = new Array<number>(p).fill(0);
  for (let k = 0; k < samples; k++) {
    for (let a = 0; a < p; a++) {
      const za = z(active[a], k);
      rhs[a] += za * zy(k);
      for (let b = a; b < p; b++) corr[a][b] += za * z(active[b], k);
    }
  }
  for (let a = 0; a < p; a++) for (let b = 0; b < a; b++) corr[a][b] = corr[b][a];
  const beta = solveLinear(corr, rhs.slice());
  let intercept = ys.mean;
  active.forEach((i, a) => {
    src[i] = beta[a];
    // b_i = SRC_i·s_y/s_xi, back from standardised to natural units.
    coefficients[i] = (beta[a] * ys.std) / stats[i].std;
    intercept -= coefficients[i] * stats[i].mean;
  });
  // R² = 1 − SS_res/SS_tot of the fitted model.
  let ssRes = 0;
  let ssTot = 0;
  for (let k = 0; k < samples; k++) {
    let fit = intercept;
    for (const i of active) fit += coefficients[i] * columns[i][k];
    ssRes += (y[k] - fit) ** 2;
    ssTot += (y[k] - ys.mean) ** 2;
  }
  return { src, coefficients, intercept, rSquared: 1 - ssRes / ssTot, samples };
}

/** The long-form table rows of one output's SRCs (parameters that never vary are left out). */
export function regressionRows(output: string, parameters: readonly string[], result: RegressionResult): SensitivityRow[] {
  return parameters.flatMap((parameter, i) =>
    Number.isNaN(result.src[i])
      ? []
      : [
          {
            output,
            parameter,
            measure: 'src' as const,
            value: result.src[i],
            ci_low: null,
            ci_high: null,
            confidence: null,
            samples: result.samples,
            // R² has no value when the output is constant.
            r_squared: Number.isFinite(result.rSquared) ? result.rSquared : null,
          },
        ],
  );
}
