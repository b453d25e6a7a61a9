// Millington's method for the ground wave over a piecewise-homogeneous path: the mean of the forward and reverse
// constructions from homogeneous-path curves, generic over the curve it is given (the flat Sommerfeld–Norton curve,
// the spherical-earth residue series, or any other). Pure functions; no I/O.
import { type C, abs, arg } from './complex.js';
import { unwrapNearRad } from '../phase.js';

/** One stretch of homogeneous ground along a path, listed in order from the transmitter. */
export interface PathSection<G> {
  /** Length of the stretch along the path (great-circle distance on a sphere), m; finite and > 0. */
  readonly lengthM: number;
  /** The ground of the stretch, in whatever form the curve understands (e.g. { sigma, epsR }). */
  readonly ground: G;
}

/**
 * A homogeneous-path curve: a quantity that adds along the path, as a function of the ground and the distance
 * (m) from the transmitter. Field strength in dB (absolute, or relative to any ground-independent reference),
 * or a phase that is continuous in distance (rad or degrees).
 */
export type HomogeneousCurve<G> = (ground: G, distanceM: number) => number;

/** A homogeneous-path field curve as a complex number (e.g. E/E_flat,pec, or the field phasor itself). */
export type HomogeneousFieldCurve<G> = (ground: G, distanceM: number) => C;

function checkPath<G>(fn: string, path: readonly PathSection<G>[]): void {
  if (!Array.isArray(path) || path.length === 0) {
    throw new RangeError(`${fn}: path must list at least one section (got ${Array.isArray(path) ? 'an empty list' : typeof path})`);
  }
  path.forEach((section, i) => {
    if (!(section.lengthM > 0) || !Number.isFinite(section.lengthM)) {
      throw new RangeError(`${fn}: path[${i}].lengthM must be a finite number > 0 (got ${section.lengthM}); drop empty sections`);
    }
  });
}

/**
 * Forward construction: with the section ends at s_i = d_1 + … + d_i from the transmitter (s_n = D, the receiver),
 *   E_F = Σ_{i=1..n} E_i(s_i) − Σ_{i=1..n−1} E_{i+1}(s_i),
 * i.e. E_1(d_1) − E_2(d_1) + E_2(d_1 + d_2) − … + E_n(D): each boundary restarts the next ground's curve at the
 * distance reached so far (G. Millington, "Ground-wave propagation over an inhomogeneous smooth earth", Proc. IEE
 * Part III 96, 1949; the formula is from memory). On its own it is not reciprocal.
 */
export function millingtonForward<G>(path: readonly PathSection<G>[], curve: HomogeneousCurve<G>): number {
  checkPath('millingtonForward', path);
  return forward(path, curve);
}

function forward<G>(path: readonly PathSection<G>[], curve: HomogeneousCurve<G>): number {
  let reachedM = 0;
  let sum = 0;
  for (let i = 0; i < path.length; i++) {
    if (i > 0) sum -= curve(path[i].ground, reachedM); // − E_{i+1}(s_i), the next ground restarted at s_i
    reachedM += path[i].lengthM;
    sum += curve(path[i].ground, reachedM); // + E_i(s_i)
  }
  return sum;
}

/** Reverse construction: the forward construction on the path read from the receiver end (Millington 1949). */
export function millingtonReverse<G>(path: readonly PathSection<G>[], curve: HomogeneousCurve<G>): number {
  checkPath('millingtonReverse', path);
  return forward([...path].reverse(), curve);
}

/**
 * Millington's estimate: the mean (E_F + E_R)/2 of the forward and reverse constructions (Millington, Proc. IEE
 * Part III 96, 1949: the averaging is the published method, enforcing reciprocity; the two constructions' formula
 * here is from memory). Properties the tests check: a one-ground path returns its curve exactly; the mean is
 * unchanged when the path is reversed; for curves linear in distance (pure exponential attenuation) it is the exact
 * sum of the sections' attenuations; adding a ground-independent function of distance g(D) to every curve adds
 * g(D) to the result (the g(s_i) terms cancel), so the method gives the same answer on E/E_pec in dB as on the
 * absolute field in dB(µV/m), and the same on the secondary phase as on the total phase.
 */
export function millington<G>(path: readonly PathSection<G>[], curve: HomogeneousCurve<G>): number {
  checkPath('millington', path);
  return (forward(path, curve) + forward([...path].reverse(), curve)) / 2;
}

/** Millington's method on a complex field curve: field strength in dB and phase. */
export interface MillingtonField {
  /** Millington's estimate of 20·log10|E| in the curve's reference (dB). */
  readonly db: number;
  /** The forward and reverse constructions of 20·log10|E| (dB). */
  readonly forwardDb: number;
  readonly reverseDb: number;
  /** Millington's estimate of arg E in degrees, (−180, 180]. */
  readonly phaseDeg: number;
  /** The forward and reverse constructions of arg E in degrees, each wrapped into (−180, 180]. */
  readonly forwardPhaseDeg: number;
  readonly reversePhaseDeg: number;
}

/** A phase into (−π, π]: unchanged when already there, −π goes to π (unwrapNearRad's tie goes up). */
const wrapRad = (x: number): number => unwrapNearRad(x, 0);
const toDeg = (rad: number): number => (rad * 180) / Math.PI;

/**
 * Millington's method applied to 20·log10|E| and to arg E of a complex homogeneous-path curve (the ratio to the flat
 * perfect-ground field, or the field itself: by the invariance in `millington` both give the same dB and, up to the
 * reference's own phase, the same phase).
 *
 * Phase: applying the construction to the phase as well as to the amplitude (equivalently, to ln E = ln|E| + j·arg E)
 * is common practice (for example in the secondary-phase corrections of radio-navigation ground waves), not part of
 * Millington's 1949 derivation. How it is formed here: each construction sums the curves' principal arguments with
 * the construction's signs, so it is right modulo 360° (exactly the continuous-phase construction when every
 * curve's phase lies within ±180°, as the ratio to the perfect-ground field's phase does at these ranges); the mean
 * is taken on the branch where the two constructions are nearest, φ_F + wrap(φ_R − φ_F)/2, which is the mean of the
 * continuous constructions whenever they differ by less than 180° (they differ by degrees in practice).
 * A one-ground path returns |E| and arg E of the curve exactly.
 */
export function millingtonField<G>(path: readonly PathSection<G>[], curve: HomogeneousFieldCurve<G>): MillingtonField {
  checkPath('millingtonField', path);
  // evaluate each (ground, distance) once: the curve may be costly (the residue series)
  const seen = new Map<G, Map<number, C>>();
  const value = (ground: G, distanceM: number): C => {
    let byDistance = seen.get(ground);
    if (!byDistance) seen.set(ground, (byDistance = new Map()));
    let e = byDistance.get(distanceM);
    if (!e) byDistance.set(distanceM, (e = curve(ground, distanceM)));
    return e;
  };
  const dbCurve = (g: G, d: number) => 20 * Math.log10(abs(value(g, d)));
  const phaseCurve = (g: G, d: number) => arg(value(g, d));
  const reversed = [...path].reverse();
  const forwardDb = forward(path, dbCurve);
  const reverseDb = forward(reversed, dbCurve);
  const forwardRad = forward(path, phaseCurve);
  const reverseRad = forward(reversed, phaseCurve);
  const meanRad = forwardRad + wrapRad(reverseRad - forwardRad) / 2; // mean on the branch where the two are nearest
  return {
    db: (forwardDb + reverseDb) / 2,
    forwardDb,
    reverseDb,
    phaseDeg: toDeg(wrapRad(meanRad)),
    forwardPhaseDeg: toDeg(wrapRad(forwardRad)),
    reversePhaseDeg: toDeg(wrapRad(reverseRad)),
  };
}

/**
 * The path from the transmitter to a receiver at `rangeM` as sections, from grounds that start at `startM` (the
 * case file's `ground.segments`: the first at 0, increasing). Segments starting at or beyond the receiver are left
 * out.
 */
export function pathToRange<G>(segments: readonly { readonly startM: number; readonly ground: G }[], rangeM: number): PathSection<G>[] {
  if (!(rangeM > 0) || !Number.isFinite(rangeM)) throw new RangeError(`pathToRange: rangeM must be a finite number > 0 (got ${rangeM})`);
  if (segments.length === 0 || segments[0].startM !== 0) {
    throw new RangeError(`pathToRange: segments[0].startM must be 0 (got ${segments.length === 0 ? 'no segments' : segments[0].startM})`);
  }
  segments.forEach((s, i) => {
    if (i > 0 && !(s.startM > segments[i - 1].startM)) {
      throw new RangeError(`pathToRange: segments[${i}].startM must be above segments[${i - 1}].startM = ${segments[i - 1].startM} (got ${s.startM})`);
    }
  });
  const inside = segments.filter((s) => s.startM < rangeM);
  return inside.map((s, i) => ({ lengthM: (i + 1 < inside.length ? inside[i + 1].startM : rangeM) - s.startM, ground: s.ground }));
}
