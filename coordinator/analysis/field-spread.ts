// The spread of field strength and residual phase over a sweep's runs, per receiver range, for the report's range
// plots: the runs grouped by one varied input (one group per value, or a few bins of a continuous input), and in each
// group the median and the 5–95 % band, plus a few runs drawn whole. Bounded whatever the sweep's size: at most
// MAX_SPREAD_GROUPS groups, MAX_RANGES_PER_LINE ranges and MAX_DRAWN_RUNS runs. Pure: series in, summary out.
import { z } from 'zod';
import { CellSchema, type Cell } from './read-tables.js';
import { QUANTILE_METHOD, quantileSorted } from './quantile.js';
import { residualPhaseColumns } from './residual-phase.js';
import { unwrapNearDeg } from '../../solver/phase.js';

/** Most distinct values of an input given a group each; an input with more is cut into SPREAD_BINS bins. */
export const MAX_SPREAD_GROUPS = 8;
/** Bins of an input with many values: equal numbers of runs each (quintiles of the input; ties kept together). */
export const SPREAD_BINS = 5;
/** Most receiver ranges per line or band; more are thinned out evenly (first and last kept). */
export const MAX_RANGES_PER_LINE = 200;
/** Most runs drawn whole as thin lines, chosen evenly through the runs' order. */
export const MAX_DRAWN_RUNS = 24;
/** The band's lower and upper probabilities and the centre line's. */
export const BAND_LOW_P = 0.05;
export const BAND_HIGH_P = 0.95;
export const CENTRE_P = 0.5;

/** One run's fields as the analysis holds them (phases in degrees, principal values). */
export interface SpreadRun {
  readonly job_id: string;
  /** Values of the varied inputs, keyed by column. */
  readonly params: Readonly<Record<string, Cell>>;
  /** Frequency, Hz: the residual phase removes the free-space delay 360°·f·r/c. */
  readonly frequency_hz: number;
  readonly points: ReadonlyArray<{ range_m: number; ez_db_uv_per_m: number; ez_phase_deg: number }>;
}

/** A run as the spread takes it: its receivers as objects or as columns (views into the folder's field columns). */
export type SpreadInput = Omit<SpreadRun, 'points'> & { readonly points: SpreadRun['points'] | PointColumns };

/** One run's receivers as columns, row k of each being one receiver. */
export interface PointColumns {
  readonly range_m: ArrayLike<number>;
  readonly ez_db_uv_per_m: ArrayLike<number>;
  readonly ez_phase_deg: ArrayLike<number>;
}

/** A run's points as columns (the same arrays when they already are). */
export function pointColumnsOf(points: SpreadInput['points']): PointColumns {
  if (!Array.isArray(points)) return points as PointColumns;
  const list = points as ReadonlyArray<{ range_m: number; ez_db_uv_per_m: number; ez_phase_deg: number }>;
  return {
    range_m: Float64Array.from(list, (p) => p.range_m),
    ez_db_uv_per_m: Float64Array.from(list, (p) => p.ez_db_uv_per_m),
    ez_phase_deg: Float64Array.from(list, (p) => p.ez_phase_deg),
  };
}

export const SpreadGroupSchema = z.strictObject({
  /** What the legend says: the value, or the bin's smallest and largest values. */
  label: z.string(),
  /** The value (one per group) or the bin's smallest and largest values; null for runs without the input. */
  low: CellSchema,
  high: CellSchema,
  /** Runs in the group. */
  runs: z.number().int().min(0),
});
export type SpreadGroup = z.infer<typeof SpreadGroupSchema>;

/** Quantiles of one group at one range: field strength in dB(µV/m), residual phase in degrees. */
export const SpreadPointSchema = z.strictObject({
  /** Index into the spread's groups. */
  group: z.number().int().min(0),
  range_m: z.number(),
  /** Runs of the group with a receiver at this range. */
  runs: z.number().int().min(1),
  db_low: z.number(),
  db_median: z.number(),
  db_high: z.number(),
  phase_low_deg: z.number(),
  phase_median_deg: z.number(),
  phase_high_deg: z.number(),
});
export type SpreadPoint = z.infer<typeof SpreadPointSchema>;

/** The runs grouped by one input (or all together when the sweep varies nothing). */
export const FieldSpreadSchema = z.strictObject({
  /** The input's sweep path and runs.parquet column; null: one group of all runs. */
  path: z.string().nullable(),
  column: z.string().nullable(),
  /** One group per value, equal-count bins of a many-valued input, or all runs together. */
  grouping: z.enum(['values', 'bins', 'all']),
  groups: z.array(SpreadGroupSchema),
  points: z.array(SpreadPointSchema),
  /** Group of each drawn run (same order as FieldSummary.drawn). */
  drawn_groups: z.array(z.number().int().min(0)),
});
export type FieldSpread = z.infer<typeof FieldSpreadSchema>;

/** One run drawn whole: its fields at the plotted ranges, the residual phase already unwrapped and aligned. */
export const DrawnRunSchema = z.strictObject({
  job_id: z.string(),
  params: z.record(z.string(), CellSchema),
  points: z.array(z.strictObject({ range_m: z.number(), ez_db_uv_per_m: z.number(), residual_phase_deg: z.number() })),
});
export type DrawnRun = z.infer<typeof DrawnRunSchema>;

export const FieldSummarySchema = z.strictObject({
  /** Runs with fields (done runs). */
  runs: z.number().int().min(0),
  /** Distinct receiver ranges among them, and how many the plots show. */
  ranges: z.number().int().min(0),
  ranges_plotted: z.number().int().min(0),
  /** How the quantiles were computed, and the band's probabilities. */
  quantile_method: z.string(),
  band: z.tuple([z.number(), z.number()]),
  spreads: z.array(FieldSpreadSchema),
  drawn: z.array(DrawnRunSchema),
});
export type FieldSummary = z.infer<typeof FieldSummarySchema>;

/** `max` indices spread evenly over 0…n−1, first and last included (all of them when n ≤ max). */
export function evenIndices(n: number, max: number): number[] {
  if (n <= max) return Array.from({ length: n }, (_, k) => k);
  if (max === 1) return [0];
  return Array.from({ length: max }, (_, k) => Math.round((k * (n - 1)) / (max - 1)));
}

/** Numbers before text; numbers ascending, text by code point. */
function compareCells(a: Cell, b: Cell): number {
  if (typeof a === 'number' && typeof b === 'number') return a - b;
  if (typeof a === 'number') return -1;
  if (typeof b === 'number') return 1;
  const sa = String(a);
  const sb = String(b);
  return sa < sb ? -1 : sa > sb ? 1 : 0;
}

/** Short text of a value for a legend (4 significant digits). */
function shortText(v: Cell): string {
  if (typeof v !== 'number') return String(v);
  if (Number.isInteger(v) && Math.abs(v) < 1e6) return String(v);
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e6)) return v.toExponential(2).replace(/\.?0+e/, 'e');
  return String(Number(v.toPrecision(4)));
}

/** The group of every run for one input, and the groups. Runs without the input form a last group. */
function groupRuns(runs: ReadonlyArray<Omit<SpreadInput, 'points'>>, column: string): { grouping: 'values' | 'bins'; groups: SpreadGroup[]; of: number[] } {
  const values = runs.map((r) => r.params[column] ?? null);
  const present = values.map((v, k) => ({ v, k })).filter((e) => e.v !== null) as Array<{ v: Exclude<Cell, null>; k: number }>;
  present.sort((a, b) => compareCells(a.v, b.v) || a.k - b.k);
  const distinct: Array<Exclude<Cell, null>> = [];
  for (const e of present) if (distinct.length === 0 || compareCells(distinct[distinct.length - 1], e.v) !== 0) distinct.push(e.v);
  const of = new Array<number>(runs.length).fill(-1);
  const groups: SpreadGroup[] = [];
  let grouping: 'values' | 'bins' = 'values';
  if (distinct.length <= MAX_SPREAD_GROUPS) {
    const index = new Map(distinct.map((v, g) => [String(v), g]));
    distinct.forEach((v) => groups.push({ label: shortText(v), low: v, high: v, runs: 0 }));
    for (const e of present) of[e.k] = index.get(String(e.v))!;
  } else {
    // Equal-count bins over the runs sorted by the input: a run's bin is set by the rank of the first run with its
    // value, so equal values share a bin (a bin may then hold more, and one may be left empty and dropped).
    grouping = 'bins';
    let firstRank = 0;
    const binOfRank: number[] = [];
    present.forEach((e, rank) => {
      if (rank > 0 && compareCells(present[rank - 1].v, e.v) !== 0) firstRank = rank;
      binOfRank.push(Math.min(SPREAD_BINS - 1, Math.floor((firstRank * SPREAD_BINS) / present.length)));
    });
    const used = [...new Set(binOfRank)];
    const renumber = new Map(used.map((b, g) => [b, g]));
    for (const b of used) {
      const members = present.filter((_, rank) => binOfRank[rank] === b);
      const low = members[0].v;
      const high = members[members.length - 1].v;
      groups.push({ label: `${shortText(low)} – ${shortText(high)}`, low, high, runs: 0 });
    }
    present.forEach((e, rank) => (of[e.k] = renumber.get(binOfRank[rank])!));
  }
  if (present.length < runs.length) {
    groups.push({ label: 'not set', low: null, high: null, runs: 0 });
    of.forEach((g, k) => (of[k] = g === -1 ? groups.length - 1 : g));
  }
  for (const g of of) groups[g].runs++;
  return { grouping, groups, of };
}

/**
 * Mean direction of angles in degrees, atan2(Σ sin θ, Σ cos θ) (K. V. Mardia and P. E. Jupp, "Directional
 * Statistics", Wiley 2000, §2.2.1): unlike a median of the principal values it sits inside a cluster that straddles
 * ±180°. 0 for no angles (or angles that cancel).
 */
function circularMeanDeg(anglesDeg: readonly number[]): number {
  let s = 0;
  let c = 0;
  for (const a of anglesDeg) {
    s += Math.sin((a * Math.PI) / 180);
    c += Math.cos((a * Math.PI) / 180);
  }
  return s === 0 && c === 0 ? 0 : (Math.atan2(s, c) * 180) / Math.PI;
}

/**
 * The spread of field strength and residual phase over `runs`, grouped by each of `inputs` (or all together when
 * none is given), with up to MAX_DRAWN_RUNS runs drawn whole. Residual phases (residualPhaseColumns, unwrapped along
 * range on every receiver before thinning) are shifted by whole turns so that each run's value at its first receiver
 * lies within 180° of the circular mean of those values over all runs: runs then compare without 360° jumps. Quantiles by
 * QUANTILE_METHOD over the runs of a group that have a receiver at the range.
 */
export function fieldSpread(runs: readonly SpreadInput[], inputs: ReadonlyArray<{ path: string; column: string }>): FieldSummary {
  const cols = runs.map((r) => pointColumnsOf(r.points));
  const rangeSet = new Set<number>();
  for (const c of cols) for (let i = 0; i < c.range_m.length; i++) rangeSet.add(c.range_m[i]);
  const builder = new FieldSpreadBuilder(runs, [...rangeSet], inputs);
  cols.forEach((c, k) => builder.add(k, c));
  return builder.finish();
}

/**
 * The same summary built one run at a time, so that the runs' receivers need not all be in memory: give the runs
 * (without their points; `points` is not read), every receiver range any run has, and the inputs; then `add` each
 * run's receivers (sorted by range), in any order, and `finish`. Holds two doubles per run and plotted range.
 */
export class FieldSpreadBuilder {
  private readonly plotted: number[];
  private readonly column: Map<number, number>;
  private readonly db: Float64Array;
  private readonly phase: Float64Array;
  /** Each run's residual phase at its first receiver (NaN: none yet), for the common reference. */
  private readonly first: Float64Array;

  constructor(
    private readonly runs: ReadonlyArray<Omit<SpreadInput, 'points'>>,
    private readonly ranges: readonly number[],
    private readonly inputs: ReadonlyArray<{ path: string; column: string }>,
  ) {
    const allRanges = [...ranges].sort((a, b) => a - b);
    this.ranges = allRanges;
    this.plotted = evenIndices(allRanges.length, MAX_RANGES_PER_LINE).map((i) => allRanges[i]);
    this.column = new Map(this.plotted.map((r, c) => [r, c]));
    const nc = this.plotted.length;
    // Values of every run at the plotted ranges, NaN where a run has no receiver there.
    this.db = new Float64Array(runs.length * nc).fill(Number.NaN);
    this.phase = new Float64Array(runs.length * nc).fill(Number.NaN);
    this.first = new Float64Array(runs.length).fill(Number.NaN);
  }

  /** Run k's receivers; its residual phases are kept as computed, shifted to the common reference by `finish`. */
  add(k: number, pts: PointColumns): void {
    const nc = this.plotted.length;
    const res = residualPhaseColumns(this.runs[k].frequency_hz, pts.range_m, pts.ez_phase_deg);
    if (res.value.length > 0) this.first[k] = res.value[0];
    for (let i = 0; i < pts.range_m.length; i++) {
      const c = this.column.get(pts.range_m[i]);
      if (c !== undefined) this.db[k * nc + c] = pts.ez_db_uv_per_m[i];
    }
    for (let i = 0; i < res.value.length; i++) {
      const c = this.column.get(res.range_m[i]);
      if (c !== undefined) this.phase[k * nc + c] = res.value[i];
    }
  }

  finish(): FieldSummary {
    const { runs, inputs, plotted, db, phase } = this;
    const nc = plotted.length;
    const firsts: number[] = [];
    for (let k = 0; k < runs.length; k++) if (!Number.isNaN(this.first[k])) firsts.push(this.first[k]);
    const reference = circularMeanDeg(firsts);
    for (let k = 0; k < runs.length; k++) {
      if (Number.isNaN(this.first[k])) continue;
      const shift = unwrapNearDeg(this.first[k], reference) - this.first[k];
      for (let c = 0; c < nc; c++) if (!Number.isNaN(phase[k * nc + c])) phase[k * nc + c] += shift;
    }
    return summarise(runs, inputs, this.ranges.length, plotted, db, phase);
  }
}

/** The groups, bands and drawn runs from the runs' values at the plotted ranges. */
function summarise(
  runs: ReadonlyArray<Omit<SpreadInput, 'points'>>,
  inputs: ReadonlyArray<{ path: string; column: string }>,
  rangeCount: number,
  plotted: readonly number[],
  db: Float64Array,
  phase: Float64Array,
): FieldSummary {
  const nc = plotted.length;
  const drawnIndex = evenIndices(runs.length, MAX_DRAWN_RUNS);
  const drawn: DrawnRun[] = drawnIndex.map((k) => ({
    job_id: runs[k].job_id,
    params: { ...runs[k].params },
    points: plotted.flatMap((range_m, c) =>
      Number.isNaN(db[k * nc + c]) ? [] : [{ range_m, ez_db_uv_per_m: db[k * nc + c], residual_phase_deg: phase[k * nc + c] }],
    ),
  }));
  const views: Array<{ path: string | null; column: string | null }> = inputs.length > 0 ? inputs.map((i) => ({ path: i.path, column: i.column })) : [{ path: null, column: null }];
  const spreads = views.map((view): FieldSpread => {
    const grouped =
      view.column === null
        ? { grouping: 'all' as const, groups: [{ label: 'all runs', low: null, high: null, runs: runs.length }], of: runs.map(() => 0) }
        : groupRuns(runs, view.column);
    const members: number[][] = grouped.groups.map(() => []);
    grouped.of.forEach((g, k) => members[g].push(k));
    const points: SpreadPoint[] = [];
    const dbs = new Float64Array(runs.length);
    const phs = new Float64Array(runs.length);
    members.forEach((list, g) => {
      for (let c = 0; c < nc; c++) {
        let n = 0;
        for (const k of list) {
          const v = db[k * nc + c];
          if (Number.isNaN(v)) continue;
          dbs[n] = v;
          phs[n] = phase[k * nc + c];
          n++;
        }
        if (n === 0) continue;
        const d = dbs.subarray(0, n).sort();
        const f = phs.subarray(0, n).sort();
        points.push({
          group: g,
          range_m: plotted[c],
          runs: n,
          db_low: quantileSorted(d, BAND_LOW_P),
          db_median: quantileSorted(d, CENTRE_P),
          db_high: quantileSorted(d, BAND_HIGH_P),
          phase_low_deg: quantileSorted(f, BAND_LOW_P),
          phase_median_deg: quantileSorted(f, CENTRE_P),
          phase_high_deg: quantileSorted(f, BAND_HIGH_P),
        });
      }
    });
    return { ...view, grouping: grouped.grouping, groups: grouped.groups, points, drawn_groups: drawnIndex.map((k) => grouped.of[k]) };
  });
  return {
    runs: runs.length,
    ranges: rangeCount,
    ranges_plotted: nc,
    quantile_method: QUANTILE_METHOD,
    band: [BAND_LOW_P, BAND_HIGH_P],
    spreads,
    drawn,
  };
}
