// The spread of field strength and residual phase over runs (coordinator/analysis/field-spread.ts) and the sample
// quantiles under it (quantile.ts): Hyndman & Fan type 7 against its definition worked by hand and against vega's
// `quantiles` (vega-statistics, built on d3-array's quantileSorted, which implements the same definition), grouping,
// thinning and phase alignment. Field numbers are made up: these are checks of the statistics, not of the physics.
import * as vega from 'vega';
import { describe, expect, it } from 'vitest';
import {
  evenIndices,
  fieldSpread,
  MAX_DRAWN_RUNS,
  MAX_RANGES_PER_LINE,
  MAX_SPREAD_GROUPS,
  SPREAD_BINS,
  type SpreadRun,
} from '../coordinator/analysis/field-spread.js';
import { QUANTILE_METHOD, quantiles, quantileSorted } from '../coordinator/analysis/quantile.js';
import { createPrng } from '../coordinator/sampling/prng.js';
import { C0 } from '../solver/constants.js';

/** vega's re-export of vega-statistics' `quantiles` (at runtime in vega 5; vega's type declarations omit it). */
const referenceQuantiles = (vega as unknown as { quantiles(values: number[], ps: number[]): number[] }).quantiles;

/** Wrap degrees into [−180, 180). */
const wrap = (deg: number) => ((((deg + 180) % 360) + 360) % 360) - 180;

/** A run whose residual phase is `residualDeg(r)` (the free-space delay added back and wrapped, as a solver gives). */
function run(id: string, params: SpreadRun['params'], ranges: readonly number[], db: (r: number) => number, residualDeg: (r: number) => number): SpreadRun {
  const f = 20e3;
  return {
    job_id: id,
    params,
    frequency_hz: f,
    points: ranges.map((r) => ({ range_m: r, ez_db_uv_per_m: db(r), ez_phase_deg: wrap(residualDeg(r) - (360 * f * r) / C0) })),
  };
}

describe('sample quantiles, Hyndman & Fan type 7', () => {
  it('when the values are 1…10 then Q(0.05), Q(0.5), Q(0.95) are 1.45, 5.5 and 9.55', () => {
    // Definition 7 of Hyndman & Fan 1996 by hand: h = (n − 1)p = 9p; Q = x[⌊h⌋] + (h − ⌊h⌋)(x[⌊h⌋+1] − x[⌊h⌋]):
    // p = 0.05 → h = 0.45 → 1 + 0.45; p = 0.5 → h = 4.5 → 5.5; p = 0.95 → h = 8.55 → 9 + 0.55.
    const x = Array.from({ length: 10 }, (_, k) => k + 1);
    const q = quantiles(x, [0, 0.05, 0.5, 0.95, 1]);
    // Tolerance: a few ulps of the values (one multiply-add each).
    [1, 1.45, 5.5, 9.55, 10].forEach((want, i) => expect(Math.abs(q[i] - want)).toBeLessThan(1e-14 * 10));
    expect(QUANTILE_METHOD).toMatch(/Hyndman & Fan 1996, type 7/);
  });

  it.each([1, 2, 7, 100, 1001])('when %i pseudo-random values are given then every quantile matches vega.quantiles', (n) => {
    const rng = createPrng(n);
    const x = Array.from({ length: n }, () => 100 * (rng.nextFloat() - 0.5));
    const ps = [0, 0.01, 0.05, 0.25, 0.5, 0.75, 0.95, 0.99, 1];
    const mine = quantiles(x, ps);
    const reference = referenceQuantiles(x, ps);
    // Same definition, same arithmetic order: equal to within a few ulps of values of size 50.
    ps.forEach((p, i) => expect(Math.abs(mine[i] - reference[i]), `p = ${p}: ${mine[i]} vs ${reference[i]}`).toBeLessThan(50 * 4 * Number.EPSILON));
  });

  it.each([
    ['no values', [], [0.5], /values must hold at least one number/],
    ['p above 1', [1, 2], [1.5], /each p must be in \[0, 1\] \(got 1.5\)/],
    ['a NaN value', [1, Number.NaN], [0.5], /values must be finite numbers/],
  ])('when given %s then it throws one line saying what to give', (_case, values, ps, message) => {
    expect(() => quantiles(values as number[], ps as number[])).toThrow(message);
  });

  it('when the values are sorted once then quantileSorted agrees with quantiles', () => {
    const x = Float64Array.from([3, 1, 4, 1, 5, 9, 2, 6]).sort();
    expect(quantileSorted(x, 0.3)).toBe(quantiles(x, [0.3])[0]);
  });
});

describe('spread of a sweep over range', () => {
  const ranges = Array.from({ length: 500 }, (_, k) => (k + 1) * 1000);

  it('when 500 receivers are given then 200 ranges are kept, evenly, the first and the last included', () => {
    const s = fieldSpread([run('a', {}, ranges, () => 50, () => 0)], []);
    expect(s.ranges).toBe(500);
    expect(s.ranges_plotted).toBe(MAX_RANGES_PER_LINE);
    const kept = s.spreads[0].points.map((p) => p.range_m);
    expect(kept[0]).toBe(1000);
    expect(kept[kept.length - 1]).toBe(500_000);
    // Evenly: steps of 499/199 ≈ 2.51 receivers, so every gap is 2 or 3 receivers.
    const gaps = new Set(kept.slice(1).map((r, k) => (r - kept[k]) / 1000));
    expect([...gaps].sort()).toEqual([2, 3]);
    expect(s.drawn[0].points).toHaveLength(MAX_RANGES_PER_LINE);
  });

  it('when an input has few values then there is one group per value and the band is the quantiles of its runs', () => {
    const rng = createPrng(11);
    const few = [100, 400, 1600];
    const runs = Array.from({ length: 90 }, (_, k) => {
      const x = few[k % 3];
      const offset = 10 * rng.nextFloat();
      return run(`r${k}`, { x }, ranges.slice(0, 5), (r) => 80 - r / x / 100 + offset, (r) => -r / 1e4 - offset);
    });
    const s = fieldSpread(runs, [{ path: 'x', column: 'x' }]);
    const spread = s.spreads[0];
    expect(spread.grouping).toBe('values');
    expect(spread.groups.map((g) => [g.label, g.runs])).toEqual([['100', 30], ['400', 30], ['1600', 30]]);
    // Independent reference: vega.quantiles of the same group's values at the same range.
    for (const p of spread.points) {
      const members = runs.filter((r) => r.params.x === spread.groups[p.group].low);
      const dbs = members.map((r) => r.points.find((q) => q.range_m === p.range_m)!.ez_db_uv_per_m);
      const [low, median, high] = referenceQuantiles(dbs, [0.05, 0.5, 0.95]);
      // Tolerance: a few ulps of values near 80.
      expect(Math.abs(p.db_low - low)).toBeLessThan(1e-12);
      expect(Math.abs(p.db_median - median)).toBeLessThan(1e-12);
      expect(Math.abs(p.db_high - high)).toBeLessThan(1e-12);
      expect(p.runs).toBe(30);
    }
    expect(s.drawn).toHaveLength(MAX_DRAWN_RUNS);
    expect(s.drawn[0].job_id).toBe('r0');
    expect(s.drawn[MAX_DRAWN_RUNS - 1].job_id).toBe('r89');
    expect(spread.drawn_groups).toEqual(evenIndices(90, MAX_DRAWN_RUNS).map((k) => k % 3));
  });

  it('when an input has many values, some tied, then runs fall into equal-count bins with ties kept together', () => {
    // 100 runs: 30 at the smallest value, then 70 distinct values; more than MAX_SPREAD_GROUPS values.
    const values = [...Array(30).fill(1), ...Array.from({ length: 70 }, (_, k) => 2 + k)];
    expect(new Set(values).size).toBeGreaterThan(MAX_SPREAD_GROUPS);
    const runs = values.map((v, k) => run(`b${k}`, { x: v }, [1000], () => v, () => 0));
    const spread = fieldSpread(runs, [{ path: 'x', column: 'x' }]).spreads[0];
    expect(spread.grouping).toBe('bins');
    // Ranks 0–29 share the value 1, so bin 0 takes 30 runs and bin 1 (ranks 20–39 by count) only 10; bins of 20
    // after that. Every run is in exactly one bin, and the bins follow the input's order.
    expect(spread.groups.map((g) => g.runs)).toEqual([30, 10, 20, 20, 20]);
    expect(spread.groups).toHaveLength(SPREAD_BINS);
    expect(spread.groups.map((g) => g.label)).toEqual(['1 – 1', '2 – 11', '12 – 31', '32 – 51', '52 – 71']);
  });

  it('when runs lack the input then they form their own group', () => {
    const runs = [run('a', { x: 1 }, [1000], () => 1, () => 0), run('b', { x: null }, [1000], () => 2, () => 0)];
    const spread = fieldSpread(runs, [{ path: 'x', column: 'x' }]).spreads[0];
    expect(spread.groups.map((g) => [g.label, g.runs])).toEqual([['1', 1], ['not set', 1]]);
  });

  it('when two runs start on either side of ±180° then their residual phases are aligned within half a turn', () => {
    // Residual phases 179° and 181° (= −179° wrapped) at the first receiver, falling 1° per km: the same physics to
    // within 2°, which a band must not show as 358° apart.
    const a = run('a', {}, ranges.slice(0, 10), () => 0, (r) => 179 - r / 1000);
    const b = run('b', {}, ranges.slice(0, 10), () => 0, (r) => 181 - r / 1000);
    const s = fieldSpread([a, b], []);
    for (const p of s.spreads[0].points) expect(p.phase_high_deg - p.phase_low_deg).toBeLessThan(2 + 1e-9);
    const [da, db] = s.drawn;
    da.points.forEach((p, k) => expect(Math.abs(db.points[k].residual_phase_deg - p.residual_phase_deg - 2)).toBeLessThan(1e-9));
  });
});
