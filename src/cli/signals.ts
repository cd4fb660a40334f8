/**
 * Stopping long commands (quantify batches, watch) cleanly on Ctrl-C or SIGTERM, in one place: the
 * first signal asks the engine to stop through an `AbortSignal` (the scans in hand are finished and
 * the results written); a second signal of either kind stops the process at once, as without a
 * handler.
 */

/** The signals that stop a long command. */
export type StopSignalName = 'SIGINT' | 'SIGTERM';

/** Exit status after a stop by a signal: 128 + the signal's number (common practice in shells). */
export const SIGNAL_EXIT_STATUS: Readonly<Record<StopSignalName, number>> = Object.freeze({
  SIGINT: 130,
  SIGTERM: 143,
});

/** Installed stop handlers. */
export interface StopHandlers {
  /** Aborted at the first signal, with the signal's name as its reason. */
  readonly signal: AbortSignal;
  /** The signal that asked the stop, if one came. */
  stoppedBy(): StopSignalName | undefined;
  /** Removes the handlers (safe to call more than once). */
  remove(): void;
}

/**
 * Installs SIGINT and SIGTERM handlers that ask a stop. Remove them when the command ends.
 *
 * @param onFirst - called at the first signal (e.g. to say what happens now)
 * @returns the stop signal for the engine and the remover
 */
export function installStopHandlers(onFirst?: (name: StopSignalName) => void): StopHandlers {
  const controller = new AbortController();
  let stoppedBy: StopSignalName | undefined;
  const onSignal = (name: StopSignalName): void => {
    if (stoppedBy !== undefined) {
      // A second signal: stop at once, as without a handler (partial files stay behind).
      remove();
      process.kill(process.pid, name);
      return;
    }
    stoppedBy = name;
    onFirst?.(name);
    controller.abort(name);
  };
  const onInterrupt = (): void => onSignal('SIGINT');
  const onTerminate = (): void => onSignal('SIGTERM');
  const remove = (): void => {
    process.off('SIGINT', onInterrupt);
    process.off('SIGTERM', onTerminate);
  };
  process.on('SIGINT', onInterrupt);
  process.on('SIGTERM', onTerminate);
  return { signal: controller.signal, stoppedBy: () => stoppedBy, remove };
}
