// Small invented cases with many receivers, shared by the receiver-cost benchmark and the receiver tests: every
// field path (ground-row and raised receivers, impedance rows sampled both ways, resolved and perfect ground,
// receivers on a column, between columns, repeated, and past the last column) in grids of a few thousand cells.
import { parseCase, type Case, type CaseInput } from '../schemas/case.js';

/** `count` ranges spread over [fromM, toM], a few of them repeated and a few landing exactly on grid columns. */
export function spreadRanges(count: number, fromM: number, toM: number): number[] {
  const out: number[] = [];
  for (let r = 0; r < count; r++) out.push(count === 1 ? fromM : fromM + ((toM - fromM) * r) / (count - 1));
  return out;
}

/**
 * The small case the cost benchmark and the 10,000-receiver test use: axisymmetric, land then sea, 30 kHz, 30 km
 * by 10 km (10 cells per wavelength: 40 × 20 cells and the layers; the benchmark uses 20, a few ms of stepping).
 */
export function smallCostCase(ranges: readonly number[], cellsPerWavelength = 10): Case {
  return parseCase(
    {
      frequency_hz: 30_000,
      ground: {
        model: 'impedance',
        segments: [
          { start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 },
          { start_m: 12_000, conductivity_s_per_m: 4, relative_permittivity: 80 },
        ],
      },
      domain: { range_m: 30_000, height_m: 10_000 },
      grid: { cells_per_wavelength: cellsPerWavelength, absorbing_cells: 10 },
      receivers: { ranges_m: [...ranges], height_m: 0 },
    },
    'receiver cost case',
  );
}

const EQUIVALENCE_INPUTS: Record<string, CaseInput> = {
  'axisymmetric impedance (extrapolated), 40 ground receivers': {
    frequency_hz: 30_000,
    ground: {
      model: 'impedance',
      segments: [
        { start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 },
        { start_m: 12_000, conductivity_s_per_m: 4, relative_permittivity: 80 },
      ],
    },
    domain: { range_m: 30_000, height_m: 10_000 },
    grid: { cells_per_wavelength: 10, absorbing_cells: 10 },
    // 1 km = exactly one column (10 cells per 10 km wavelength); 2.5 km and 7 km repeated
    receivers: { ranges_m: [...spreadRanges(36, 500, 29_500), 2_500, 2_500, 7_000, 7_000], height_m: 0 },
  },
  'planar impedance (half-cell), 25 raised receivers under a pec ceiling': {
    geometry: 'planar',
    frequency_hz: 20_000,
    ground: { model: 'impedance', impedance_sampling: 'half_cell', segments: [{ start_m: 0, conductivity_s_per_m: 0.01 }] },
    upper_boundary: { kind: 'pec', height_m: 12_000 },
    domain: { range_m: 40_000, height_m: 12_000 },
    grid: { cells_per_wavelength: 8, absorbing_cells: 10 },
    receivers: { ranges_m: spreadRanges(25, 1_000, 39_000), height_m: 700 },
  },
  'axisymmetric resolved ground, 12 ground receivers': {
    frequency_hz: 20_000,
    ground: { model: 'resolved', segments: [{ start_m: 0, conductivity_s_per_m: 0.5, relative_permittivity: 20 }] },
    domain: { range_m: 30_000, height_m: 12_000 },
    grid: { cells_per_wavelength: 8, absorbing_cells: 10 },
    receivers: { ranges_m: spreadRanges(12, 2_000, 28_000), height_m: 0 },
  },
  'planar perfect ground, 15 receivers on a node row': {
    geometry: 'planar',
    frequency_hz: 40_000,
    source: { power_w: 10, height_m: 750 },
    ground: { model: 'pec' },
    domain: { range_m: 15_000, height_m: 6_000 },
    grid: { cells_per_wavelength: 10, absorbing_cells: 10 },
    // 750 m: exactly on the Ex node row (a one-row tap) for 750 m cells
    receivers: { ranges_m: spreadRanges(15, 500, 14_500), height_m: 1_500 },
  },
};

/** The equivalence cases, parsed, by description. */
export function equivalenceCases(): Array<[string, Case]> {
  return Object.entries(EQUIVALENCE_INPUTS).map(([name, input]) => [name, parseCase(input, `receiver case "${name}"`)]);
}
