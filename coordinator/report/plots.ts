// The report's plots: Vega-Lite specifications built from report data, compiled with vega-lite and rendered to
// SVG strings headless with vega's View (no browser, no canvas, no network, no web fonts).
import * as vega from 'vega';
import { compile, type TopLevelSpec } from 'vega-lite';
import { C0 } from '../../solver/constants.js';
import { type ConvergenceRow } from '../../schemas/analysis-rows.js';
import { type SensitivityRow } from '../../schemas/analysis-rows.js';
import type { CurvatureRow, FieldSeries, VariedInput } from './data.js';
import { residualPhaseDeg } from '../analysis/residual-phase.js';

/** One plot as the report embeds it. */
export interface Plot {
  /** Stable id, also the figure's `data-plot` attribute (the browser test looks plots up by it). */
  id: string;
  title: string;
  /** A sentence under the plot saying how to read it. */
  caption: string;
  spec: TopLevelSpec;
}

const FONT = 'system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif';
const CONFIG = {
  font: FONT,
  view: { stroke: '#ccc' },
  axis: { labelFontSize: 11, titleFontSize: 12, gridColor: '#e6e6e6', labelLimit: 280 },
  legend: { labelFontSize: 11, titleFontSize: 11, titleLimit: 420, labelLimit: 200, orient: 'bottom' as const },
  title: { fontSize: 13, anchor: 'start' as const },
};

/** Most runs drawn as lines in one field plot; beyond it an evenly spaced subset is drawn (and said so). */
export const MAX_FIELD_LINES = 200;

function evenlySpaced<T>(items: readonly T[], max: number): T[] {
  if (items.length <= max) return [...items];
  return Array.from({ length: max }, (_, k) => items[Math.floor((k * items.length) / max)]);
}

/** Most distinct values of an input given one legend entry each; more get a continuous colour ramp. */
const MAX_LEGEND_ENTRIES = 10;

/** Colour encoding for one varied input: one entry per value for a few values, a ramp for many. */
function colourEncoding(input: VariedInput | null): Record<string, unknown> {
  if (input === null) return { field: 'colour', type: 'nominal', title: 'run' };
  if (input.min === null || input.distinct <= MAX_LEGEND_ENTRIES) {
    return { field: 'colour', type: 'ordinal', title: input.path, scale: { scheme: 'viridis' } };
  }
  // Decades (conductivity, frequency over a wide band) read better on a log colour scale.
  const log = input.max !== null && input.min > 0 && input.max / input.min >= 100;
  return {
    field: 'colour',
    type: 'quantitative',
    title: input.path,
    scale: { scheme: 'viridis', ...(log ? { type: 'log' } : {}) },
    legend: { type: 'gradient' },
  };
}

/** Field strength and phase against range, coloured by one varied input. */
export function fieldPlots(series: readonly FieldSeries[], varied: readonly VariedInput[]): Plot[] {
  const drawn = evenlySpaced(series, MAX_FIELD_LINES);
  const note = drawn.length < series.length ? ` (${drawn.length} of ${series.length} runs drawn, evenly spaced)` : '';
  const inputs: Array<VariedInput | null> = varied.length > 0 ? varied.slice(0, 6) : [null];
  const plots: Plot[] = [];
  for (const input of inputs) {
    const colourField = input?.column ?? 'run';
    const colour = colourEncoding(input);
    for (const quantity of ['db', 'phase'] as const) {
      const values = drawn.flatMap((s) => {
        const c = input ? s.params[input.column] : s.job_id.slice(0, 8);
        const pts =
          quantity === 'db'
            ? s.points.map((p) => ({ range_m: p.range_m, value: p.ez_db_uv_per_m }))
            : residualPhaseDeg(s);
        return pts.map((p) => ({ range_km: p.range_m / 1000, value: p.value, colour: c, job: s.job_id }));
      });
      const yTitle = quantity === 'db' ? 'Ez (dB µV/m)' : 'residual phase (°)';
      plots.push({
        id: `field-${quantity}-${colourField}`,
        title: `${quantity === 'db' ? 'Field strength' : 'Phase'} against range${input ? `, coloured by ${input.path}` : ''}`,
        caption:
          (quantity === 'db'
            ? 'Vertical electric field at the receivers, rms, in dB above 1 µV/m; one line per run'
            : 'Residual phase: phase of Ez plus 360°·f·r/c, i.e. what is left after the free-space delay, unwrapped along range; one line per run') +
          note +
          '.',
        spec: {
          $schema: 'https://vega.github.io/schema/vega-lite/v5.json',
          width: 440,
          height: 240,
          data: { values },
          mark: { type: 'line', point: { size: 18 }, strokeWidth: 1.2, opacity: 0.85 },
          encoding: {
            x: { field: 'range_km', type: 'quantitative', title: 'range (km)' },
            y: { field: 'value', type: 'quantitative', title: yTitle, scale: { zero: false } },
            color: colour as never,
            detail: { field: 'job', type: 'nominal' },
          },
          config: CONFIG,
        },
      });
    }
  }
  return plots;
}

/** What curvature does: sphere minus flat field strength against range, one line per earth radius and group. */
export function curvaturePlots(rows: readonly CurvatureRow[]): Plot[] {
  if (rows.length === 0) return [];
  const values = rows.map((r) => ({
    range_km: r.range_m / 1000,
    difference: r.difference_db,
    radius: `${(r.earth_radius_m / 1000).toFixed(0)} km${r.group ? `, ${r.group}` : ''}`,
  }));
  return [
    {
      id: 'curvature-db',
      title: 'What the curvature of the earth does to field strength',
      caption:
        'Field strength over the spherical earth minus that over the flat earth, for otherwise-equal runs; one line per earth radius. Below zero, the flat earth overstates the field.',
      spec: {
        $schema: 'https://vega.github.io/schema/vega-lite/v5.json',
        width: 440,
        height: 240,
        data: { values },
        layer: [
          { mark: { type: 'rule', strokeDash: [4, 3], color: '#888' }, encoding: { y: { datum: 0 } } },
          {
            mark: { type: 'line', point: { size: 24 }, strokeWidth: 1.5 },
            encoding: {
              x: { field: 'range_km', type: 'quantitative', title: 'range (km)' },
              y: { field: 'difference', type: 'quantitative', title: 'sphere − flat (dB)' },
              color: { field: 'radius', type: 'nominal', title: 'earth radius', scale: { scheme: 'viridis' } },
            },
          },
        ],
        config: CONFIG,
      } as TopLevelSpec,
    },
  ];
}

const OUTPUT_LABEL: Record<string, string> = { ez_db_uv_per_m: 'Ez (dB µV/m)', ez_phase_deg: 'phase of Ez (°)' };

/** Difference from the finest grid against resolution, one line per group and receiver, for each output. */
export function convergencePlots(rows: readonly ConvergenceRow[]): Plot[] {
  const plots: Plot[] = [];
  for (const output of ['ez_db_uv_per_m', 'ez_phase_deg'] as const) {
    const mine = rows.filter((r) => r.output === output);
    if (mine.length === 0) continue;
    const values = mine.flatMap((r) => {
      const levels = JSON.parse(r.levels_json) as Array<[number, number]>;
      const finest = levels[0][1];
      return levels.map(([resolution, value]) => ({
        resolution,
        difference: value - finest,
        receiver_km: r.range_m / 1000,
        line: `${r.group} ${r.range_m}`,
      }));
    });
    const axis = mine[0].resolution_axis;
    plots.push({
      id: `convergence-${output}`,
      title: `Convergence of ${OUTPUT_LABEL[output]}`,
      caption: `Each line is one group of otherwise-equal runs at one receiver: the output on each grid minus the output on the finest grid, against ${axis === 'cells_per_wavelength' ? 'cells per wavelength' : 'cell size (m)'}. Lines flattening towards zero mean a converging mesh.`,
      spec: {
        $schema: 'https://vega.github.io/schema/vega-lite/v5.json',
        width: 440,
        height: 220,
        data: { values },
        layer: [
          { mark: { type: 'rule', color: '#888', strokeDash: [4, 3] }, encoding: { y: { datum: 0 } } },
          {
            mark: { type: 'line', point: true, strokeWidth: 1.4 },
            encoding: {
              x: {
                field: 'resolution',
                type: 'quantitative',
                title: axis === 'cells_per_wavelength' ? 'cells per wavelength' : 'cell size (m)',
                scale: { zero: false },
              },
              y: { field: 'difference', type: 'quantitative', title: `difference from finest (${output === 'ez_db_uv_per_m' ? 'dB' : '°'})` },
              color: { field: 'receiver_km', type: 'ordinal', title: 'receiver (km)' },
              detail: { field: 'line', type: 'nominal' },
            },
          },
        ],
        config: CONFIG,
      } as TopLevelSpec,
    });
  }
  return plots;
}

/** Most outputs given a sensitivity chart of their own; the rest are in the table. */
export const MAX_SENSITIVITY_CHARTS = 12;

const MEASURE_LABEL: Record<string, string> = {
  first_order: 'first order S',
  total_order: 'total order ST',
  src: 'SRC',
  mu_star: 'μ*',
};

/** One colour per measure across every chart (Vega's default category colours). */
const MEASURE_COLOUR: Record<string, string> = {
  'first order S': '#4c78a8',
  'total order ST': '#f58518',
  SRC: '#54a24b',
  'μ*': '#b279a2',
};

/** Measures that share an axis: Sobol' indices (fractions of variance), SRCs (−1…1), μ* (the output's unit). */
const FAMILIES: ReadonlyArray<{ measures: readonly string[]; axis: string; reading: string }> = [
  { measures: ['first_order', 'total_order'], axis: "Sobol' index", reading: 'share of the output variance due to the input alone (S) and with its interactions (ST)' },
  { measures: ['src'], axis: 'standardised regression coefficient', reading: 'change of the output, in standard deviations, per standard deviation of the input (linear fit; see R² in the table)' },
  { measures: ['mu_star'], axis: "μ* (output's unit)", reading: "mean absolute change of the output, in its own unit, as the input steps across its whole range (in decades for inputs listed or sampled in log)" },
];

/** One bar chart per output and family of measures, with the bootstrap interval as a rule where there is one. */
export function sensitivityPlots(rows: readonly SensitivityRow[]): Plot[] {
  const outputs = [...new Set(rows.map((r) => r.output))];
  const plots: Plot[] = [];
  for (const output of outputs) {
    for (const family of FAMILIES) {
      if (plots.length >= MAX_SENSITIVITY_CHARTS) return plots;
      const mine = rows.filter((r) => r.output === output && family.measures.includes(r.measure));
      if (mine.length === 0) continue;
      const values = mine.map((r) => ({
        parameter: r.parameter,
        measure: MEASURE_LABEL[r.measure],
        value: r.value,
        low: r.ci_low ?? r.value,
        high: r.ci_high ?? r.value,
      }));
      const parameters = [...new Set(values.map((v) => v.parameter))];
      const measures = [...new Set(values.map((v) => v.measure))];
      const hasInterval = mine.some((r) => r.ci_low !== null);
      plots.push({
        id: `sensitivity-${plots.length}`,
        title: `Sensitivity of ${output}: ${measures.join(', ')}`,
        caption:
          `Bars: ${family.reading}` +
          (hasInterval ? `; black lines: ${Math.round(100 * (mine[0].confidence ?? 0.95))} % bootstrap intervals` : '') +
          '.',
        spec: {
          $schema: 'https://vega.github.io/schema/vega-lite/v5.json',
          width: 300,
          height: Math.max(40, parameters.length * measures.length * 16),
          data: { values },
          encoding: {
            y: { field: 'parameter', type: 'nominal', title: null, sort: parameters, axis: { labelLimit: 0 } },
            yOffset: { field: 'measure', type: 'nominal', sort: measures },
          },
          layer: [
            {
              mark: { type: 'bar', height: { band: 1 } },
              encoding: {
                x: { field: 'value', type: 'quantitative', title: family.axis },
                color: {
                  field: 'measure',
                  type: 'nominal',
                  title: 'measure',
                  scale: { domain: measures, range: measures.map((m) => MEASURE_COLOUR[m]) },
                },
              },
            },
            {
              mark: { type: 'rule', color: '#222', strokeWidth: 1.5 },
              encoding: { x: { field: 'low', type: 'quantitative' }, x2: { field: 'high' } },
            },
          ],
          config: CONFIG,
        } as TopLevelSpec,
      });
    }
  }
  return plots;
}

/** Compile a Vega-Lite spec and render it to an SVG string with vega's headless View. */
export async function renderSvg(spec: TopLevelSpec): Promise<string> {
  const compiled = compile(spec).spec;
  // A loader that refuses every fetch: all data is inline, and the report must never reach the network.
  const loader = vega.loader();
  loader.load = () => Promise.reject(new Error('the report renders inline data only'));
  const view = new vega.View(vega.parse(compiled), { renderer: 'none', loader });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}
