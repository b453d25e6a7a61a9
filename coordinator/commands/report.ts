// `loamwave report DIR`: read a sweep's output folder and write DIR/report.html, one self-contained page with the
// summary, cautions, field plots, convergence verdicts, sensitivity indices, runs and warnings.
import type { Command } from 'commander';
import type { ReportCommandOptions } from '../report/write.js';

export function registerReport(program: Command): void {
  program
    .command('report')
    .description('write DIR/report.html: plots, grid convergence, sensitivity and warnings of a sweep\'s outputs')
    .argument('<dir>', 'output folder of a sweep (holds runs.parquet, fields/ and the sweep file)')
    .option('--tolerance-db <dB>', 'grid convergence tolerance on field strength, dB (default 0.2)')
    .option('--tolerance-phase-deg <deg>', 'grid convergence tolerance on phase, degrees (default 1)')
    .option('--json', 'print what was written as JSON on stdout')
    .action(async (dir: string, opts: ReportCommandOptions) => {
      const { writeReport } = await import('../report/write.js');
      const written = await writeReport(dir, opts);
      if (opts.json) process.stdout.write(JSON.stringify(written) + '\n');
      else process.stderr.write(`report: wrote ${written.path}\n`);
    });
}
