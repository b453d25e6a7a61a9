// `loamwave verify [--json] [--fields float32]`: run the published-reference checks on small cases and print a table;
// exit code 1 when any check fails.
import { Option, type Command } from 'commander';
import type { FieldPrecision } from '../../solver/verify/check-case.js';
import type { CheckOutcome } from '../../solver/verify/index.js';
import { ExitCode } from '../../schemas/exit-codes.js';

export function registerVerify(program: Command): void {
  program
    .command('verify')
    .description('run the solver against published references (small cases) and print check, source, expected, got, tolerance, pass')
    .option('--json', 'print the outcomes as JSON')
    .option('--only <ids>', 'comma-separated check ids to run')
    .addOption(new Option('--fields <precision>', 'storage of the field arrays in every check case (grid.field_precision)').choices(['float64', 'float32']).default('float64'))
    .action(async (opts: { json?: boolean; only?: string; fields: FieldPrecision }) => {
      const { referenceChecks } = await import('../../solver/verify/index.js');
      const { withFieldPrecision } = await import('../../solver/verify/check-case.js');
      const wanted = opts.only?.split(',').map((s) => s.trim());
      const outcomes: CheckOutcome[] = [];
      for (const check of referenceChecks()) {
        if (wanted && !wanted.includes(check.id)) continue;
        if (!opts.json) process.stderr.write(`verify: ${check.id}…\n`);
        outcomes.push(...withFieldPrecision(opts.fields, () => check.run()));
      }
      const failed = outcomes.filter((o) => !o.pass).length;
      if (opts.json) {
        process.stdout.write(JSON.stringify(outcomes.map(({ check, source, expected, got, tolerance, toleranceReason, pass }) => ({ check, source, expected, got, tolerance, tolerance_reason: toleranceReason, pass })), null, 2) + '\n');
      } else {
        for (const o of outcomes) {
          process.stdout.write(`${o.pass ? 'pass' : 'FAIL'}  ${o.check}\n      expected ${o.expected}  got ${o.got}  tolerance ${o.tolerance}\n      source: ${o.source}\n`);
        }
        process.stdout.write(`${outcomes.length - failed} passed, ${failed} failed\n`);
      }
      if (failed > 0) process.exitCode = ExitCode.jobsFailed;
    });
}
