// What a command may touch besides the file system: output streams and a cancel flag.
// Tests pass collecting writers; main.ts passes the process's streams.
import type { CancelSignal } from '../engine/util/progress';

export interface CliIo {
  stdout(text: string): void;
  stderr(text: string): void;
  /** Set on Ctrl+C; long commands stop at their next check. */
  cancel?: CancelSignal;
}

/** Exit codes shared by all commands. */
export const EXIT = { ok: 0, failure: 1, usage: 2, cancelled: 130 } as const;

/** An io that collects output in strings (for tests and embedding). */
export function collectingIo(): CliIo & { out: string; err: string } {
  const io = {
    out: '',
    err: '',
    stdout(text: string) {
      io.out += text;
    },
    stderr(text: string) {
      io.err += text;
    },
  };
  return io;
}
