/**
 * Ctrl-C and SIGTERM for a long, resumable command (`series`, `flow`): the first of either aborts
 * the returned signal so the library stops after the work in flight, and the command reports the
 * interruption with the shell's exit status (130 for SIGINT, 143 for SIGTERM). The handlers stay
 * until the process ends: a signal after the run (while the image codec's threads wind down) must
 * not reach the fallback handler, whose immediate exit could cut them.
 */
export interface SignalAbort {
  readonly signal: AbortSignal;
  /** The signal received, or null. */
  readonly received: () => NodeJS.Signals | null;
  /** The exit status for the signal received (130 when none is known). */
  readonly exitStatus: () => number;
}

export function abortOnSignals(): SignalAbort {
  const controller = new AbortController();
  let name: NodeJS.Signals | null = null;
  const onSignal = (signal: NodeJS.Signals): void => {
    name = signal;
    controller.abort();
  };
  process.once('SIGINT', onSignal);
  process.once('SIGTERM', onSignal);
  return { signal: controller.signal, received: () => name, exitStatus: () => (name === 'SIGTERM' ? 143 : 130) };
}
