// Solver behaviour that is not a comparison with a formula: stability over long runs, the ionosphere absorbing
// what reaches it, determinism, validity warnings and refusals, the grid report.
import { describe, expect, it } from 'vitest';
import { parseCase, type CaseInput } from '../schemas/case.js';
import { UserError } from '../schemas/errors.js';
import { planGrid } from '../solver/grid.js';
import { estimateCost, solve } from '../solver/index.js';

const mixedPathUnderIonosphere: CaseInput = {
  frequency_hz: 10000,
  ground: {
    model: 'impedance',
    segments: [
      { start_m: 0, conductivity_s_per_m: 1e-4, relative_permittivity: 10 },
      { start_m: 60000, conductivity_s_per_m: 4, relative_permittivity: 80 },
    ],
  },
  // mid-latitude night profile of Thomson, Rodger & Clilverd, JGR 2007 (h′ = 85.1 km, β = 0.63/km; published),
  // lowered to 70 km so the layer is well inside a small domain
  upper_boundary: { kind: 'exponential', h_prime_km: 70, beta_per_km: 0.63 },
  domain: { range_m: 150000, height_m: 100000 },
  grid: { cells_per_wavelength: 10, courant: 0.94 },
  receivers: { ranges_m: [50000, 100000] },
};

describe('solver behaviour', () => {
  it('when a case runs 20,000 steps at the largest allowed Courant number then the field energy shows no late-time growth', () => {
    const energy: Array<[number, number]> = [];
    const r = solve(parseCase(mixedPathUnderIonosphere), { fixedSteps: 20000, energyEverySteps: 2000, onEnergy: (n, e) => energy.push([n, e]) });
    expect(r.grid.steps).toBe(20000);
    console.log('energy by step: ' + energy.map(([n, e]) => `${n}: ${e.toExponential(6)}`).join(', '));
    const late = energy.filter(([n]) => n >= 10000).map(([, e]) => e);
    // steady CW state: the energy is constant once settled; an instability would grow exponentially
    for (const e of late) expect(Math.abs(e / late[0] - 1)).toBeLessThan(1e-6);
    expect(r.receivers.every((x) => Number.isFinite(x.ez_db_uv_per_m))).toBe(true);
  });

  it('when an exponential ionosphere caps the domain then the field high in it is absorbed (over 300 dB below the open-top field)', () => {
    const high = { ...mixedPathUnderIonosphere.receivers, height_m: 95000 };
    const under = solve(parseCase({ ...mixedPathUnderIonosphere, receivers: high }));
    const open = solve(parseCase({ ...mixedPathUnderIonosphere, upper_boundary: { kind: 'open' }, receivers: high }));
    // at 95 km σ ≈ ε0·2.5e5·e^{0.63·25} ≈ 15 S/m (Wait & Spies 1964 profile): a skin depth of about 1.3 m at 10 kHz
    for (let i = 0; i < under.receivers.length; i++) {
      expect(under.receivers[i].ez_db_uv_per_m).toBeLessThan(open.receivers[i].ez_db_uv_per_m - 300);
    }
    expect(under.grid.settled).toBe(true);
  });

  it('when the same case is solved twice then the results are bit-identical', () => {
    const c = parseCase({ ...mixedPathUnderIonosphere, upper_boundary: { kind: 'open' }, domain: { range_m: 120000, height_m: 40000 } });
    expect(JSON.stringify(solve(c))).toBe(JSON.stringify(solve(c)));
  });

  it('when the loss tangent is below 10 then the result warns, and below 1 the impedance model is refused with a pointer to the resolved ground', () => {
    const base: CaseInput = {
      frequency_hz: 100000,
      ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 2e-4, relative_permittivity: 10 }] },
      domain: { range_m: 20000, height_m: 8000 },
      grid: { cells_per_wavelength: 10 },
      receivers: { ranges_m: [10000] },
    };
    const warned = solve(parseCase(base));
    expect(warned.warnings.join(' ')).toMatch(/loss tangent 3\.6\d* < 10/);
    const refused = () => solve(parseCase({ ...base, ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 2e-5, relative_permittivity: 10 }] } }));
    expect(refused).toThrow(UserError);
    expect(refused).toThrow(/"model": "resolved"/);
  });

  it('when the fields are stored in float32 then the estimate counts 4 bytes a field value, and the field moves by float32 round-off only', () => {
    const input = {
      frequency_hz: 20_000,
      ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
      domain: { range_m: 30_000, height_m: 15_000 },
      grid: { cells_per_wavelength: 10 },
      receivers: { ranges_m: [20_000] },
    } as const;
    const c64 = parseCase(input);
    const c32 = parseCase({ ...input, grid: { ...input.grid, field_precision: 'float32' } });
    const e64 = estimateCost(c64);
    const e32 = estimateCost(c32);
    const s64 = solve(c64);
    const s32 = solve(c32);
    // Ex, Ez and Hy: three arrays of (nx + 1)·(nz + 1) values (a node more than the cells each way), 8 bytes each
    // in float64 and 4 in float32
    const g = planGrid(c64);
    const nodes = (g.nx + 1) * (g.nz + 1);
    expect(e64.memory_bytes - e32.memory_bytes).toBe(3 * 4 * nodes);
    const r64 = s64.receivers[0];
    const r32 = s32.receivers[0];
    expect(r32.ez_db_uv_per_m).not.toBe(r64.ez_db_uv_per_m); // the option does act
    // float32 keeps 24 bits (6e-8 relative) per stored value; the phasor moves by a small multiple of that
    expect(Math.abs(r32.ez_db_uv_per_m - r64.ez_db_uv_per_m)).toBeLessThan(1e-4);
  });

  it('when a case is solved then the result reports the grid actually used and estimateCost predicts it', () => {
    const c = parseCase({ ...mixedPathUnderIonosphere, upper_boundary: { kind: 'open' }, domain: { range_m: 120000, height_m: 40000 } });
    const r = solve(c);
    const est = estimateCost(c);
    expect(r.grid.cell_size_m).toBeCloseTo(299792458 / 10000 / 10, 6);
    // a whole number of steps per period (exact DFT over whole periods)
    expect(r.grid.time_step_s * r.grid.steps_per_period * 10000).toBeCloseTo(1, 12);
    expect(r.grid.courant).toBeLessThanOrEqual(0.94);
    expect(r.grid.cells_total).toBe(est.cells_total);
    expect(r.grid.memory_bytes).toBe(est.memory_bytes);
    expect(r.grid.steps).toBeGreaterThanOrEqual(est.steps * 0.5);
    expect(r.grid.settled).toBe(true);
  });

  it('when the resolved ground is meshed 4 rather than 8 skin depths deep then the answers agree (the lossy cells absorb what the bottom would reflect)', () => {
    // The wave returning from a perfect conductor d deep is down by e^{−2d/δ} (skin-depth attenuation, e.g. Jackson,
    // Classical Electrodynamics, 3rd ed. 1999, §8.1, from memory): −70 dB at the default 4 δ.
    const at = (depth: number) =>
      solve(
        parseCase({
          frequency_hz: 1e5,
          ground: { model: 'resolved', resolved_depth_skin_depths: depth, segments: [{ start_m: 0, conductivity_s_per_m: 1e-3, relative_permittivity: 15 }] },
          domain: { range_m: 20000, height_m: 6000 },
          grid: { cells_per_wavelength: 15 },
          receivers: { ranges_m: [5000, 15000] },
        }),
      ).receivers;
    const four = at(4);
    const eight = at(8);
    four.forEach((x, i) => {
      // measured 0.002–0.003 dB and 0.007–0.015°
      expect(Math.abs(x.ez_db_uv_per_m - eight[i].ez_db_uv_per_m)).toBeLessThan(0.01);
      expect(Math.abs(x.ez_phase_deg - eight[i].ez_phase_deg)).toBeLessThan(0.05);
    });
  });
});
