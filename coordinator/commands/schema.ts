// `loamwave schema case|sweep`: print the JSON Schema of a file format, for editors and validators.
import type { Command } from 'commander';
import { caseJsonSchema } from '../../schemas/case.js';
import { UserError } from '../../schemas/errors.js';

const SCHEMAS: Record<string, () => unknown> = {
  case: caseJsonSchema,
};

/** Other rooms add their formats here (e.g. the sweep file). */
export function addSchema(name: string, make: () => unknown): void {
  SCHEMAS[name] = make;
}

export function registerSchema(program: Command): void {
  program
    .command('schema')
    .description('print the JSON Schema of a file format (case, sweep)')
    .argument('<format>', 'which format: case or sweep')
    .action((format: string) => {
      const make = SCHEMAS[format];
      if (!make) {
        throw new UserError(`schema: unknown format "${format}"; choose one of ${Object.keys(SCHEMAS).join(', ')}`);
      }
      process.stdout.write(JSON.stringify(make(), null, 2) + '\n');
    });
}
