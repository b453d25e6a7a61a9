// Cases of our own (invented scenarios) for the benchmark: the demo case whose solve() wall time is reported, and
// small cases covering every kernel path (CPML at side and top, impedance sampling both ways, resolved and perfect
// ground, pec ceiling, exponential ionosphere) for checking that a kernel change leaves solve() bit-identical.
import { parseCase, type Case, type CaseInput } from '../schemas/case.js';

/** Demo: the invented Dravelquine VLF transmitter (20 kHz, 1 kW) over moist farmland, 300 km × 60 km, 20 cells/λ. */
const DEMO_INPUT: CaseInput = {
  geometry: 'axisymmetric',
  frequency_hz: 20_000,
  source: { power_w: 1000, height_m: 0 },
  ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
  upper_boundary: { kind: 'open' },
  domain: { range_m: 300_000, height_m: 60_000 },
  grid: { cells_per_wavelength: 20 },
  receivers: { ranges_m: [50_000, 100_000, 200_000], height_m: 0 },
};

export function demoCase(): Case {
  return parseCase(DEMO_INPUT, 'bench demo case');
}

/**
 * Long path: the invented Yelquandor LF time-signal station (80 kHz, 10 kW) on the sphere of the mean earth radius,
 * 300 km over upland heath and the (invented) Zemquorel fens, 15 cells/λ, an open top at 40 km over 60 absorbing
 * cells, as the earth-model example lays it out (its first 300 km). Timed for a fixed number of steps.
 */
const LONG_PATH_INPUT: CaseInput = {
  geometry: 'spherical',
  frequency_hz: 80_000,
  source: { power_w: 10_000 },
  ground: {
    model: 'impedance',
    segments: [
      { start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 },
      { start_m: 60_000, conductivity_s_per_m: 0.01, relative_permittivity: 30 },
    ],
  },
  upper_boundary: { kind: 'open' },
  domain: { range_m: 300_000, height_m: 40_000 },
  grid: { cells_per_wavelength: 15, absorbing_cells: 60, dispersion_correction: 'along_ground' },
  receivers: { ranges_m: [100_000, 200_000, 290_000] },
};

export function longPathCase(): Case {
  return parseCase(LONG_PATH_INPUT, 'bench long-path case');
}

const SMALL_INPUTS: Record<string, CaseInput> = {
  'axisymmetric impedance, extrapolated sampling, open top': {
    frequency_hz: 30_000,
    ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.01 }] },
    domain: { range_m: 60_000, height_m: 20_000 },
    grid: { cells_per_wavelength: 10, absorbing_cells: 10 },
    receivers: { ranges_m: [20_000, 45_000] },
  },
  'planar mixed path (farmland, Ethquarvel lake), half-cell sampling, pec ceiling': {
    geometry: 'planar',
    frequency_hz: 15_000,
    ground: {
      model: 'impedance',
      impedance_sampling: 'half_cell',
      segments: [
        { start_m: 0, conductivity_s_per_m: 0.002, relative_permittivity: 10 },
        { start_m: 50_000, conductivity_s_per_m: 0.05, relative_permittivity: 80 },
      ],
    },
    upper_boundary: { kind: 'pec', height_m: 40_000 },
    domain: { range_m: 120_000, height_m: 40_000 },
    grid: { cells_per_wavelength: 8, absorbing_cells: 10 },
    receivers: { ranges_m: [30_000, 90_000], height_m: 1_000 },
  },
  'axisymmetric resolved ground under an exponential ionosphere': {
    frequency_hz: 20_000,
    ground: {
      model: 'resolved',
      segments: [{ start_m: 0, conductivity_s_per_m: 0.5, relative_permittivity: 20 }],
      resolved_depth_skin_depths: 3,
    },
    upper_boundary: { kind: 'exponential', h_prime_km: 70, beta_per_km: 0.5 },
    domain: { range_m: 60_000, height_m: 90_000 },
    grid: { cells_per_wavelength: 8, absorbing_cells: 10 },
    receivers: { ranges_m: [40_000] },
  },
  'spherical impedance ground, mixed path, open top': {
    geometry: 'spherical',
    frequency_hz: 60_000,
    ground: {
      model: 'impedance',
      segments: [
        { start_m: 0, conductivity_s_per_m: 0.005, relative_permittivity: 15 },
        { start_m: 30_000, conductivity_s_per_m: 4, relative_permittivity: 80 },
      ],
    },
    domain: { range_m: 80_000, height_m: 20_000 },
    grid: { cells_per_wavelength: 8, absorbing_cells: 10 },
    receivers: { ranges_m: [20_000, 70_000] },
  },
  'planar perfect ground, raised source': {
    geometry: 'planar',
    frequency_hz: 40_000,
    source: { power_w: 10, height_m: 800 },
    ground: { model: 'pec' },
    domain: { range_m: 40_000, height_m: 15_000 },
    grid: { cells_per_wavelength: 10, absorbing_cells: 10 },
    receivers: { ranges_m: [10_000, 30_000], height_m: 500 },
  },
};

/** The small cases, parsed, by description. */
export function fingerprintCases(): Array<[string, Case]> {
  return Object.entries(SMALL_INPUTS).map(([name, input]) => [name, parseCase(input, `bench case "${name}"`)]);
}
