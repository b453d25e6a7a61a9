// Ctrl-C and SIGTERM for long-running commands: the first signal asks for a clean stop, the second for an urgent
// one; the command decides what each means and exits with ExitCode.stopped (schemas/exit-codes.ts) when stopped.

/** Listen for SIGINT and SIGTERM until the returned function is called. */
export function onStopSignals(first: (signal: string) => void, second: (signal: string) => void): () => void {
  let count = 0;
  const handler = (signal: NodeJS.Signals) => {
    count++;
    if (count === 1) first(signal);
    else second(signal);
  };
  process.on('SIGINT', handler);
  process.on('SIGTERM', handler);
  return () => {
    process.off('SIGINT', handler);
    process.off('SIGTERM', handler);
  };
}
