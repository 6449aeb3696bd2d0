// Progress reporting and cooperative cancellation shared by the CLI, the worker and tests.

export interface ProgressSink {
  /** stage: a short name ("load", "propagate", "train", "score", "smooth", ...); fraction in [0, 1]. */
  report(stage: string, fraction: number): void;
}

export interface CancelSignal {
  readonly cancelled: boolean;
}

export class CancelledError extends Error {
  constructor() {
    super('cancelled');
    this.name = 'CancelledError';
  }
}

export function throwIfCancelled(signal: CancelSignal | undefined): void {
  if (signal?.cancelled) throw new CancelledError();
}

export const silentProgress: ProgressSink = { report: () => undefined };

/** A cancel signal whose flag can be set by the owner (CLI on SIGINT, worker on a message). */
export class CancelFlag implements CancelSignal {
  cancelled = false;
  cancel(): void {
    this.cancelled = true;
  }
}

/** Yields to the event loop so that a cancel message can be delivered during long loops. */
export function yieldToEventLoop(): Promise<void> {
  return new Promise((resolve) => setImmediate(resolve));
}
