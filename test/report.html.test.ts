// The HTML report built from numbers computed here (Ishigami indices, a convergence series from a known error
// law, fields from the perfect-ground reference), checked as text and in headless Chromium.
import { mkdirSync, writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { convergenceTable, type ConvergenceRun } from '../coordinator/analysis/grid-convergence.js';
import { saltelliIndices, saltelliRows } from '../coordinator/analysis/saltelli.js';
import { saltelliDesign } from '../coordinator/sampling/saltelli-layout.js';
import { MAX_CONVERGENCE_LINES, MAX_SENSITIVITY_CHARTS, MAX_TABLE_ROWS, ReportDataSchema, type ReportData } from '../coordinator/report/data.js';
import { buildReportHtml, escapeHtml } from '../coordinator/report/html.js';
import { fieldPlots, renderSvg } from '../coordinator/report/plots.js';
import { residualPhaseDeg } from '../coordinator/analysis/residual-phase.js';
import { fieldSpread, MAX_DRAWN_RUNS, MAX_RANGES_PER_LINE, MAX_SPREAD_GROUPS, SPREAD_BINS, type SpreadRun } from '../coordinator/analysis/field-spread.js';
import { C0 } from '../solver/constants.js';
import { checkReportPage, launchChromium, WINDOW_WIDTH_PX, type Browser } from './report.page-check.js';
import { assembleReportData, MAX_CURVATURE_LINES } from '../coordinator/report/assembly.js';
import { parseSweep } from '../coordinator/sweep/file.js';
import type { FolderTables } from '../coordinator/analysis/read-tables.js';
import { largeSweepTables } from '../bench/large-sweep-tables.js';

const OUT = resolve('test-output');

/**
 * Ez over a perfect ground for a 1 kW short monopole: 300 mV/m at 1 km, falling as 1/d (the reference of the
 * ITU-R P.368 ground-wave curves; docs/references.md, derived), here scaled by an invented loss factor per conductivity
 * for the demo, with the free-space phase −360°·f·r/c plus a small invented lag.
 */
function demoSeries(jobId: string, frequencyHz: number, conductivity: number): SpreadRun & { points: SpreadRun['points'][number][] } {
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
  const varied = [
    { path: 'frequency_hz', column: 'frequency_hz', min: 20e3, max: 40e3, distinct: 2 },
    { path: 'ground.segments[0].conductivity_s_per_m', column: 'ground_segments_0_conductivity_s_per_m', min: 1e-3, max: 4, distinct: 3 },
  ];
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
      varied,
      jobs: { total: 7, done: 6, failed: 1, pending: 0 },
      wall_time_s_total: 5400,
    },
    fields: fieldSpread(field_series, varied),
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

  it('when a sampled sweep has many runs then each plot draws one band per bin and at most MAX_DRAWN_RUNS runs', async () => {
    // 300 runs with conductivities spread over four decades (as a log_uniform input gives): more values than get a
    // group each, so SPREAD_BINS bins of 60 runs.
    const many = Array.from({ length: 300 }, (_, k) => demoSeries(`j${k}`, 20e3, 10 ** (-4 + (4 * k) / 299)));
    const input = { path: 'ground.segments[0].conductivity_s_per_m', column: 'ground_segments_0_conductivity_s_per_m' };
    const summary = fieldSpread(many, [input]);
    expect(summary.spreads[0].grouping).toBe('bins');
    expect(summary.spreads[0].groups.map((g) => g.runs)).toEqual(Array(SPREAD_BINS).fill(300 / SPREAD_BINS));
    expect(summary.drawn).toHaveLength(MAX_DRAWN_RUNS);
    const [db] = fieldPlots(summary);
    expect(db.caption).toContain(`${MAX_DRAWN_RUNS} of the 300 runs, evenly chosen`);
    expect(db.caption).toContain('Hyndman & Fan 1996, type 7');
    const svg = await renderSvg(db.spec);
    // Vega draws one line-mark group per line (the detail and colour channels): the drawn runs and one median per
    // bin; and one area per bin.
    expect((svg.match(/<g class="mark-line role-mark[^"]*"/g) ?? []).length).toBe(MAX_DRAWN_RUNS + SPREAD_BINS);
    expect((svg.match(/<g class="mark-area role-mark[^"]*"/g) ?? []).length).toBe(SPREAD_BINS);
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

describe('report page of a large sweep', () => {
  // 2,000 runs × 500 receivers of made-up numbers (bench/large-sweep-tables.ts, deterministic through the project's
  // PRNG): a test of the page's size and that it renders, not of the physics. How fast it opens is measured by
  // `npm run bench:report` (bench/report-size.ts), not here: a timed test would flake on a shared machine.
  const MAX_PAGE_BYTES = 5 * 1024 * 1024; // the target: a page a browser opens without trouble
  let data: ReportData;
  let html = '';
  let browser: Browser;

  // A made-up resolution study beside it: the second-order series of buildData's convergence, at tolerances it
  // fails, copied to 40 groups × 500 receivers × 2 outputs (40,000 rows, every one a warning).
  const CONVERGENCE_GROUPS = 40;
  const CONVERGENCE_ROWS = CONVERGENCE_GROUPS * 500 * 2;

  beforeAll(async () => {
    const tables = largeSweepTables();
    expect(tables.runs).toHaveLength(2000);
    expect(tables.fields).toHaveLength(2000 * 500);
    const levels: ConvergenceRun[] = [8, 11, 16].map((cpw) => ({
      params: { grid_cells_per_wavelength: cpw },
      resolution: cpw,
      receivers: [{ range_m: 50e3, height_m: 0, ez_db_uv_per_m: 70 + 30 / cpw ** 2, ez_phase_deg: -40 - 20 / cpw ** 2 }],
    }));
    const pair = convergenceTable(levels, { axis: 'cells_per_wavelength', toleranceDb: 1e-3, tolerancePhaseDeg: 1e-3 });
    expect(pair.map((r) => r.verdict)).toEqual(['refine', 'refine']);
    const convergence = Array.from({ length: CONVERGENCE_GROUPS }, (_, g) =>
      [...new Set(tables.fields.slice(0, 500).map((f) => f.range_m))].flatMap((range_m) =>
        pair.map((r) => ({ ...r, group: JSON.stringify({ frequency_hz: 1000 * g }), range_m })),
      ),
    ).flat();
    expect(convergence).toHaveLength(CONVERGENCE_ROWS);
    data = assembleReportData({ ...tables, convergence }, { generatedBy: 'loamwave test' });
    html = await buildReportHtml(data);
    mkdirSync(OUT, { recursive: true });
    writeFileSync(resolve(OUT, 'report-large.html'), html);
    browser = await launchChromium();
  }, 180_000);
  afterAll(async () => {
    await browser?.close();
  });

  it('when assembled then the report data holds quantiles and a few runs, not every field row', () => {
    const f = data.fields;
    expect(f.runs).toBe(2000);
    expect(f.ranges).toBe(500);
    expect(f.ranges_plotted).toBe(MAX_RANGES_PER_LINE);
    expect(f.drawn).toHaveLength(MAX_DRAWN_RUNS);
    for (const run of f.drawn) expect(run.points.length).toBeLessThanOrEqual(MAX_RANGES_PER_LINE);
    // One spread per varied input (3); groups: 5 frequencies by value, the two 20-valued inputs in bins.
    expect(f.spreads.map((s) => [s.grouping, s.groups.length])).toEqual([['values', 5], ['bins', SPREAD_BINS], ['bins', SPREAD_BINS]]);
    for (const s of f.spreads) {
      expect(s.groups.length).toBeLessThanOrEqual(MAX_SPREAD_GROUPS + 1);
      expect(s.points.length).toBeLessThanOrEqual(s.groups.length * MAX_RANGES_PER_LINE);
      expect(s.groups.reduce((n, g) => n + g.runs, 0)).toBe(2000);
    }
    expect(data.runs.rows).toHaveLength(MAX_TABLE_ROWS);
    expect(data.runs.total).toBe(2000);
    // The other tables: the table's first rows and what the plots draw, with the totals the page states.
    expect(data.convergence).toHaveLength(MAX_TABLE_ROWS);
    expect(data.convergence_summary).toEqual({
      rows: CONVERGENCE_ROWS,
      verdicts: { refine: CONVERGENCE_ROWS },
      rows_per_output: { ez_db_uv_per_m: CONVERGENCE_ROWS / 2, ez_phase_deg: CONVERGENCE_ROWS / 2 },
    });
    expect(data.convergence_plotted).toHaveLength(2 * MAX_CONVERGENCE_LINES);
    expect(data.sensitivity_total).toBe(6000);
    expect(data.sensitivity.length).toBeLessThan(6000);
    expect(data.warnings).toHaveLength(MAX_TABLE_ROWS);
    expect(data.warning_counts).toEqual({ unconverged_mesh: CONVERGENCE_ROWS });
    // The whole structure, as JSON: a few MB at most whatever the sweep (1.3 MB measured with the convergence
    // rows, 1.2 MB of it the spreads).
    expect(JSON.stringify(data).length).toBeLessThan(MAX_PAGE_BYTES);
  });

  it('when built then the page is at most 5 MB and the capped tables point to their Parquet files', () => {
    expect(Buffer.byteLength(html)).toBeLessThanOrEqual(MAX_PAGE_BYTES);
    expect(html).toContain(`Showing ${MAX_TABLE_ROWS} of 2000 rows; every row is in runs.parquet`);
    expect(html).toContain(`Showing ${MAX_TABLE_ROWS} of ${data.sensitivity_total} rows; every row is in sensitivity.parquet`);
    expect(html).toContain(`${MAX_DRAWN_RUNS} of the 2000 runs, evenly chosen`);
    expect(html).toContain(`${MAX_RANGES_PER_LINE} of the 500 receiver ranges shown`);
    expect(html).toContain(`Showing ${MAX_TABLE_ROWS} of ${CONVERGENCE_ROWS} rows; every row is in convergence.parquet`);
    expect(html).toContain(`0 converged, ${CONVERGENCE_ROWS} need a finer grid, 0 unreliable (of ${CONVERGENCE_ROWS} outputs)`);
    expect(html).toContain(`${MAX_CONVERGENCE_LINES} of the ${CONVERGENCE_ROWS / 2} lines drawn`);
    expect(html).toContain(`Unconverged meshes (${CONVERGENCE_ROWS})`);
    expect(html).toContain(`and ${CONVERGENCE_ROWS - MAX_TABLE_ROWS} more, in convergence.parquet`);
  });

  it('when opened in Chromium then every plot renders marks, nothing errs and nothing is fetched', async () => {
    const page = await checkReportPage(browser, resolve(OUT, 'report-large.html'));
    const fieldIds = ['frequency_hz', 'ground_segments_0_conductivity_s_per_m', 'ground_segments_0_relative_permittivity'].flatMap((c) => [
      `field-db-${c}`,
      `field-phase-${c}`,
    ]);
    expect(page.plots.filter((p) => p.startsWith('field-'))).toEqual(fieldIds);
    expect(page.plots.filter((p) => p.startsWith('sensitivity-'))).toHaveLength(MAX_SENSITIVITY_CHARTS);
    expect(page.plots.filter((p) => p.startsWith('convergence-'))).toEqual(['convergence-ez_db_uv_per_m', 'convergence-ez_phase_deg']);
    for (const id of page.plots) {
      expect(page.marks[id].paths, id).toBeGreaterThan(0);
      expect(page.marks[id].widthPx, id).toBeGreaterThan(200);
    }
    expect(page.errors).toEqual([]);
    expect(page.requests).toEqual([]);
    expect(page.runRows).toBe(MAX_TABLE_ROWS);
  }, 60_000);
});

describe('earth curvature of a large sweep', () => {
  it('when 60 flat-against-sphere pairs have 300 receivers each then the report holds 24 pairs of 200 ranges and says so', async () => {
    // Made-up numbers (a test of the bounds, not of the physics): 60 frequencies × flat and spherical, the sphere
    // 0.01 dB/km below the flat earth.
    const frequencies = Array.from({ length: 60 }, (_, k) => 10e3 + 1e3 * k);
    const ranges = Array.from({ length: 300 }, (_, k) => (k + 1) * 1000);
    const sweep = parseSweep(
      {
        name: 'curvature-large-demo',
        base: {
          frequency_hz: 20000,
          ground: { segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
          domain: { range_m: 320000, height_m: 60000 },
          receivers: { ranges_m: ranges },
        },
        vary: { frequency_hz: { values: frequencies }, geometry: { values: ['axisymmetric', 'spherical'] } },
      },
      'sweep.yaml',
    );
    const runs = frequencies.flatMap((f) => ['axisymmetric', 'spherical'].map((geometry) => ({ job_id: `${geometry}${f}`, status: 'done', frequency_hz: f, geometry })));
    const tables: FolderTables = {
      sweep,
      sweepFileName: 'sweep.yaml',
      runColumns: ['job_id', 'status', 'frequency_hz', 'geometry'],
      runs,
      fields: runs.flatMap((r) =>
        ranges.map((range_m) => ({
          job_id: r.job_id,
          range_m,
          height_m: 0,
          ez_db_uv_per_m: 80 - range_m / 1e4 - (r.geometry === 'spherical' ? range_m / 1e5 : 0),
          ez_phase_deg: 0,
        })),
      ),
      convergence: [],
      sensitivity: [],
    };
    const data = assembleReportData(tables, { generatedBy: 'loamwave test' });
    expect(data.curvature_total).toEqual({ rows: 60 * 300, lines: 60 });
    expect(new Set(data.curvature.map((r) => r.group)).size).toBe(MAX_CURVATURE_LINES);
    expect(data.curvature).toHaveLength(MAX_CURVATURE_LINES * MAX_RANGES_PER_LINE);
    // −0.01 dB/km at every receiver kept; tolerance 1e-9 dB, far above the rounding of values near 80 dB (~1e-14).
    for (const r of data.curvature) expect(Math.abs(r.difference_db + r.range_m / 1e5)).toBeLessThan(1e-9);
    const html = await buildReportHtml(data);
    expect(html).toContain(`${MAX_CURVATURE_LINES} of the 60 pairs drawn, evenly chosen`);
    expect(html).toContain(`Showing ${MAX_TABLE_ROWS} of ${60 * 300} rows; every row is in fields/`);
  });
});
