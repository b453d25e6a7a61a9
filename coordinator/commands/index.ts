// Every command of the command line, in the order `--help` lists them.
import type { Command } from 'commander';
import { registerSchema } from './schema.js';

export function registerCommands(program: Command): void {
  registerSchema(program);
}
