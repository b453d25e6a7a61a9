// Receivers: each field at a receiver is a weighted sum of grid samples (taps), transformed by a running DFT over
// whole periods. With Δt = T/N exactly, the DFT of a steady sinusoid over whole periods is exact.
// Along range the taps are interpolated after removing the travelling-wave phase e^{−jkx} (each tap's phasor is
// advanced to the receiver's range first): plain linear interpolation of an e^{−jkx} wave would lose
// 1 − cos(kΔx/2) of its amplitude midway between columns (0.17 dB at 16 cells per wavelength), an error that
// changes sign with the receiver's place in the cell and makes grid convergence look oscillatory.
import { metricUnscale, type GridPlan } from './grid.js';

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
  return rangesM.map((rangeM) => {
    // unscale(k): the factor from the stored field of row k to the physical one (a/ρ for Ẽθ and H̃ on the sphere,
    // see grid.ts; 1 for E_ρ and on the flat grids, where w·1 is w exactly)
    const taps = (field: FieldName, half: boolean, centred: boolean, offset: (k: number) => number, unscale: (k: number) => number): Tap[] => {
      const out: Tap[] = [];
      for (const [i, wi, xM] of columnWeights(g, rangeM, half)) {
        for (const [k, wk] of rowWeights(g, heightM, centred)) {
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

/** Running DFT of every tap over windows of `windowSteps`, phase table at half-step resolution. */
export class RunningDft {
  private readonly taps: Tap[];
  private readonly cosT: Float64Array;
  private readonly sinT: Float64Array;
  private readonly accRe: Float64Array;
  private readonly accIm: Float64Array;
  private readonly halfStepsPerPeriod: number;
  private count = 0;

  constructor(taps: Tap[], stepsPerPeriod: number) {
    this.taps = taps;
    this.halfStepsPerPeriod = 2 * stepsPerPeriod;
    this.cosT = new Float64Array(this.halfStepsPerPeriod);
    this.sinT = new Float64Array(this.halfStepsPerPeriod);
    for (let m = 0; m < this.halfStepsPerPeriod; m++) {
      const th = (2 * Math.PI * m) / this.halfStepsPerPeriod;
      this.cosT[m] = Math.cos(th);
      this.sinT[m] = Math.sin(th);
    }
    this.accRe = new Float64Array(taps.length);
    this.accIm = new Float64Array(taps.length);
  }

  /** Accumulate the samples recorded at the end of step n: X = Σ f(t)·e^{−jωt}. */
  accumulate(n: number, fields: Record<FieldName, Float64Array>): void {
    const P = this.halfStepsPerPeriod;
    const base = (2 * n) % P;
    for (let t = 0; t < this.taps.length; t++) {
      const tap = this.taps[t];
      const v = fields[tap.field][tap.index];
      const m = (base + tap.halfStepOffset) % P;
      this.accRe[t] += v * this.cosT[m];
      this.accIm[t] -= v * this.sinT[m];
    }
    this.count++;
  }

  /** Rms phasors of the taps over the window so far ((√2/N)·X), then reset. */
  take(): { re: Float64Array; im: Float64Array } {
    const s = Math.SQRT2 / this.count;
    const re = new Float64Array(this.taps.length);
    const im = new Float64Array(this.taps.length);
    for (let t = 0; t < this.taps.length; t++) {
      re[t] = this.accRe[t] * s;
      im[t] = this.accIm[t] * s;
    }
    this.accRe.fill(0);
    this.accIm.fill(0);
    this.count = 0;
    return { re, im };
  }
}
