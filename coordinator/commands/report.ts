// `loamwave report DIR`: read a sweep's output folder and write DIR/report.html, one self-contained page with the
// summary, cautions, field plots, convergence verdicts, sensitivity indices, runs and warnings.
import { renameSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Command } from 'commander';
import { UserError } from '../../schemas/errors.js';
import { SOLVER_VERSION } from '../../solver/version.js';
import { assembleReportData } from '../report/assembly.js';
import { readReportFolder } from '../analysis/read-tables.js';
import { buildReportHtml } from '../report/html.js';

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
  const tables = await readReportFolder(dir);
  const data = assembleReportData(tables, { generatedBy: `loamwave ${SOLVER_VERSION}`, toleranceDb, tolerancePhaseDeg });
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

export function registerReport(program: Command): void {
  program
    .command('report')
    .description('write DIR/report.html: plots, grid convergence, sensitivity and warnings of a sweep\'s outputs')
    .argument('<dir>', 'output folder of a sweep (holds runs.parquet, fields/ and the sweep file)')
    .option('--tolerance-db <dB>', 'grid convergence tolerance on field strength, dB (default 0.2)')
    .option('--tolerance-phase-deg <deg>', 'grid convergence tolerance on phase, degrees (default 1)')
    .option('--json', 'print what was written as JSON on stdout')
    .action(async (dir: string, opts: ReportCommandOptions) => {
      const written = await writeReport(dir, opts);
      if (opts.json) process.stdout.write(JSON.stringify(written) + '\n');
      else process.stderr.write(`report: wrote ${written.path}\n`);
    });
}
