// Elementary-effect summaries (μ, μ*, σ) of one output over a full factorial grid: for every parameter, the
// effect of stepping it to its next level with all others held. Definitions: Morris, Technometrics 33(2), 1991
// (elementary effect, μ, σ); μ* = mean |EE| from Campolongo, Cariboni & Saltelli, Environ. Model. Softw. 22, 2007.
import { type SensitivityRow } from '../../schemas/analysis-rows.js';

/** How a parameter's step is measured: as a fraction of its range, or of its range in log10 (for decades). */
export type EffectScale = 'linear' | 'log';

export interface ElementaryEffects {
  parameter: string;
  /** Mean elementary effect, in output units per full parameter range. */
  mu: number;
  /** Mean absolute elementary effect. */
  muStar: number;
  /** Sample standard deviation of the elementary effects (n − 1); NaN with fewer than two. */
  sigma: number;
  /** Number of elementary effects (neighbouring pairs on the grid). */
  count: number;
}

export interface ElementaryEffectsOptions {
  /** Scale per parameter name. @defaultValue 'linear' for every parameter */
  readonly scales?: Readonly<Record<string, EffectScale>>;
}

/**
 * Elementary effects from the grid points `rows` (each a record of parameter values) and the output `y`.
 * EE_i = (y(x + Δ·e_i) − y(x))/Δ, Δ the step to the next level of parameter i as a fraction of its range
 * (Morris 1991, eq. 1, with the range normalised to [0, 1]); every pair of grid neighbours along i counts once.
 */
export function elementaryEffects(
  rows: ReadonlyArray<Readonly<Record<string, number>>>,
  y: ArrayLike<number>,
  parameters: readonly string[],
  options: ElementaryEffectsOptions = {},
): ElementaryEffects[] {
  if (rows.length !== y.length) throw new Error(`elementaryEffects: ${rows.length} grid points but ${y.length} outputs`);
  return parameters.map((parameter) => {
    const scale = options.scales?.[parameter] ?? 'linear';
    const map = (v: number) => {
      if (scale === 'log' && !(v > 0)) throw new Error(`elementaryEffects: ${parameter} has a value <= 0 (${v}) on a log scale`);
      return scale === 'log' ? Math.log10(v) : v;
    };
    const levels = [...new Set(rows.map((r) => r[parameter]))].sort((a, b) => a - b);
    const range = levels.length > 1 ? map(levels[levels.length - 1]) - map(levels[0]) : 0;
    const nextLevel = new Map(levels.slice(0, -1).map((v, k) => [v, levels[k + 1]]));
    // Index every point by the values of the other parameters, so a neighbour is one map look-up.
    const others = parameters.filter((p) => p !== parameter);
    const keyOf = (r: Readonly<Record<string, number>>, value: number) =>
      JSON.stringify([value, ...others.map((p) => r[p])]);
    const index = new Map<string, number>();
    rows.forEach((r, k) => index.set(keyOf(r, r[parameter]), k));
    const effects: number[] = [];
    rows.forEach((r, k) => {
      const next = nextLevel.get(r[parameter]);
      if (next === undefined) return;
      const j = index.get(keyOf(r, next));
      if (j === undefined) return;
      const delta = (map(next) - map(r[parameter])) / range;
      effects.push((y[j] - y[k]) / delta);
    });
    const count = effects.length;
    const mu = count > 0 ? effects.reduce((s, e) => s + e, 0) / count : Number.NaN;
    const muStar = count > 0 ? effects.reduce((s, e) => s + Math.abs(e), 0) / count : Number.NaN;
    const sigma = count > 1 ? Math.sqrt(effects.reduce((s, e) => s + (e - mu) ** 2, 0) / (count - 1)) : Number.NaN;
    return { parameter, mu, muStar, sigma, count };
  });
}

/** The long-form table rows of one output's elementary-effect summaries (parameters without effects left out). */
export function elementaryEffectRows(output: string, effects: readonly ElementaryEffects[]): SensitivityRow[] {
  return effects.flatMap((e) =>
    e.count === 0
      ? []
      : (['mu_star', 'mu', 'sigma'] as const).flatMap((measure) => {
          const value = measure === 'mu_star' ? e.muStar : measure === 'mu' ? e.mu : e.sigma;
          return Number.isNaN(value)
            ? []
            : [{ output, parameter: e.parameter, measure, value, ci_low: null, ci_high: null, confidence: null, samples: e.count, r_squared: null }];
        }),
  );
}
