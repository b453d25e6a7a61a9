// The `loamwave` command line: one module per command under commands/, registered here.
// Only this entry point exits the process; commands throw UserError for user mistakes.
import { Command, CommanderError } from 'commander';
import { UserError } from '../schemas/errors.js';
import { SOLVER_VERSION } from '../solver/version.js';
import { registerCommands } from './commands/index.js';

export function buildProgram(): Command {
  const program = new Command();
  program
    .name('loamwave')
    .description('VLF/LF ground-wave sensitivity sweeps with a validated 2-D FDTD solver')
    .version(SOLVER_VERSION)
    .showSuggestionAfterError(true)
    .exitOverride();
  registerCommands(program);
  return program;
}

export async function main(argv: string[]): Promise<void> {
  const program = buildProgram();
  try {
    await program.parseAsync(argv);
  } catch (err) {
    process.exitCode = exitCodeFor(err);
  }
}

function exitCodeFor(err: unknown): number {
  if (err instanceof CommanderError) {
    // commander has already printed its message (help, version, or a usage error).
    return err.exitCode;
  }
  if (err instanceof UserError) {
    process.stderr.write(`error: ${err.message}\n`);
    return err.exitCode;
  }
  const e = err as Error;
  process.stderr.write(`internal error: ${e?.stack ?? String(err)}\n`);
  return 70;
}
