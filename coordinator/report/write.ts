// Writes DIR/report.html from a sweep's output folder: one self-contained page with the summary, cautions, field
// plots, convergence verdicts, sensitivity indices, runs and warnings. Only the command layer calls it (the outputs
// stage writes tables, never the page), so a run writes the report once, or not at all with --no-report.
import { renameSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { UserError } from '../../schemas/errors.js';
import { SOLVER_VERSION } from '../../solver/version.js';
import { assembleReportFromFolder } from './from-folder.js';
import { buildReportHtml } from './html.js';

export interface ReportCommandOptions {
  /** Convergence tolerance on field strength, dB. */
  toleranceDb?: string;
  /** Convergence tolerance on phase, degrees. */
  tolerancePhaseDeg?: string;
  json?: boolean;
}

function positiveOption(value: string | undefined, flag: string): number | undefined {
  if (value === undefined) return undefined;
  const v = Number(value);
  if (!(Number.isFinite(v) && v > 0)) throw new UserError(`report: ${flag}: must be a number > 0 (got "${value}")`, 'loamwave.report.option');
  return v;
}

/** Write DIR/report.html (through a temporary file renamed into place, so a failure leaves no half page). */
export async function writeReport(dir: string, options: ReportCommandOptions = {}): Promise<{ path: string; bytes: number; plots: number }> {
  const toleranceDb = positiveOption(options.toleranceDb, '--tolerance-db');
  const tolerancePhaseDeg = positiveOption(options.tolerancePhaseDeg, '--tolerance-phase-deg');
  const data = await assembleReportFromFolder(dir, { generatedBy: `loamwave ${SOLVER_VERSION}`, toleranceDb, tolerancePhaseDeg });
  const html = await buildReportHtml(data);
  const path = join(dir, 'report.html');
  const tmp = join(dir, `.report.html.${process.pid}.tmp`);
  try {
    writeFileSync(tmp, html);
    renameSync(tmp, path);
  } finally {
    rmSync(tmp, { force: true });
  }
  return { path, bytes: Buffer.byteLength(html), plots: (html.match(/<figure class="plot"/g) ?? []).length };
}

