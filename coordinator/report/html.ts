// The sweep report: one self-contained HTML page (inline styles, inline SVG plots, no scripts, no fonts or anything
// else fetched) built from a ReportData structure. Pure apart from rendering the plots: data in, a string out.
import { describeGroup } from '../analysis/grid-convergence.js';
import { type ConvergenceRow } from '../../schemas/analysis-rows.js';
import { type SensitivityRow } from '../../schemas/analysis-rows.js';
import { MAX_TABLE_ROWS, ReportDataSchema, type Cell, type CurvatureRow, type ReportData, type ReportDataInput, type ReportWarning } from './data.js';
import { convergencePlots, curvaturePlots, fieldPlots, renderSvg, sensitivityPlots, type Plot } from './plots.js';

/** Most rows shown in the runs, convergence, sensitivity and curvature tables and in each list of warnings. */
export { MAX_TABLE_ROWS };

const ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ESCAPES[c]);
}

function formatCell(v: Cell | undefined): string {
  if (v === null || v === undefined) return '—';
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) return String(v);
    if (Number.isInteger(v) && Math.abs(v) < 1e15) return String(v);
    const a = Math.abs(v);
    if (a !== 0 && (a < 1e-3 || a >= 1e6)) return v.toExponential(3);
    const fixed = v.toPrecision(4);
    // Trailing zeros after a decimal point say nothing; zeros before it are the number.
    return fixed.includes('.') ? fixed.replace(/\.?0+$/, '') : fixed;
  }
  return String(v);
}

/**
 * A table of at most MAX_TABLE_ROWS rows; when `total` says there are more, a note names `file`, the Parquet file (or
 * folder) in the output folder that holds them all.
 */
function table(
  columns: readonly string[],
  rows: ReadonlyArray<ReadonlyArray<Cell | undefined>>,
  options: { total?: number; className?: string; file?: string } = {},
): string {
  const { total, className = '', file = 'the Parquet files' } = options;
  const shown = rows.slice(0, MAX_TABLE_ROWS);
  const head = columns.map((c) => `<th scope="col">${escapeHtml(c)}</th>`).join('');
  const body = shown
    .map((r) => `<tr>${r.map((v) => `<td${typeof v === 'number' ? ' class="num"' : ''}>${escapeHtml(formatCell(v))}</td>`).join('')}</tr>`)
    .join('\n');
  const all = total ?? rows.length;
  const more = all > shown.length ? `<p class="note">Showing ${shown.length} of ${all} rows; every row is in ${escapeHtml(file)} in the output folder.</p>` : '';
  return `<div class="scroll"><table${className ? ` class="${className}"` : ''}><thead><tr>${head}</tr></thead><tbody>\n${body}\n</tbody></table></div>${more}`;
}

async function figure(plot: Plot): Promise<string> {
  const svg = await renderSvg(plot.spec);
  return `<figure class="plot" data-plot="${escapeHtml(plot.id)}"><h3>${escapeHtml(plot.title)}</h3>${svg}<figcaption>${escapeHtml(plot.caption)}</figcaption></figure>`;
}

const CAUTIONS = [
  'VLF and LF transmitting antennas carry very high voltages and produce strong RF fields near them. These results say nothing about exposure limits or safe distances: follow local regulations and the advice of licensed engineers.',
  'The results are model estimates from a 2-D finite-difference model of a simplified path. Do not use them for safety-of-life navigation or timing.',
  'Operating a transmitter needs a licence from the radio regulator where it stands.',
];

function summarySection(d: ReportData): string {
  const s = d.sweep;
  const conv = d.convergence_summary?.verdicts ?? countBy(d.convergence.map((r) => r.verdict));
  const convTotal = d.convergence_summary?.rows ?? d.convergence.length;
  const facts: Array<[string, string]> = [
    ['Sweep', s.name],
    ['Design', s.design],
    ['Jobs', `${s.jobs.total} (${s.jobs.done} done, ${s.jobs.failed} failed, ${s.jobs.pending} pending)`],
    ['Total solver time', `${(s.wall_time_s_total / 3600).toFixed(2)} core-hours`],
    ['Resolution axis', s.resolution_axis ?? 'none (no grid convergence study)'],
    [
      'Grid convergence',
      d.convergence.length === 0
        ? 'not assessed (needs three or more resolution levels)'
        : `${conv.converged ?? 0} converged, ${conv.refine ?? 0} need a finer grid, ${conv.unreliable ?? 0} unreliable (of ${convTotal} outputs)`,
    ],
    ['Sweep file', s.file_name ?? '—'],
  ];
  const dl = facts.map(([k, v]) => `<dt>${escapeHtml(k)}</dt><dd>${escapeHtml(v)}</dd>`).join('');
  const varied = table(
    ['varied input', 'column', 'min', 'max', 'distinct values'],
    s.varied.map((v) => [v.path, v.column, v.min, v.max, v.distinct]),
  );
  return `<section id="summary"><h2>Sweep summary</h2>${s.description ? `<p>${escapeHtml(s.description)}</p>` : ''}<dl class="facts">${dl}</dl><h3>Varied inputs</h3>${s.varied.length > 0 ? varied : '<p>None: a single case.</p>'}</section>
<section id="cautions" class="cautions"><h2>Cautions</h2><ul>${CAUTIONS.map((c) => `<li>${escapeHtml(c)}</li>`).join('')}</ul></section>`;
}

function countBy(items: readonly string[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const i of items) out[i] = (out[i] ?? 0) + 1;
  return out;
}

function convergenceTableHtml(rows: readonly ConvergenceRow[], total: number): string {
  // No relative GCI column: for outputs in dB and degrees it has no meaning (convergence.parquet leaves it null);
  // the uncertainty band in the output's own unit carries the verdict.
  const columns = ['group', 'output', 'range (km)', 'levels', 'finest', 'order p', 'extrapolated', 'uncertainty', 'behaviour', 'verdict', 'what to do'];
  const body = rows.map((r) => [
    describeGroup(r.group),
    r.output,
    r.range_m / 1000,
    r.levels,
    r.resolution1,
    r.apparent_order,
    r.phi_extrapolated,
    r.uncertainty === null ? null : `±${formatCell(r.uncertainty)} ${r.output === 'ez_phase_deg' ? '°' : 'dB'}`,
    r.behaviour,
    r.verdict,
    r.advice,
  ]);
  return table(columns, body, { total, className: 'convergence', file: 'convergence.parquet' });
}

/** Where each earth model stands; the report says it beside the comparison (see README "Earth models"). */
const CURVATURE_NOTE =
  'A flat earth overstates the ground wave beyond about a hundred kilometres at LF (a few hundred at VLF), where the ' +
  'field diffracts round the curve; the spherical model follows it. An effective radius of 4/3 of the real one is the ' +
  'usual stand-in for the bending of the wave by a standard atmosphere (common practice). Neither model includes ' +
  'terrain, the geomagnetic field or the day/night changes of the ionosphere; where the sky wave dominates (VLF/LF ' +
  'beyond a few hundred kilometres at night) a receiver will not measure these numbers.';

function curvatureTableHtml(rows: readonly CurvatureRow[], total: number): string {
  return table(
    ['group', 'earth radius (km)', 'range (km)', 'flat (dB µV/m)', 'sphere (dB µV/m)', 'sphere − flat (dB)', 'phase difference (°)'],
    rows.map((r) => [r.group || 'all runs', r.earth_radius_m / 1000, r.range_m / 1000, r.flat_db, r.sphere_db, r.difference_db, r.phase_difference_deg]),
    { total, className: 'curvature', file: 'fields/ (the flat and spherical runs\u2019 fields at every receiver)' },
  );
}

function sensitivityTableHtml(rows: readonly SensitivityRow[], total: number): string {
  return table(
    ['output', 'parameter', 'measure', 'value', 'interval', 'samples', 'R²'],
    rows.map((r) => [
      r.output,
      r.parameter,
      r.measure,
      r.value,
      r.ci_low === null || r.ci_high === null ? null : `${formatCell(r.ci_low)} … ${formatCell(r.ci_high)} (${Math.round(100 * (r.confidence ?? 0))} %)`,
      r.samples,
      r.r_squared,
    ]),
    { total, file: 'sensitivity.parquet' },
  );
}

const WARNING_TITLE: Record<ReportWarning['kind'], string> = {
  impedance_validity: 'Impedance model near its validity limit',
  unconverged_mesh: 'Unconverged meshes',
  failed_job: 'Failed jobs',
  solver: 'Other solver warnings',
};

/** `counts`: warnings of each kind in all, when `warnings` holds only the first of some kind. */
function warningsSection(warnings: readonly ReportWarning[], counts: Readonly<Record<string, number>> | null): string {
  if (warnings.length === 0) return '<section id="warnings"><h2>Warnings</h2><p>No warnings.</p></section>';
  const parts = (Object.keys(WARNING_TITLE) as Array<ReportWarning['kind']>).flatMap((kind) => {
    const mine = warnings.filter((w) => w.kind === kind);
    if (mine.length === 0) return [];
    const all = Math.max(mine.length, counts?.[kind] ?? 0);
    const items = mine
      .slice(0, MAX_TABLE_ROWS)
      .map((w) => `<li>${w.job_id ? `<code>${escapeHtml(w.job_id.slice(0, 12))}</code> ` : ''}${escapeHtml(w.message)}</li>`)
      .join('');
    const where = kind === 'unconverged_mesh' ? 'convergence.parquet' : 'runs.parquet (columns warnings and error)';
    const shown = Math.min(mine.length, MAX_TABLE_ROWS);
    const more = all > shown ? `<p class="note">and ${all - shown} more, in ${where}.</p>` : '';
    return [`<div class="warning-group" data-kind="${kind}"><h3>${escapeHtml(WARNING_TITLE[kind])} (${all})</h3><ul>${items}</ul>${more}</div>`];
  });
  return `<section id="warnings"><h2>Warnings</h2>${parts.join('')}</section>`;
}

const STYLE = `
:root { color-scheme: light; }
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif; margin: 0; color: #1d1d1f; background: #fafafa; line-height: 1.45; }
header { background: #233a4a; color: #fff; padding: 18px 32px; }
header h1 { margin: 0; font-size: 22px; }
header p { margin: 4px 0 0; opacity: .85; font-size: 13px; }
nav { padding: 8px 32px; background: #e9eef2; font-size: 13px; }
nav a { margin-right: 14px; color: #233a4a; }
main { padding: 8px 32px 40px; max-width: 1200px; }
section { margin: 22px 0; }
h2 { font-size: 18px; border-bottom: 1px solid #ccd; padding-bottom: 4px; }
h3 { font-size: 14px; margin: 14px 0 6px; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 2px 16px; font-size: 14px; }
dl.facts dt { font-weight: 600; }
dl.facts dd { margin: 0; }
.cautions { background: #fff6e0; border-left: 4px solid #d99a00; padding: 4px 16px; }
.cautions li { margin: 4px 0; }
.plots { display: flex; flex-wrap: wrap; gap: 18px; }
figure.plot { margin: 0; background: #fff; border: 1px solid #dde; padding: 8px 10px; flex: 0 1 540px; min-width: 0; }
figure.plot svg { width: 100%; height: auto; display: block; }
figure.plot h3 { margin: 0 0 4px; }
figcaption { font-size: 12px; color: #555; max-width: 620px; }
.scroll { display: inline-block; max-width: 100%; overflow-x: auto; max-height: 520px; overflow-y: auto; border: 1px solid #dde; background: #fff; }
table { border-collapse: collapse; font-size: 12px; }
th, td { padding: 3px 8px; border-bottom: 1px solid #eee; text-align: left; white-space: nowrap; }
th { position: sticky; top: 0; background: #f0f3f6; }
/* The verdict table fits a 1280 px window: the group and the advice wrap instead of widening the table. */
table.convergence { table-layout: auto; }
.scroll:has(table.convergence) { display: block; }
table.convergence td:first-child { white-space: normal; min-width: 6em; max-width: 20em; }
table.convergence td:last-child { white-space: normal; min-width: 14em; max-width: 28em; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
table.convergence td:last-child { white-space: normal; min-width: 280px; }
.note { font-size: 12px; color: #555; }
.warning-group h3 { color: #8a3b00; }
footer { font-size: 12px; color: #666; padding: 0 32px 24px; }
`;

/** Build the report page. Validates `data` first, so a malformed structure fails loudly here and not in a browser. */
export async function buildReportHtml(input: ReportDataInput): Promise<string> {
  const data = ReportDataSchema.parse(input);
  const fieldFigures = await Promise.all(fieldPlots(data.fields).map(figure));
  const convFigures = await Promise.all(convergencePlots(data.convergence_plotted ?? data.convergence, data.convergence_summary?.rows_per_output ?? null).map(figure));
  const sensFigures = await Promise.all(sensitivityPlots(data.sensitivity).map(figure));
  const curvatureFigures = await Promise.all(curvaturePlots(data.curvature, data.curvature_total).map(figure));
  const curvature =
    data.curvature.length === 0
      ? ''
      : `<section id="curvature"><h2>Earth curvature</h2><p class="note">${escapeHtml(CURVATURE_NOTE)}</p><div class="plots">${curvatureFigures.join('\n')}</div>${curvatureTableHtml(data.curvature, data.curvature_total?.rows ?? data.curvature.length)}</section>`;
  const fields =
    data.fields.runs === 0
      ? '<p>No finished runs yet.</p>'
      : `<div class="plots">${fieldFigures.join('\n')}</div>`;
  const convergence =
    data.convergence.length === 0
      ? '<p>No resolution study: vary a <code>grid.*</code> parameter over three or more levels to get a convergence verdict.</p>'
      : `<div class="plots">${convFigures.join('\n')}</div><h3>Verdict per output</h3>${convergenceTableHtml(data.convergence, data.convergence_summary?.rows ?? data.convergence.length)}`;
  const sensitivity =
    data.sensitivity.length === 0
      ? '<p>No sensitivity indices (they need a sampled design, or a full factorial grid with two or more levels per input).</p>'
      : `${data.sensitivity_note ? `<p class="note">${escapeHtml(data.sensitivity_note)}</p>` : ''}<div class="plots">${sensFigures.join('\n')}</div><h3>All indices</h3>${sensitivityTableHtml(data.sensitivity, data.sensitivity_total ?? data.sensitivity.length)}`;
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<title>${escapeHtml(data.title)}</title>
<style>${STYLE}</style>
</head>
<body>
<header><h1>${escapeHtml(data.title)}</h1><p>Ground-wave sensitivity sweep report · ${escapeHtml(data.generated_by)}</p></header>
<nav><a href="#summary">Summary</a><a href="#cautions">Cautions</a><a href="#fields">Field strength and phase</a>${data.curvature.length > 0 ? '<a href="#curvature">Earth curvature</a>' : ''}<a href="#convergence">Grid convergence</a><a href="#sensitivity">Sensitivity</a><a href="#runs">Runs</a><a href="#warnings">Warnings</a></nav>
<main>
${summarySection(data)}
<section id="fields"><h2>Field strength and phase against range</h2>${fields}</section>
${curvature}
<section id="convergence"><h2>Grid convergence</h2>${convergence}</section>
<section id="sensitivity"><h2>Sensitivity</h2>${sensitivity}</section>
<section id="runs"><h2>Runs</h2>${table(data.runs.columns, data.runs.rows, { total: data.runs.total, file: 'runs.parquet' })}</section>
${warningsSection(data.warnings, data.warning_counts)}
</main>
<footer>Made by ${escapeHtml(data.generated_by)}. Field strengths are rms, in dB above 1 µV/m; phases in degrees (e<sup>jωt</sup> convention).</footer>
</body>
</html>
`;
}
