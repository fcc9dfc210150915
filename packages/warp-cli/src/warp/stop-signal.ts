/** Ctrl-C and SIGTERM during a batch: stop scheduling, tidy up, and let the caller say so. */

export interface StopSignal {
  /** True once SIGINT or SIGTERM has arrived. */
  readonly stopping: boolean;
  /** Resolves when it arrives (never, otherwise). */
  readonly stopped: Promise<void>;
  /** Stops listening; a second signal after the first gets Node's default (the process ends). */
  dispose(): void;
}

/** Listens for one SIGINT or SIGTERM until `dispose()`. */
export function stopOnSignals(): StopSignal {
  let stopping = false;
  let stop: () => void = () => {};
  const stopped = new Promise<void>((resolve) => (stop = resolve));
  const onSignal = () => {
    stopping = true;
    stop();
  };
  process.once('SIGINT', onSignal);
  process.once('SIGTERM', onSignal);
  return {
    get stopping() {
      return stopping;
    },
    stopped,
    dispose() {
      process.removeListener('SIGINT', onSignal);
      process.removeListener('SIGTERM', onSignal);
    },
  };
}
