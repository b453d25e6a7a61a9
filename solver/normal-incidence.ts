// A one-column run of the same kernels: a plane wave at normal incidence on the ground (or on the top absorbing
// layer), decomposed into incident and reflected waves from two probe rows. Used to check the ground models
// against the exact Fresnel coefficient and to measure the absorbing layer's reflection.
import type { Case } from '../schemas/case.js';
import { C0 } from './constants.js';
import { unwrapNearRad } from './phase.js';
import { abs, arg, div, fromPolar, mul, sub, type C } from './references/complex.js';
import { buildCpmlState } from './cpml.js';
import { applySurfaceImpedance, updateE, updateECpml, updateH, updateHCpml, yeeFields, type ImpedanceRow, type YeeFields } from './fdtd-kernel.js';
import { buildMaterials, fieldArray, magneticCoefficients, planGrid } from './grid.js';
import { RunningDft, type Tap } from './receivers.js';
import { sourceCurrent } from './source.js';
import { buildImpedanceRow, groundImpedance } from './surface-impedance.js';

export interface NormalIncidenceResult {
  /** Reflection of the ground, E_reflected/E_incident at z = 0 (e^{jωt}). */
  groundReflection: { re: number; im: number };
  /** |E_down/E_up| just above the source: the top layer's reflection, as a magnitude. */
  topReflectionMagnitude: number;
  /** Phase velocity of the upward wave over the source, measured between two rows, as a fraction of c. */
  measuredPhaseVelocityRatio: number;
  dzM: number;
  dtS: number;
  stepsPerPeriod: number;
}

/** Numerical wavenumber of the 1-D Yee scheme: sin(ωΔt/2)/(cΔt) = sin(k̃Δz/2)/Δz (Taflove & Hagness, ch. 4). */
export function yee1dWavenumber(omega: number, dtS: number, dzM: number): number {
  return (2 / dzM) * Math.asin((dzM / (C0 * dtS)) * Math.sin((omega * dtS) / 2));
}

/** Split phasors at heights z1, z2 into A·e^{+jk̃z} (downward) and B·e^{−jk̃z} (upward), by Cramer's rule. */
function decompose(e1: C, e2: C, k: number, z1: number, z2: number): { down: C; up: C } {
  // [e^{jkz1} e^{-jkz1}; e^{jkz2} e^{-jkz2}] [A; B] = [e1; e2]
  const a11 = fromPolar(1, k * z1);
  const a12 = fromPolar(1, -k * z1);
  const a21 = fromPolar(1, k * z2);
  const a22 = fromPolar(1, -k * z2);
  const det = sub(mul(a11, a22), mul(a12, a21));
  return { down: div(sub(mul(e1, a22), mul(a12, e2)), det), up: div(sub(mul(a11, e2), mul(a21, e1)), det) };
}

/** Wavenumber of an upward wave from its phasors at two heights Δz apart: the phase falls by k̃·Δz (e^{jωt}). */
function measuredWavenumber(lower: C, upper: C, dzM: number): number {
  // the fall of phase from the lower to the upper row, taken in [0, 2π): a wave going up by less than a wavelength
  const fallRad = unwrapNearRad(arg(lower) - arg(upper), Math.PI);
  return fallRad / dzM;
}

/** Run the column of a planar case with an open top; the case's domain height sets the air column. */
export function runNormalIncidence(c: Case): NormalIncidenceResult {
  const g = planGrid(c);
  const mat = buildMaterials(c, g);
  const { nz } = g;
  const S = nz + 1;
  // column 0's coefficient profile, as a one-column grid (column 1 is the unused far edge)
  const col = (a: Float64Array, offset: number): Float64Array => {
    const out = new Float64Array(2 * S);
    out.set(a.subarray(offset, offset + S));
    return out;
  };
  const { chz } = magneticCoefficients(g);
  const f = yeeFields({
    nx: 1,
    nz,
    S,
    ex: fieldArray(c, 2 * S),
    ez: fieldArray(c, 2 * S),
    hy: fieldArray(c, 2 * S),
    caEx: col(mat.caEx, mat.colEx[0]),
    cbEx: col(mat.cbEx, mat.colEx[0]),
    caEz: col(mat.caEz, mat.colEz[0]),
    cbEz: new Float64Array(2 * S), // no Ez: a plane wave uniform along x
    colEx: new Int32Array([0, S]),
    colEz: new Int32Array([0, S]),
    chx: 0,
    chz,
    rp: new Float64Array(2).fill(1),
    rm: new Float64Array(2).fill(1),
    axisFactor: 0,
  });
  const pml = buildCpmlState(1, nz, 0, g.pmlTop, g.dxM, g.dtS, c.frequency_hz);
  let zrow: ImpedanceRow | undefined;
  if (c.ground.model === 'impedance') {
    const s = (c.ground.segments ?? [])[0];
    const z = groundImpedance(c.frequency_hz, s.conductivity_s_per_m, s.relative_permittivity);
    zrow = buildImpedanceRow([z.resistanceOhm], [z.inductanceH], g.dtS, c.ground.impedance_sampling);
  }
  // rows: ground surface g0; probes a quarter and a half of the way up; the sheet source at 3/4; above it two more
  const g0 = g.groundRow;
  const airRows = nz - g.pmlTop - g0;
  const kA = g0 + Math.round(airRows * 0.25);
  const kB = g0 + Math.round(airRows * 0.5);
  const kS = g0 + Math.round(airRows * 0.7);
  const kC = g0 + Math.round(airRows * 0.8);
  const kD = g0 + Math.round(airRows * 0.9);
  const taps: Tap[] = [kA, kB, kC, kD].map((k) => ({ field: 'ex', index: k, weight: 1, offsetM: 0, halfStepOffset: 2 }));
  const N = g.stepsPerPeriod;
  const dft = new RunningDft(taps, N);
  const omega = 2 * Math.PI * c.frequency_hz;
  const rampSteps = c.run.ramp_periods * N;
  const heightM = g.zNodeM[nz] - g.zNodeM[0];
  const settle = rampSteps + Math.ceil((4 * heightM) / C0 / g.dtS) + 4 * N;
  const window = c.run.dft_periods * N;
  for (let n = 0; n < settle + window; n++) {
    updateH(f);
    updateHCpml(f, pml);
    if (zrow) applySurfaceImpedance(f, zrow);
    updateE(f);
    updateECpml(f, pml);
    f.ex[kS] += sourceCurrent((n + 0.5) * g.dtS, omega, rampSteps * g.dtS);
    if (n >= settle) dft.accumulate(n, { ex: f.ex, ez: f.ez, hy: f.hy });
  }
  const ph = dft.take();
  const e = (t: number): C => ({ re: ph.re[t], im: ph.im[t] });
  const k = yee1dWavenumber(omega, g.dtS, g.dxM);
  const z = (row: number) => g.zNodeM[row];
  const below = decompose(e(0), e(1), k, z(kA), z(kB));
  const above = decompose(e(2), e(3), k, z(kC), z(kD));
  return {
    groundReflection: div(below.up, below.down),
    topReflectionMagnitude: abs(above.down) / abs(above.up),
    measuredPhaseVelocityRatio: omega / (C0 * measuredWavenumber(e(2), e(3), z(kD) - z(kC))),
    dzM: g.dxM,
    dtS: g.dtS,
    stepsPerPeriod: N,
  };
}
