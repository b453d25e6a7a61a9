// The report's earth-curvature section: for a sweep that sets a flat geometry against spherical earths, the sphere's
// field minus the flat one at each receiver, paired by the other varied inputs. Numbers are made up here (this is a
// test of the pairing and arithmetic, not of the physics: the physics checks are in solver/verify/).
import { describe, expect, it } from 'vitest';
import type { FolderTables } from '../coordinator/analysis/read-tables.js';
import { assembleReportData } from '../coordinator/report/assembly.js';
import { buildReportHtml } from '../coordinator/report/html.js';
import { parseSweep } from '../coordinator/sweep/file.js';

const sweep = parseSweep(
  {
    name: 'curvature-pairs',
    base: {
      frequency_hz: 20000,
      ground: { segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
      domain: { range_m: 300000, height_m: 60000 },
      receivers: { ranges_m: [100000, 200000] },
    },
    vary: {
      frequency_hz: { values: [20000, 40000] },
      geometry: { values: ['axisymmetric', 'spherical'] },
      'earth.radius_m': { values: [6371000, 8494667] },
    },
  },
  'sweep.yaml',
);

/** A run and its two receivers: dB values chosen so every difference is a distinct, exact binary fraction. */
function run(id: string, f: number, geometry: string, radius: number | null, db: [number, number], phase: [number, number]) {
  return {
    run: { job_id: id, status: 'done', frequency_hz: f, geometry, earth_radius_m: radius },
    fields: [100000, 200000].map((r, k) => ({ job_id: id, range_m: r, height_m: 0, ez_db_uv_per_m: db[k], ez_phase_deg: phase[k] })),
  };
}

describe('earth curvature in the report', () => {
  const made = [
    run('flat20', 20000, 'axisymmetric', null, [70, 64], [10, 170]),
    run('sph20a', 20000, 'spherical', 6371000, [69.75, 63.5], [9, -175]),
    run('sph20b', 20000, 'spherical', 8494667, [69.875, 63.75], [9.5, 179]),
    run('flat40', 40000, 'axisymmetric', null, [66, 58], [0, 0]),
    run('sph40a', 40000, 'spherical', 6371000, [65.5, 56.5], [-2, -20]),
  ];
  const tables: FolderTables = {
    sweep,
    sweepFileName: 'sweep.yaml',
    runColumns: ['job_id', 'status', 'frequency_hz', 'geometry', 'earth_radius_m'],
    runs: made.map((m) => m.run),
    fields: made.flatMap((m) => m.fields),
    convergence: [],
    sensitivity: [],
  };

  it('when flat and spherical runs share their other inputs then each sphere is compared with its own flat run', () => {
    const data = assembleReportData(tables, { generatedBy: 'test' });
    expect(data.curvature.map((r) => [r.group, r.earth_radius_m, r.range_m, r.difference_db, r.phase_difference_deg])).toEqual([
      ['frequency_hz=20000', 6371000, 100000, -0.25, -1],
      ['frequency_hz=20000', 6371000, 200000, -0.5, 15], // −175 − 170 = −345°, i.e. +15° within ±180°
      ['frequency_hz=20000', 8494667, 100000, -0.125, -0.5],
      ['frequency_hz=20000', 8494667, 200000, -0.25, 9],
      ['frequency_hz=40000', 6371000, 100000, -0.5, -2],
      ['frequency_hz=40000', 6371000, 200000, -1.5, -20],
    ]);
  });

  it('when the page is built then it has the curvature section, its plot and its table', async () => {
    const html = await buildReportHtml(assembleReportData(tables, { generatedBy: 'test' }));
    expect(html).toContain('<section id="curvature">');
    expect(html).toContain('data-plot="curvature-db"');
    expect(html).toContain('sphere − flat (dB)');
  });

  it('when geometry does not vary then there is no curvature section', async () => {
    const flatOnly = { ...tables, sweep: { ...sweep, vary: { frequency_hz: sweep.vary.frequency_hz } } };
    const data = assembleReportData(flatOnly, { generatedBy: 'test' });
    expect(data.curvature).toEqual([]);
    expect(await buildReportHtml(data)).not.toContain('id="curvature"');
  });
});
