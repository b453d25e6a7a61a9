// The HTML report built from numbers computed here (Ishigami indices, a convergence series from a known error
// law, fields from the perfect-ground reference), checked as text and in headless Chromium.
import { mkdirSync, writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { convergenceTable, type ConvergenceRun } from '../coordinator/analysis/grid-convergence.js';
import { saltelliIndices, saltelliRows } from '../coordinator/analysis/saltelli.js';
import { saltelliDesign } from '../coordinator/sampling/saltelli-layout.js';
import { ReportDataSchema, type FieldSeries, type ReportData } from '../coordinator/report/data.js';
import { buildReportHtml, escapeHtml } from '../coordinator/report/html.js';
import { fieldPlots, MAX_FIELD_LINES, renderSvg } from '../coordinator/report/plots.js';
import { residualPhaseDeg } from '../coordinator/analysis/residual-phase.js';
import { C0 } from '../solver/constants.js';
import { checkReportPage, launchChromium, WINDOW_WIDTH_PX, type Browser } from './report.page-check.js';

const OUT = resolve('test-output');

/**
 * Ez over a perfect ground for a 1 kW short monopole: 300 mV/m at 1 km, falling as 1/d (the reference of the
 * ITU-R P.368 ground-wave curves; docs/references.md, derived), here scaled by an invented loss factor per conductivity
 * for the demo, with the free-space phase −360°·f·r/c plus a small invented lag.
 */
function demoSeries(jobId: string, frequencyHz: number, conductivity: number): FieldSeries {
  const ranges = [25e3, 50e3, 100e3, 200e3, 400e3];
  return {
    job_id: jobId,
    params: { frequency_hz: frequencyHz, ground_segments_0_conductivity_s_per_m: conductivity },
    frequency_hz: frequencyHz,
    points: ranges.map((r) => {
      const eRms = (0.3 / (r / 1000)) * Math.exp(-(r * Math.sqrt(frequencyHz / 20e3)) / (2e6 * Math.sqrt(conductivity)));
      const phase = -(360 * frequencyHz * r) / C0 - (5 * (r / 1e5)) / Math.sqrt(conductivity) ** 0.5;
      return { range_m: r, ez_db_uv_per_m: 20 * Math.log10(eRms / 1e-6), ez_phase_deg: ((((phase + 180) % 360) + 360) % 360) - 180 };
    }),
  };
}

function buildData(): ReportData {
  // Sensitivity: Ishigami (Ishigami & Homma 1990), a = 7, b = 0.1, N = 1024, named as if three inputs of a sweep.
  const { points, layout } = saltelliDesign(3, 1024, 1);
  const y = points.map((u) => {
    const [x1, x2, x3] = Array.from(u, (v) => -Math.PI + 2 * Math.PI * v);
    return Math.sin(x1) + 7 * Math.sin(x2) ** 2 + 0.1 * x3 ** 4 * Math.sin(x1);
  });
  const params = ['frequency_hz', 'ground_segments_0_conductivity_s_per_m', 'ground_segments_0_relative_permittivity'];
  const sensitivity = [
    ...saltelliRows('ez_db_uv_per_m@100000m', params, saltelliIndices(y, layout, { resamples: 100 }), 1024),
    // A second output with other indices: the same function with the roles of x1 and x2 swapped.
    ...saltelliRows('ez_phase_deg@100000m', [params[1], params[0], params[2]], saltelliIndices(y, layout, { resamples: 100 }), 1024),
  ];
  // Convergence: dB = 70 − 0.1·range_km + 30/cpw² (second order), three receivers, five levels.
  const runs: ConvergenceRun[] = [8, 11, 16, 22, 32].map((cpw) => ({
    params: { grid_cells_per_wavelength: cpw },
    resolution: cpw,
    receivers: [50e3, 100e3, 200e3].map((r) => ({
      range_m: r,
      height_m: 0,
      ez_db_uv_per_m: 70 - 0.1 * (r / 1000) + (30 * (1 + r / 200e3)) / cpw ** 2,
      ez_phase_deg: -40 - (20 * (1 + r / 100e3)) / cpw ** 2,
    })),
  }));
  const convergence = convergenceTable(runs, { axis: 'cells_per_wavelength', toleranceDb: 0.1, tolerancePhaseDeg: 0.5 });
  const field_series = [20e3, 40e3].flatMap((f, i) =>
    [1e-3, 1e-2, 4].map((s, j) => demoSeries(`job${i}${j}abcdef0123456789`, f, s)),
  );
  return ReportDataSchema.parse({
    title: 'Loamwave report: Ilvandreque VLF transmitter sweep',
    generated_by: 'loamwave 1.0.0',
    sweep: {
      name: 'ilvandreque-vlf',
      description: 'Demo sweep over the invented Ilvandreque–Tessarquin path: frequency and ground constants.',
      file_name: 'ilvandreque.yaml',
      design: 'full_factorial',
      resolution_axis: 'grid.cells_per_wavelength',
      varied: [
        { path: 'frequency_hz', column: 'frequency_hz', min: 20e3, max: 40e3, distinct: 2 },
        { path: 'ground.segments[0].conductivity_s_per_m', column: 'ground_segments_0_conductivity_s_per_m', min: 1e-3, max: 4, distinct: 3 },
      ],
      jobs: { total: 7, done: 6, failed: 1, pending: 0 },
      wall_time_s_total: 5400,
    },
    field_series,
    convergence,
    sensitivity,
    runs: {
      columns: ['job_id', 'status', 'frequency_hz', 'ground_segments_0_conductivity_s_per_m', 'cell_size_m', 'wall_time_s'],
      rows: field_series.map((s) => [s.job_id, 'done', s.frequency_hz, s.params.ground_segments_0_conductivity_s_per_m, 750, 900]),
      total: 6,
    },
    warnings: [
      { kind: 'impedance_validity', job_id: 'job00abcdef0123456789', message: 'ground segment 0: |N| = 6.1 is below 10; the impedance model is near its validity limit <check>' },
      { kind: 'failed_job', job_id: 'job99', message: 'out of memory' },
    ],
  });
}

describe('report page', () => {
  const data = buildData();
  let html = '';

  beforeAll(async () => {
    html = await buildReportHtml(data);
    mkdirSync(OUT, { recursive: true });
    writeFileSync(resolve(OUT, 'report.html'), html);
  });

  it('when the phase is pure free-space propagation then the residual phase is zero at every range', () => {
    // φ = −360°·f·r/c wrapped: adding the free-space delay back leaves 0 (derived from the e^{jωt} convention).
    const s = demoSeries('x', 30e3, 1);
    s.points = s.points.map((p) => ({ ...p, ez_phase_deg: ((((-(360 * 30e3 * p.range_m) / C0 + 180) % 360) + 360) % 360) - 180 }));
    for (const p of residualPhaseDeg(s)) expect(Math.abs(p.value)).toBeLessThan(1e-9);
  });

  it('when a sampled sweep has more runs than a plot draws then an evenly spaced subset is drawn on a log colour ramp', async () => {
    // 300 runs with conductivities spread over four decades (as a log_uniform input gives).
    const many = Array.from({ length: 300 }, (_, k) => demoSeries(`j${k}`, 20e3, 10 ** (-4 + (4 * k) / 299)));
    const input = { path: 'ground.segments[0].conductivity_s_per_m', column: 'ground_segments_0_conductivity_s_per_m', min: 1e-4, max: 1, distinct: 300 };
    const [db] = fieldPlots(many, [input]);
    expect(db.caption).toContain(`${MAX_FIELD_LINES} of 300 runs drawn`);
    const colour = (db.spec as { encoding: { color: { type: string; scale: { type?: string } } } }).encoding.color;
    expect(colour.type).toBe('quantitative');
    expect(colour.scale.type).toBe('log');
    const svg = await renderSvg(db.spec);
    // Vega draws one line-mark group per run (the detail channel): exactly the runs drawn.
    expect((svg.match(/<g class="mark-line role-mark[^"]*"/g) ?? []).length).toBe(MAX_FIELD_LINES);
  });

  it('when built then it is one self-contained page: no scripts, links, external URLs or web fonts', () => {
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).not.toMatch(/<script|<link|@import|@font-face|url\(/i);
    // Only the SVG namespace URIs (identifiers, never fetched) may look like URLs.
    const urls = [...html.matchAll(/https?:\/\/[^\s"'<>]+/g)].map((m) => m[0]);
    expect(new Set(urls)).toEqual(new Set(['http://www.w3.org/2000/svg', 'http://www.w3.org/1999/xlink']));
  });

  it('when built then every section is there with the cautions and the escaped warning text', () => {
    for (const id of ['summary', 'cautions', 'fields', 'convergence', 'sensitivity', 'runs', 'warnings']) {
      expect(html).toContain(`<section id="${id}"`);
    }
    expect(html).toMatch(/exposure limits/);
    expect(html).toMatch(/safety-of-life navigation or timing/);
    expect(html).toMatch(/licence/);
    expect(html).toContain(escapeHtml('validity limit <check>'));
    expect(html).not.toContain('<check>');
  });

  it('when the convergence series is second order then the verdict table shows order 2 for every output', () => {
    // Error ∝ 1/cpw²: p = 2 exactly (Celik et al. 2008, eq. 3 on a pure power law).
    expect(data.convergence.every((r) => Math.abs(r.apparent_order! - 2) < 1e-6)).toBe(true);
    expect((html.match(/<td class="num">2<\/td>/g) ?? []).length).toBeGreaterThanOrEqual(data.convergence.length);
  });

  describe('in headless Chromium', () => {
    let browser: Browser;
    beforeAll(async () => {
      browser = await launchChromium();
    });
    afterAll(async () => {
      await browser?.close();
    });

    it('when opened then every plot renders marks, nothing errs and nothing is fetched', async () => {
      const page = await checkReportPage(browser, resolve(OUT, 'report.html'), resolve(OUT, 'report.png'));
      const expected = [
        'field-db-frequency_hz',
        'field-phase-frequency_hz',
        'field-db-ground_segments_0_conductivity_s_per_m',
        'field-phase-ground_segments_0_conductivity_s_per_m',
        'convergence-ez_db_uv_per_m',
        'convergence-ez_phase_deg',
        'sensitivity-0',
        'sensitivity-1',
      ];
      expect([...page.plots].sort()).toEqual([...expected].sort());
      for (const id of expected) {
        expect(page.marks[id].paths, id).toBeGreaterThan(0);
        expect(page.marks[id].widthPx, id).toBeGreaterThan(200);
      }
      expect(page.errors).toEqual([]);
      expect(page.requests).toEqual([]);
      expect(page.runRows).toBe(6);
      // The verdict table, advice column included, fits the window without a horizontal scroll bar.
      expect(page.convergenceRightPx).not.toBeNull();
      expect(page.convergenceRightPx!).toBeLessThanOrEqual(WINDOW_WIDTH_PX);
      expect(page.convergenceScrolls).toBe(false);
    });
  });
});
