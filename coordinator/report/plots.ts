// The report's plots: Vega-Lite specifications built from report data, compiled with vega-lite and rendered to
// SVG strings headless with vega's View (no browser, no canvas, no network, no web fonts).
import * as vega from 'vega';
import { compile, type TopLevelSpec } from 'vega-lite';
import { type ConvergenceRow } from '../../schemas/analysis-rows.js';
import { type SensitivityRow } from '../../schemas/analysis-rows.js';
import { MAX_CONVERGENCE_LINES, MAX_SENSITIVITY_CHARTS, type CurvatureRow, type FieldSummary } from './data.js';
import { evenIndices, MAX_RANGES_PER_LINE as MAX_PLOTTED_RANGES } from '../analysis/field-spread.js';

export { MAX_CONVERGENCE_LINES, MAX_SENSITIVITY_CHARTS };

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

/** Colours along viridis, stopping short of its palest yellow (thin lines on white stay visible). */
const GROUP_SCHEME = { name: 'viridis', extent: [0, 0.88] };

/** Most ranges for which a line gets a point marker as well (beyond it the markers would merge into the line). */
const MAX_MARKED_RANGES = 30;

function percent(p: number): number {
  return Math.round(100 * p);
}

/**
 * Field strength and residual phase against range, two plots per input the summary groups by: for each group of
 * runs (one per value of the input, or bins of it) the median as a line and the band between the summary's quantiles
 * shaded, with the few runs drawn whole as thin lines in their group's colour. Sizes are bounded by the summary.
 */
export function fieldPlots(summary: FieldSummary): Plot[] {
  if (summary.runs === 0) return [];
  const [lowP, highP] = summary.band;
  const drawnNote =
    summary.drawn.length === summary.runs
      ? `thin lines: every run (${summary.runs})`
      : `thin lines: ${summary.drawn.length} of the ${summary.runs} runs, evenly chosen`;
  const rangeNote =
    summary.ranges_plotted < summary.ranges ? `; ${summary.ranges_plotted} of the ${summary.ranges} receiver ranges shown, evenly chosen` : '';
  const plots: Plot[] = [];
  for (const spread of summary.spreads) {
    const labels = spread.groups.map((g) => g.label);
    // The legend shows each group's line (not the pale band), in rows of three (two for long bin labels)
    // so the legend is no wider than the plot.
    const colour = {
      field: 'group',
      type: 'ordinal',
      title: spread.path ?? 'runs',
      scale: { domain: labels, scheme: GROUP_SCHEME },
      sort: labels,
      legend: { columns: labels.some((l) => l.length > 12) ? 2 : 3, symbolType: 'stroke', symbolStrokeWidth: 3, symbolOpacity: 1 },
    };
    for (const quantity of ['db', 'phase'] as const) {
      const band = spread.points.map((p) => ({
        range_km: p.range_m / 1000,
        group: labels[p.group],
        low: quantity === 'db' ? p.db_low : p.phase_low_deg,
        median: quantity === 'db' ? p.db_median : p.phase_median_deg,
        high: quantity === 'db' ? p.db_high : p.phase_high_deg,
      }));
      const lines = summary.drawn.flatMap((run, k) =>
        run.points.map((p) => ({
          range_km: p.range_m / 1000,
          value: quantity === 'db' ? p.ez_db_uv_per_m : p.residual_phase_deg,
          group: labels[spread.drawn_groups[k]],
          job: run.job_id,
        })),
      );
      const yTitle = quantity === 'db' ? 'Ez (dB µV/m)' : 'residual phase (°)';
      const x = { field: 'range_km', type: 'quantitative', title: 'range (km)' };
      const what =
        quantity === 'db'
          ? 'Vertical electric field at the receivers, rms, in dB above 1 µV/m'
          : 'Residual phase: phase of Ez plus 360°·f·r/c, i.e. what is left after the free-space delay, unwrapped along range and aligned between runs by whole turns';
      const groupsText = spread.path === null ? 'over all runs' : spread.grouping === 'bins'
            ? `over the runs of each bin of ${spread.path} (${spread.groups.length} bins of about equal run count)`
            : `over the runs of each value of ${spread.path}`;
      plots.push({
        id: `field-${quantity}-${spread.column ?? 'run'}`,
        title: `${quantity === 'db' ? 'Field strength' : 'Phase'} against range${spread.path ? `, by ${spread.path}` : ''}`,
        caption:
          `${what}. Thick line: median, shaded: ${percent(lowP)}–${percent(highP)} % band ${groupsText}; ${drawnNote}${rangeNote}. ` +
          `Quantiles by ${summary.quantile_method}; the full fields are in fields/.`,
        spec: {
          $schema: 'https://vega.github.io/schema/vega-lite/v5.json',
          width: 440,
          height: 240,
          layer: [
            {
              data: { values: band },
              mark: { type: 'area', opacity: 0.2, interpolate: 'linear' },
              encoding: {
                x,
                y: { field: 'low', type: 'quantitative', title: yTitle, scale: { zero: false } },
                y2: { field: 'high' },
                color: colour,
              },
            },
            {
              data: { values: lines },
              mark: { type: 'line', strokeWidth: 0.6, opacity: 0.45 },
              encoding: { x, y: { field: 'value', type: 'quantitative' }, color: colour, detail: { field: 'job', type: 'nominal' } },
            },
            {
              data: { values: band },
              mark: { type: 'line', strokeWidth: 2, ...(summary.ranges_plotted <= MAX_MARKED_RANGES ? { point: { size: 20 } } : {}) },
              encoding: { x, y: { field: 'median', type: 'quantitative' }, color: colour },
            },
          ],
          config: CONFIG,
        } as TopLevelSpec,
      });
    }
  }
  return plots;
}

/** What curvature does: sphere minus flat field strength against range, one line per earth radius and group. */
export function curvaturePlots(rows: readonly CurvatureRow[], total: { rows: number; lines: number } | null = null): Plot[] {
  if (rows.length === 0) return [];
  const drawnLines = new Set(rows.map((r) => `${r.group}\u0000${r.earth_radius_m}`)).size;
  const note = total === null ? '' : ` ${drawnLines} of the ${total.lines} pairs drawn, evenly chosen, at up to ${MAX_PLOTTED_RANGES} ranges each; every receiver of every run is in fields/.`;
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
        'Field strength over the spherical earth minus that over the flat earth, for otherwise-equal runs; one line per earth radius. Below zero, the flat earth overstates the field.' + note,
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


/**
 * Difference from the finest grid against resolution, one line per group and receiver (at most
 * MAX_CONVERGENCE_LINES, evenly chosen), for each output. `rowsPerOutput`: how many rows each output has in all, when
 * `rows` is a choice out of more.
 */
export function convergencePlots(rows: readonly ConvergenceRow[], rowsPerOutput: Readonly<Record<string, number>> | null = null): Plot[] {
  const plots: Plot[] = [];
  for (const output of ['ez_db_uv_per_m', 'ez_phase_deg'] as const) {
    const all = rows.filter((r) => r.output === output);
    if (all.length === 0) continue;
    const mine = evenIndices(all.length, MAX_CONVERGENCE_LINES).map((i) => all[i]);
    // `rows` may already be a choice made by the assembly out of more (rowsPerOutput says how many).
    const total = Math.max(all.length, rowsPerOutput?.[output] ?? 0);
    const note = mine.length < total ? ` ${mine.length} of the ${total} lines drawn, evenly chosen; convergence.parquet has them all.` : '';
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
      caption: `Each line is one group of otherwise-equal runs at one receiver: the output on each grid minus the output on the finest grid, against ${axis === 'cells_per_wavelength' ? 'cells per wavelength' : 'cell size (m)'}. Lines flattening towards zero mean a converging mesh.${note}`,
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
