// Attenuation and phase constants of a guided wave fitted to phasors sampled along the guide: the straight-line
// least-squares fit of ln|E| and of the unwrapped phase against range. Used by the planar-guide reference check;
// pure, no I/O.
import { abs, arg, type C } from './references/complex.js';
import { unwrapSequenceRad } from './phase.js';

/** Least-squares slope Σ(x − x̄)(y − ȳ)/Σ(x − x̄)² of y against x (ordinary least squares; needs two distinct x). */
export function leastSquaresSlope(x: readonly number[], y: readonly number[]): number {
  const n = x.length;
  const mx = x.reduce((a, b) => a + b, 0) / n;
  const my = y.reduce((a, b) => a + b, 0) / n;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < n; i++) {
    sxy += (x[i] - mx) * (y[i] - my);
    sxx += (x[i] - mx) ** 2;
  }
  return sxy / sxx;
}

/**
 * α (Np/m) and β (rad/m) of a wave E ∝ e^{−(α + jβ)x} (e^{jωt}) from its phasors at ranges `rangesM`:
 * α = −d ln|E|/dx and β = −d(arg E)/dx, each a least-squares slope; the phase is unwrapped sample to sample, so
 * neighbouring ranges must be less than half a wavelength apart.
 */
export function fitGuideConstants(rangesM: readonly number[], ez: readonly C[]): { alpha: number; beta: number } {
  const lnA = ez.map((e) => Math.log(abs(e)));
  const phase = unwrapSequenceRad(ez.map(arg));
  return { alpha: -leastSquaresSlope(rangesM, lnA), beta: -leastSquaresSlope(rangesM, phase) };
}
