// The one-column planar case the plane-wave checks run (normal incidence on a homogeneous ground, open top).
import type { Case } from '../../schemas/case.js';
import { checkCase } from './check-case.js';
import { C0 } from '../constants.js';

/** A planar case three wavelengths high over one homogeneous ground segment; only its column is run. */
export function columnCase(frequencyHz: number, sigma: number, epsR: number, model: 'impedance' | 'resolved', cpw: number): Case {
  return checkCase({
    geometry: 'planar',
    frequency_hz: frequencyHz,
    ground: { model, segments: [{ start_m: 0, conductivity_s_per_m: sigma, relative_permittivity: epsR }] },
    domain: { range_m: 100, height_m: (3 * C0) / frequencyHz },
    grid: { cells_per_wavelength: cpw },
    receivers: { ranges_m: [1] },
  });
}
