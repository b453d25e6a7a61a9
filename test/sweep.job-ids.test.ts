// Stable job ids. A job's id hashes the case without its default values (schemas/canonical-case.ts), so a release
// that adds an option whose default keeps the old behaviour leaves every id, and so every overnight ledger, as it
// was. The ids of the example sweeps' first jobs are pinned here: a change to them is a change of every user's
// ledger and must come with a solver major version (README, "What invalidates a ledger").
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseCase } from '../schemas/case.js';
import { expandSweep } from '../coordinator/sweep/expand.js';
import { parseSweep, parseSweepText } from '../coordinator/sweep/file.js';
import { jobIdFor, jobIdText } from '../coordinator/sweep/job-id.js';
import { PROJECT_ROOT } from './helpers/compiled.js';

const PINNED: Record<string, string> = {
  'quorvessin-vlf-coast.yaml': 'f4bc57fc6b6d6734cc539d08e16ede1f209d445c364c42eb0c3526ff1ada39c4',
  'quorvessin-vlf-resolution.yaml': 'a8e5bfa4d7c0bc4d26807c706cd3fa594a157913f2244bc6eb9b284236b9f062',
  'yelquandor-timing-saltelli.yaml': '3c799504f55a4664b20822fde403f739264447f5fed95009f3551e40f6c6b57a',
  'yelquandor-earth-model.yaml': 'bb2921faf5da97fab8555b55ba3c005e8492a58c63572bac61b71806f177cff9',
};

const minimal = {
  frequency_hz: 20000,
  ground: { segments: [{ start_m: 0, conductivity_s_per_m: 0.003 }] },
  domain: { range_m: 60000, height_m: 20000 },
  grid: { cells_per_wavelength: 10 },
  receivers: { ranges_m: [10000] },
};

describe('stable job ids', () => {
  it.each(Object.entries(PINNED))('when the example %s is expanded then its first job has its pinned id', (file, id) => {
    const text = readFileSync(join(PROJECT_ROOT, 'examples', file), 'utf8');
    const sweep = parseSweep(parseSweepText(text, file), file);
    expect(expandSweep(sweep, file)[0].job_id).toBe(id);
  });

  it('when every default is written out then the job is the same job as with them left out', () => {
    const explicit = {
      ...minimal,
      geometry: 'axisymmetric',
      source: { power_w: 1000, height_m: 0 },
      ground: { model: 'impedance', impedance_sampling: 'extrapolated', resolved_depth_skin_depths: 4, segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
      upper_boundary: { kind: 'open' },
      grid: { cells_per_wavelength: 10, courant: 0.9, absorbing_cells: 40, dispersion_correction: 'none', field_precision: 'float64' },
      receivers: { ranges_m: [10000], height_m: 0 },
      run: { ramp_periods: 3, dft_periods: 2, max_steps: 2_000_000 },
    };
    expect(jobIdFor(parseCase(explicit))).toBe(jobIdFor(parseCase(minimal)));
    // The canonical text holds only what the user chose (RFC 8785: sorted keys, no white space).
    expect(jobIdText(parseCase(explicit))).toBe(
      '{"domain":{"height_m":20000,"range_m":60000},"frequency_hz":20000,"grid":{"cells_per_wavelength":10},' +
        '"ground":{"segments":[{"conductivity_s_per_m":0.003,"start_m":0}]},"receivers":{"ranges_m":[10000]}}\nloamwave-solver-1',
    );
  });

  it('when a value differs from its default then the id changes', () => {
    const base = jobIdFor(parseCase(minimal));
    for (const change of [
      { grid: { cells_per_wavelength: 10, dispersion_correction: 'along_ground' } },
      { upper_boundary: { kind: 'pec', height_m: 20000 } },
      { ground: { segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 14 }] } },
      { geometry: 'spherical' },
      { grid: { cells_per_wavelength: 10, field_precision: 'float32' } },
    ]) {
      expect(jobIdFor(parseCase({ ...minimal, ...change })), JSON.stringify(change)).not.toBe(base);
    }
  });
});
