// Receivers share one running DFT per grid sample (solver/receivers.ts): these tests hold solve() to the numbers
// the earlier implementation, one running DFT per tap, gave on the same cases (test/fixtures/receivers-before.json,
// written by bench/receiver-record.ts before the change), and show that a receiver's value does not depend on how
// many other receivers the case lists once the step count is the same. The comparisons are exact: per sample the
// running sums are the same floating-point operations in the same order as per tap, and the receivers combine
// their taps in the same order as before (common practice for a refactoring of numerical code: a regression
// against the previous implementation's own output; no published value is involved).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { equivalenceCases, smallCostCase, spreadRanges } from '../bench/receiver-cases.js';
import { planGrid } from '../solver/grid.js';
import { solve } from '../solver/index.js';
import { buildReceiverTaps, ReceiverBank, RunningDft, SampleDft, type Tap } from '../solver/receivers.js';

interface Recorded {
  steps: number;
  settling_change: number;
  receivers: Array<{ range_m: number; ez: { re: number; im: number }; e_horizontal: { re: number; im: number }; h: { re: number; im: number } }>;
}

const before = JSON.parse(readFileSync(new URL('./fixtures/receivers-before.json', import.meta.url), 'utf8')) as Record<string, Recorded>;

describe('receivers on shared samples', () => {
  for (const [name, c] of equivalenceCases()) {
    it(`when "${name}" is solved then every receiver's Ez, E horizontal and H equal the per-tap DFT's numbers bit for bit`, () => {
      const was = before[name];
      expect(was, `the fixture has no entry for "${name}"; rerun bench/receiver-record.ts on the earlier solver`).toBeDefined();
      const r = solve(c);
      // the settling test reads the same phasors, so it stops at the same step with the same change
      expect(r.grid.steps).toBe(was.steps);
      expect(r.grid.settling_change).toBe(was.settling_change);
      expect(r.receivers.length).toBe(was.receivers.length);
      r.receivers.forEach((x, i) => {
        const w = was.receivers[i];
        expect(x.range_m).toBe(w.range_m);
        expect([x.ez.re, x.ez.im, x.e_horizontal.re, x.e_horizontal.im, x.h.re, x.h.im]).toEqual([
          w.ez.re,
          w.ez.im,
          w.e_horizontal.re,
          w.e_horizontal.im,
          w.h.re,
          w.h.im,
        ]);
      });
    });
  }

  it('when 10,000 receivers are solved at once then each equals the same receiver solved in a group of 100 at the same step count', () => {
    const ranges = spreadRanges(10_000, 10, 29_990);
    const all = solve(smallCostCase(ranges));
    expect(all.receivers.length).toBe(10_000);
    expect(all.grid.settled).toBe(true);
    for (let g = 0; g < ranges.length; g += 100) {
      const part = solve(smallCostCase(ranges.slice(g, g + 100)), { fixedSteps: all.grid.steps });
      expect(part.grid.steps).toBe(all.grid.steps);
      part.receivers.forEach((x, i) => {
        const y = all.receivers[g + i];
        expect([x.range_m, x.ez.re, x.ez.im, x.e_horizontal.re, x.e_horizontal.im, x.h.re, x.h.im]).toEqual([
          y.range_m,
          y.ez.re,
          y.ez.im,
          y.e_horizontal.re,
          y.e_horizontal.im,
          y.h.re,
          y.h.im,
        ]);
      });
    }
  });

  it('when 10,000 receivers sit on the ground row then the running DFTs number at most the samples of its two rows in three fields', () => {
    const c = smallCostCase(spreadRanges(10_000, 10, 29_990));
    const g = planGrid(c);
    const receivers = buildReceiverTaps(g, c.receivers.ranges_m, c.receivers.height_m, true);
    const taps = receivers.reduce((s, r) => s + r.ez.length + r.ex.length + r.hy.length, 0);
    const bank = new ReceiverBank(receivers, g.stepsPerPeriod, new Array<number>(receivers.length).fill(0));
    // Ez, Ex and Hy each read the two rows nearest the ground in the columns 0…nx: 3·2·(nx + 1) samples at most
    expect(bank.dft.sampleCount).toBeLessThanOrEqual(3 * 2 * (g.nx + 1));
    // per receiver 4 Ez and 4 Hy taps (two columns × two rows, extrapolated to the ground) and 2 Ex taps (the
    // impedance row itself, two columns): 100,000 taps on at most 3·2·(nx + 1) running sums
    expect(taps).toBe(100_000);
  });

  it('when two taps read the same sample then they share one running sum and get the same phasor as a lone tap', () => {
    const fieldValues = new Float64Array([0.5, -1.25, 2, 3.5]);
    const fields = { ex: fieldValues, ez: fieldValues, hy: fieldValues };
    const taps: Tap[] = [
      { field: 'ez', index: 1, weight: 1, offsetM: 0, halfStepOffset: 2 },
      { field: 'hy', index: 1, weight: 1, offsetM: 0, halfStepOffset: 1 },
      { field: 'ez', index: 1, weight: 0.5, offsetM: 10, halfStepOffset: 2 },
      { field: 'ez', index: 3, weight: 1, offsetM: 0, halfStepOffset: 2 },
    ];
    const shared = new SampleDft(taps, 7);
    expect(shared.sampleCount).toBe(3);
    expect(shared.tapSample[0]).toBe(shared.tapSample[2]);
    const perTap = new RunningDft(taps, 7);
    const alone = new RunningDft([taps[1]], 7);
    // index 3 carries 2·cos(2π(n+1)/7 + 0.4): Ez samples sit at (n+1)·Δt, so over two whole periods the DFT gives
    // the rms phasor (2/√2)·e^{j0.4} (Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed. 2010, §8.1:
    // a sinusoid over a whole number of periods falls in one bin)
    for (let n = 0; n < 14; n++) {
      for (let i = 0; i < 3; i++) fieldValues[i] = Math.sin(0.3 * n + i);
      fieldValues[3] = 2 * Math.cos((2 * Math.PI * (n + 1)) / 7 + 0.4);
      perTap.accumulate(n, fields);
      alone.accumulate(n, fields);
    }
    const ph = perTap.take();
    const one = alone.take();
    expect(ph.re[0]).toBe(ph.re[2]);
    expect(ph.im[0]).toBe(ph.im[2]);
    expect([ph.re[1], ph.im[1]]).toEqual([one.re[0], one.im[0]]);
    // 1e-12: round-off of 14 products and the cos/sin table, far below any error of the method
    expect(Math.abs(ph.re[3] - Math.SQRT2 * Math.cos(0.4))).toBeLessThan(1e-12);
    expect(Math.abs(ph.im[3] - Math.SQRT2 * Math.sin(0.4))).toBeLessThan(1e-12);
  });
});
