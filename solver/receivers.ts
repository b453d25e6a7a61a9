// Receivers: each field at a receiver is a weighted sum of grid samples (taps), transformed by a running DFT over
// whole periods. With Δt = T/N exactly, the DFT of a steady sinusoid over whole periods is exact.
// Along range the taps are interpolated after removing the travelling-wave phase e^{−jkx} (each tap's phasor is
// advanced to the receiver's range first): plain linear interpolation of an e^{−jkx} wave would lose
// 1 − cos(kΔx/2) of its amplitude midway between columns (0.17 dB at 16 cells per wavelength), an error that
// changes sign with the receiver's place in the cell and makes grid convergence look oscillatory.
import { metricUnscale, type GridPlan } from './grid.js';
import type { FieldArray } from './fdtd-kernel.js';

export type FieldName = 'ex' | 'ez' | 'hy';

export interface Tap {
  field: FieldName;
  index: number;
  weight: number;
  /** Range from the sample to the receiver, m: the tap's phasor is advanced by e^{−jk·offsetM} before summing. */
  offsetM: number;
  /** Time of the sample in half steps past n·Δt when recorded at the end of step n: 0, 1 (H) or 2 (E). */
  halfStepOffset: number;
}

export interface ReceiverTaps {
  rangeM: number;
  heightM: number;
  ez: Tap[];
  ex: Tap[];
  hy: Tap[];
}

/** Two-point weights placing `x` between (or beyond) positions `p0 < p1`. */
function linear(x: number, p0: number, p1: number): [number, number] {
  const t = (x - p0) / (p1 - p0);
  return [1 - t, t];
}

/** Rows (index, weight) for a height among the air rows of cell-centred fields (Ez, Hy) or nodes (Ex). */
function rowWeights(g: GridPlan, heightM: number, centred: boolean): Array<[number, number]> {
  const g0 = g.groundRow;
  const pos = (k: number): number => g.zNodeM[k] + (centred ? g.dzM[k] / 2 : 0);
  // first air row at or above the surface
  let k = g0;
  while (k + 1 < g.nz - 1 && pos(k + 1) <= heightM) k++;
  if (!centred && Math.abs(pos(k) - heightM) < 1e-9 * g.dxM) return [[k, 1]];
  const [w0, w1] = linear(heightM, pos(k), pos(k + 1));
  return [
    [k, w0],
    [k + 1, w1],
  ];
}

/** Columns (index, weight, position) for a range: Ez at i·Δx, Ex and Hy at (i+½)·Δx. */
function columnWeights(g: GridPlan, rangeM: number, half: boolean): Array<[number, number, number]> {
  const u = rangeM / g.dxM - (half ? 0.5 : 0);
  const i0 = Math.max(0, Math.min(g.nx - 2, Math.floor(u)));
  const t = u - i0;
  const x = (i: number) => (i + (half ? 0.5 : 0)) * g.dxM;
  return [
    [i0, 1 - t, x(i0)],
    [i0 + 1, t, x(i0 + 1)],
  ];
}

export function buildReceiverTaps(g: GridPlan, rangesM: readonly number[], heightM: number, impedanceRow: boolean): ReceiverTaps[] {
  const S = g.nz + 1;
  // the rows depend on the height alone, which all receivers share
  const rowsCentred = rowWeights(g, heightM, true);
  const rowsNodes = rowWeights(g, heightM, false);
  return rangesM.map((rangeM) => {
    // unscale(k): the factor from the stored field of row k to the physical one (a/ρ for Ẽθ and H̃ on the sphere,
    // see grid.ts; 1 for E_ρ and on the flat grids, where w·1 is w exactly)
    const taps = (field: FieldName, half: boolean, centred: boolean, offset: (k: number) => number, unscale: (k: number) => number): Tap[] => {
      const out: Tap[] = [];
      const cols = columnWeights(g, rangeM, half);
      const rows = centred ? rowsCentred : rowsNodes;
      for (let a = 0; a < cols.length; a++) {
        const [i, wi, xM] = cols[a];
        for (let b = 0; b < rows.length; b++) {
          const [k, wk] = rows[b];
          if (wi * wk !== 0) out.push({ field, index: i * S + k, weight: wi * wk * unscale(k), offsetM: rangeM - xM, halfStepOffset: offset(k) });
        }
      }
      return out;
    };
    return {
      rangeM,
      heightM,
      ez: taps('ez', false, true, () => 2, () => 1),
      // the impedance ground row holds E at n·Δt after step n (it is solved with the H update)
      ex: taps('ex', true, false, (k) => (impedanceRow && k === 0 ? 0 : 2), (k) => metricUnscale(g, g.zNodeM[k])),
      hy: taps('hy', true, true, () => 1, (k) => metricUnscale(g, g.zNodeM[k] + g.dzM[k] / 2)),
    };
  });
}

type Phasors = { re: Float64Array; im: Float64Array };

/** The field arrays the samples are read from, by name. */
export type FieldArrays = Record<FieldName, FieldArray>;

const FIELDS: readonly FieldName[] = ['ex', 'ez', 'hy'];
/** Keys of samples: group · INDEX_SPAN + cell index. */
const INDEX_SPAN = 2 ** 32;

/** Group number of a field and half-step offset (0, 1 or 2): 0…8. */
function sampleGroup(field: FieldName, halfStepOffset: number): number {
  return FIELDS.indexOf(field) * 3 + halfStepOffset;
}

/** Position of `key` in the sorted distinct `keys` (it is there). */
function findKey(keys: Float64Array, key: number): number {
  let lo = 0;
  let hi = keys.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (keys[mid] < key) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Running DFT of distinct grid samples over windows of whole periods, phase table at half-step resolution.
 * A sample is one (field array, cell index, half-step offset); taps that read the same sample share its running sum,
 * so many receivers on one grid cost one sum per sample they touch, not one per tap. Samples are grouped by field
 * and offset: every sample of a group has the same phase at a step, so a step is one multiply-add pair per sample,
 * with the group's cos and sin read once. Per sample the sums are the same floating-point operations, in the same
 * order, as a separate sum per tap: the phasors are bit-identical to one DFT per tap.
 */
export class SampleDft {
  /** Sample of each tap, in the order the taps were given. */
  readonly tapSample: Int32Array;
  /** Cell index of each sample (samples ordered by group, then by index). */
  readonly index: Int32Array;
  /** Groups of samples [start, end) that share a field and a half-step offset. */
  readonly groups: ReadonlyArray<{ field: FieldName; halfStepOffset: number; start: number; end: number }>;
  private readonly cosT: Float64Array;
  private readonly sinT: Float64Array;
  private readonly accRe: Float64Array;
  private readonly accIm: Float64Array;
  private readonly halfStepsPerPeriod: number;
  private count = 0;
  /** Phasors of the last window taken and of the one before it (swapped, not reallocated, at each take). */
  private last: Phasors;
  private before: Phasors;
  private windows = 0;

  constructor(taps: readonly Tap[], stepsPerPeriod: number) {
    // a sample's key: group (field, offset) · 2^32 + cell index (indices stay below MAX_GRID_CELLS = 2^32, and
    // keys below 9·2^32 are exact doubles); the sorted distinct keys are the samples, grouped and in memory order
    const keys = new Float64Array(taps.length);
    for (let t = 0; t < taps.length; t++) keys[t] = sampleGroup(taps[t].field, taps[t].halfStepOffset) * INDEX_SPAN + taps[t].index;
    const sorted = keys.slice().sort();
    let u = 0;
    for (let t = 0; t < sorted.length; t++) if (t === 0 || sorted[t] !== sorted[t - 1]) sorted[u++] = sorted[t];
    const distinct = sorted.subarray(0, u);
    const groups: Array<{ field: FieldName; halfStepOffset: number; start: number; end: number }> = [];
    const indices = new Int32Array(u);
    for (let v = 0; v < u; v++) {
      const gid = Math.floor(distinct[v] / INDEX_SPAN);
      indices[v] = distinct[v] - gid * INDEX_SPAN;
      const last = groups[groups.length - 1];
      if (last && sampleGroup(last.field, last.halfStepOffset) === gid) last.end = v + 1;
      else groups.push({ field: FIELDS[Math.floor(gid / 3)], halfStepOffset: gid % 3, start: v, end: v + 1 });
    }
    this.groups = groups;
    this.index = indices;
    this.tapSample = new Int32Array(taps.length);
    for (let t = 0; t < taps.length; t++) this.tapSample[t] = findKey(distinct, keys[t]);
    this.halfStepsPerPeriod = 2 * stepsPerPeriod;
    this.cosT = new Float64Array(this.halfStepsPerPeriod);
    this.sinT = new Float64Array(this.halfStepsPerPeriod);
    for (let m = 0; m < this.halfStepsPerPeriod; m++) {
      const th = (2 * Math.PI * m) / this.halfStepsPerPeriod;
      this.cosT[m] = Math.cos(th);
      this.sinT[m] = Math.sin(th);
    }
    this.accRe = new Float64Array(u);
    this.accIm = new Float64Array(u);
    this.last = { re: new Float64Array(u), im: new Float64Array(u) };
    this.before = { re: new Float64Array(u), im: new Float64Array(u) };
  }

  get sampleCount(): number {
    return this.index.length;
  }

  /** Accumulate the samples recorded at the end of step n: X = Σ f(t)·e^{−jωt}. */
  accumulate(n: number, fields: FieldArrays): void {
    const P = this.halfStepsPerPeriod;
    const base = (2 * n) % P;
    for (let j = 0; j < this.groups.length; j++) {
      const g = this.groups[j];
      const m = (base + g.halfStepOffset) % P;
      this.accumulateGroup(fields[g.field], g.start, g.end, this.cosT[m], this.sinT[m]);
    }
    this.count++;
  }

  private accumulateGroup(field: FieldArray, start: number, end: number, c: number, s: number): void {
    const { index, accRe, accIm } = this;
    for (let u = start; u < end; u++) {
      const v = field[index[u]];
      accRe[u] += v * c;
      accIm[u] -= v * s;
    }
  }

  /**
   * Close the window: rms phasors of the samples over it ((√2/N)·X) become `current`, the previous window's
   * `previous`, and the sums restart. Returns false if a phasor is not finite.
   */
  take(): boolean {
    const s = Math.SQRT2 / this.count;
    const out = this.before;
    this.before = this.last;
    this.last = out;
    const { accRe, accIm } = this;
    let finite = true;
    for (let u = 0; u < accRe.length; u++) {
      const re = accRe[u] * s;
      const im = accIm[u] * s;
      out.re[u] = re;
      out.im[u] = im;
      if (!Number.isFinite(re) || !Number.isFinite(im)) finite = false;
    }
    accRe.fill(0);
    accIm.fill(0);
    this.count = 0;
    this.windows++;
    return finite;
  }

  /** Sample phasors of the last window taken (valid until the next take). */
  get current(): Readonly<Phasors> {
    return this.last;
  }

  /** Sample phasors of the window before the last, once two windows were taken. */
  get previous(): Readonly<Phasors> | undefined {
    return this.windows >= 2 ? this.before : undefined;
  }
}

/** Running DFT of every tap (one entry per tap, repeated samples shared underneath). */
export class RunningDft {
  private readonly dft: SampleDft;

  constructor(taps: Tap[], stepsPerPeriod: number) {
    this.dft = new SampleDft(taps, stepsPerPeriod);
  }

  accumulate(n: number, fields: FieldArrays): void {
    this.dft.accumulate(n, fields);
  }

  /** Rms phasors of the taps over the window so far ((√2/N)·X), then reset. */
  take(): Phasors {
    this.dft.take();
    const ph = this.dft.current;
    const map = this.dft.tapSample;
    return { re: Float64Array.from(map, (u) => ph.re[u]), im: Float64Array.from(map, (u) => ph.im[u]) };
  }
}

/**
 * All receivers of a solve on one SampleDft: their taps' samples summed once per step, and the receivers' phasors
 * combined from the sample phasors (weights and range advance of each tap) only when asked for.
 */
export class ReceiverBank {
  readonly dft: SampleDft;
  /** Per tap, in receiver order (Ez, Ex, Hy taps of receiver 0, then of receiver 1, …): its weight and range offset. */
  private readonly weight: Float64Array;
  private readonly offsetM: Float64Array;
  /** Per receiver, where its Ez, Ex and Hy taps start and end: starts[4r + 0…3]. */
  private readonly starts: Int32Array;
  /** Per sample of the Ez group, the lowest settling floor of the receivers that read it (+∞ for other samples). */
  private readonly ezFloor: Float64Array;

  /** `floors[r]`: the field below which receiver r's Ez taps count as round-off in the settling test, V/m. */
  constructor(receivers: readonly ReceiverTaps[], stepsPerPeriod: number, floors: readonly number[]) {
    this.starts = new Int32Array(4 * receivers.length);
    let count = 0;
    for (let r = 0; r < receivers.length; r++) count += receivers[r].ez.length + receivers[r].ex.length + receivers[r].hy.length;
    const taps = new Array<Tap>(count);
    this.weight = new Float64Array(count);
    this.offsetM = new Float64Array(count);
    let t = 0;
    for (let r = 0; r < receivers.length; r++) {
      for (let part = 0; part < 3; part++) {
        this.starts[4 * r + part] = t;
        const list = part === 0 ? receivers[r].ez : part === 1 ? receivers[r].ex : receivers[r].hy;
        for (let j = 0; j < list.length; j++, t++) {
          taps[t] = list[j];
          this.weight[t] = list[j].weight;
          this.offsetM[t] = list[j].offsetM;
        }
      }
      this.starts[4 * r + 3] = t;
    }
    this.dft = new SampleDft(taps, stepsPerPeriod);
    this.ezFloor = new Float64Array(this.dft.sampleCount).fill(Infinity);
    for (let r = 0; r < receivers.length; r++) {
      for (let t = this.starts[4 * r]; t < this.starts[4 * r + 1]; t++) {
        const u = this.dft.tapSample[t];
        if (floors[r] < this.ezFloor[u]) this.ezFloor[u] = floors[r];
      }
    }
  }

  /**
   * Largest relative change of the Ez tap phasors between the last two windows (Infinity before two): per tap
   * |Δ|/max(|X|, 1e-6 of the strongest Ez tap, the receiver's floor). A sample read by several receivers is held
   * to the lowest of their floors, which is the largest of their ratios: the same number as testing every tap.
   */
  settlingChange(): number {
    const a = this.dft.previous;
    if (!a) return Infinity;
    const b = this.dft.current;
    let peak = 0;
    let worst = 0;
    for (const g of this.dft.groups) {
      if (g.field !== 'ez') continue;
      for (let u = g.start; u < g.end; u++) peak = Math.max(peak, Math.hypot(b.re[u], b.im[u]));
    }
    for (const g of this.dft.groups) {
      if (g.field !== 'ez') continue;
      for (let u = g.start; u < g.end; u++) {
        const d = Math.hypot(b.re[u] - a.re[u], b.im[u] - a.im[u]);
        const m = Math.max(Math.hypot(b.re[u], b.im[u]), 1e-6 * peak, this.ezFloor[u]);
        worst = Math.max(worst, d / m);
      }
    }
    return worst;
  }

  /**
   * Phasor of one field at receiver r from the last window: Σ w·X·e^{−jk·offset} over its taps, times `scale`
   * (the taps' order, so the sum is the one a per-tap DFT gave).
   */
  phasor(r: number, field: FieldName, kWave: number, scale: number): { re: number; im: number } {
    const ph = this.dft.current;
    const part = field === 'ez' ? 0 : field === 'ex' ? 1 : 2;
    const { weight, offsetM } = this;
    const map = this.dft.tapSample;
    let re = 0;
    let im = 0;
    for (let t = this.starts[4 * r + part]; t < this.starts[4 * r + part + 1]; t++) {
      const u = map[t];
      const th = -kWave * offsetM[t]; // advance to the receiver's range: e^{−jk·offset}
      const c0 = Math.cos(th);
      const s0 = Math.sin(th);
      re += weight[t] * (ph.re[u] * c0 - ph.im[u] * s0);
      im += weight[t] * (ph.re[u] * s0 + ph.im[u] * c0);
    }
    return { re: re * scale, im: im * scale };
  }
}
