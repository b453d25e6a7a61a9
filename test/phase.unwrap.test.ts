// solver/phase.ts: shifting a phase by whole turns to lie within half a turn of a reference.
// The specification is the definition itself (a multiple of 2π or 360° added, the result within half a turn).
import { describe, expect, it } from 'vitest';
import { unwrapNearDeg, unwrapNearRad, unwrapSequenceDeg, unwrapSequenceRad } from '../solver/phase.js';

describe('phase unwrapping', () => {
  it('when a phase is many turns from the reference then whole turns are added to bring it within half a turn', () => {
    // a table of (phase, reference) pairs, including ones 1000 turns apart
    const cases: Array<[number, number]> = [
      [-3, 3],
      [3, -3],
      [0.5, 0.4],
      [-2000 * Math.PI + 1, 0],
      [7, 2000 * Math.PI],
      [-Math.PI + 1e-9, Math.PI],
    ];
    for (const [phase, reference] of cases) {
      const u = unwrapNearRad(phase, reference);
      const turns = (u - phase) / (2 * Math.PI);
      // whole turns: the rounding of 2π·n and of the sum leaves |turns − n| near n·1e-16
      expect(Math.abs(turns - Math.round(turns)), `${phase} vs ${reference}`).toBeLessThan(1e-12 * Math.max(1, Math.abs(turns)));
      expect(Math.abs(u - reference), `${phase} vs ${reference}`).toBeLessThanOrEqual(Math.PI + 1e-12);
    }
    expect(unwrapNearRad(-3, 3)).toBeCloseTo(-3 + 2 * Math.PI, 15);
  });

  it('when the phases are in degrees then −179° against 179° becomes 181°, exactly', () => {
    expect(unwrapNearDeg(-179, 179)).toBe(181);
    expect(unwrapNearDeg(179, -179)).toBe(-181);
    expect(unwrapNearDeg(725, 0)).toBe(5);
    expect(unwrapNearDeg(10, 10)).toBe(10);
  });

  it('when a sampled phase ramp is wrapped into (−π, π] then the sequence unwrap restores the ramp', () => {
    const slopeRad = -0.42; // per sample, below π: the guide check's 2 km spacing at 10 kHz
    const ramp = Array.from({ length: 40 }, (_, i) => 0.3 + slopeRad * i);
    const wrapped = ramp.map((p) => Math.atan2(Math.sin(p), Math.cos(p)));
    const back = unwrapSequenceRad(wrapped);
    // atan2 of the rounded sine and cosine is good to a few ulps of π
    back.forEach((p, i) => expect(Math.abs(p - ramp[i])).toBeLessThan(1e-13));
    expect(unwrapSequenceRad([])).toEqual([]);
  });

  it('when phases in degrees wrap through ±180° along a sequence then they are made continuous, exactly', () => {
    expect(unwrapSequenceDeg([170, -170, -150, 179, -1])).toEqual([170, 190, 210, 179, 359]);
    expect(unwrapSequenceDeg([5])).toEqual([5]);
  });
});
