// `loamwave schema case|sweep`: print the JSON Schema of a file format, for editors and validators.
import type { Command } from 'commander';
import { UserError } from '../../schemas/errors.js';

/** Every file format with a JSON Schema, loaded only when asked for. */
const SCHEMAS: Record<string, () => Promise<unknown>> = {
  case: async () => (await import('../../schemas/case.js')).caseJsonSchema(),
  sweep: async () => (await import('../../schemas/sweep.js')).sweepJsonSchema(),
};

export function registerSchema(program: Command): void {
  program
    .command('schema')
    .description('print the JSON Schema of a file format (case, sweep)')
    .argument('<format>', 'which format: case or sweep')
    .action(async (format: string) => {
      const make = SCHEMAS[format];
      if (!make) {
        throw new UserError(`schema: unknown format "${format}"; choose one of ${Object.keys(SCHEMAS).join(', ')}`);
      }
      process.stdout.write(JSON.stringify(await make(), null, 2) + '\n');
    });
}
