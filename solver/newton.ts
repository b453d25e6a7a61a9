// Newton's iteration for a real root of a real function whose derivative is not at hand: the derivative is the
// central difference. Small and general; used by the reference checks (e.g. the numerical wavenumber that
// reproduces a measured phase). Pure, no I/O.

export interface NewtonOptions {
  /** Step h of the central difference f'(x) ≈ (f(x + h) − f(x − h))/(2h), in the unit of x. */
  readonly derivativeStep: number;
  /** Stop once |Newton step| < this, in the unit of x. */
  readonly stepTolerance: number;
  /** @defaultValue 50 */
  readonly maxIterations?: number;
}

export interface NewtonResult {
  readonly root: number;
  readonly iterations: number;
  /** False when `maxIterations` passed before a step fell below `stepTolerance` (`root` is then the last iterate). */
  readonly converged: boolean;
}

/**
 * x ← x − f(x)/f'(x) from `x0`, f' by central difference (Newton's method with a difference derivative: Dennis &
 * Schnabel, Numerical Methods for Unconstrained Optimization and Nonlinear Equations, 1983, §5.4, from memory).
 * Convergence is quadratic near a simple root until the difference derivative's error (about h²·f‴/6 truncation
 * plus ε·|f|/h round-off) limits it; choose h accordingly. A NaN from f ends the iteration unconverged.
 */
export function newtonRoot(f: (x: number) => number, x0: number, options: NewtonOptions): NewtonResult {
  const { derivativeStep: h, stepTolerance } = options;
  const maxIterations = options.maxIterations ?? 50;
  let x = x0;
  for (let it = 1; it <= maxIterations; it++) {
    const step = f(x) / ((f(x + h) - f(x - h)) / (2 * h));
    if (Number.isNaN(step)) return { root: x, iterations: it, converged: false };
    x -= step;
    if (Math.abs(step) < stepTolerance) return { root: x, iterations: it, converged: true };
  }
  return { root: x, iterations: maxIterations, converged: false };
}
