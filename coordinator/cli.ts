// The `loamwave` command line: one module per command under commands/, registered here.
// Only this entry point exits the process; commands throw UserError for user mistakes. Each command loads its heavy
// modules (database engine, plot library, queue library, solver) inside its action, so `--help` and `--version`
// start in a fraction of a second.
import { Command, CommanderError } from 'commander';
import { UserError } from '../schemas/errors.js';
import { ExitCode } from '../schemas/exit-codes.js';
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
    // commander has already printed its message: help and version exit 0, a usage error is a mistake in the input.
    return err.exitCode === 0 ? ExitCode.done : ExitCode.inputMistake;
  }
  if (err instanceof UserError) {
    process.stderr.write(`error: ${err.message}\n`);
    return err.exitCode;
  }
  const e = err as Error;
  process.stderr.write(`internal error: ${e?.stack ?? String(err)}\n`);
  return ExitCode.internalError;
}
