// The process exit codes of every `loamwave` command, in one table. Only the entry point (coordinator/cli.ts) and
// the commands set them; scripts that wait for a sweep overnight branch on them.
export const ExitCode = {
  /** Everything asked for was done. */
  done: 0,
  /** Some jobs failed (their errors are in the ledger and runs.parquet; the outputs are still written). */
  jobsFailed: 1,
  /** A mistake in the input: a sweep or case file, an option, a usage error, a corrupt or foreign output file. */
  inputMistake: 2,
  /** A service the command needs (Redis) cannot be reached. */
  serviceUnreachable: 3,
  /** A fault of the program itself (a bug): the message carries the detail. */
  internalError: 70,
  /** Stopped by SIGINT or SIGTERM before the work was done (128 + 2, the shell's convention; common practice). */
  stopped: 130,
} as const;

export type ExitCodeValue = (typeof ExitCode)[keyof typeof ExitCode];
