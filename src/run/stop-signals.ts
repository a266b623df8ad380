/**
 * Ctrl+C (SIGINT) and SIGTERM stop a run the way q does: `stop` is called once, and the command goes on
 * to write what was asked for. A second signal, should the writing hang, ends the process at once with
 * the shell's status for that signal (130 for SIGINT, 143 for SIGTERM).
 */
const SIGNAL_STATUS: Readonly<Record<'SIGINT' | 'SIGTERM', number>> = { SIGINT: 130, SIGTERM: 143 };

/** Listens until the returned function is called. */
export function stopOnSignals(stop: (signal: NodeJS.Signals) => void): () => void {
  let stopped = false;
  const handler = (signal: NodeJS.Signals): void => {
    if (stopped) process.exit(signal === 'SIGINT' || signal === 'SIGTERM' ? SIGNAL_STATUS[signal] : 1);
    stopped = true;
    stop(signal);
  };
  process.on('SIGINT', handler);
  process.on('SIGTERM', handler);
  return () => {
    process.off('SIGINT', handler);
    process.off('SIGTERM', handler);
  };
}
