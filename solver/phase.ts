// Phase unwrapping against a reference: the one home of "shift by whole turns to lie within half a turn of".
// Used by the reference checks (phase differences, fitted phase constants); pure arithmetic, no I/O.

/**
 * `phaseRad` shifted by whole turns (2π) to lie within π of `referenceRad`: phase + 2π·round((ref − phase)/2π).
 * One multiply-add, so a phase many turns away costs no more than a near one. At exactly half a turn away the
 * tie goes to the shift Math.round picks (towards +∞). NaN or ±Infinity in gives NaN out.
 * Example: unwrapNearRad(−3, 3) = −3 + 2π ≈ 3.2832.
 */
export function unwrapNearRad(phaseRad: number, referenceRad: number): number {
  const turn = 2 * Math.PI;
  return phaseRad + turn * Math.round((referenceRad - phaseRad) / turn);
}

/**
 * The same in degrees: `phaseDeg` shifted by whole turns (360°) to lie within 180° of `referenceDeg`.
 * Example: unwrapNearDeg(−179, 179) = 181.
 */
export function unwrapNearDeg(phaseDeg: number, referenceDeg: number): number {
  return phaseDeg + 360 * Math.round((referenceDeg - phaseDeg) / 360);
}

/**
 * A sequence of principal phases (rad) made continuous: each is unwrapped against the one before it, so steps
 * between neighbours stay within π (the sampling must be fine enough for that to hold). Returns a new array.
 * Example: unwrapSequenceRad([3, −3]) = [3, 3.2832].
 */
export function unwrapSequenceRad(phasesRad: readonly number[]): number[] {
  const out: number[] = [];
  for (let i = 0; i < phasesRad.length; i++) out.push(i === 0 ? phasesRad[0] : unwrapNearRad(phasesRad[i], out[i - 1]));
  return out;
}

/**
 * The same in degrees: each phase unwrapped against the one before it (steps between neighbours within 180°).
 * Example: unwrapSequenceDeg([170, −170, −150]) = [170, 190, 210].
 */
export function unwrapSequenceDeg(phasesDeg: readonly number[]): number[] {
  const out: number[] = [];
  for (let i = 0; i < phasesDeg.length; i++) out.push(i === 0 ? phasesDeg[0] : unwrapNearDeg(phasesDeg[i], out[i - 1]));
  return out;
}
