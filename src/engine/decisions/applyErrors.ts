// Errors of the apply path that callers act on: a conflict (someone changed a label file since
// it was read: re-read and apply again) and an interrupted earlier apply (recover first).

export interface FileConflict {
  /** File name inside the dataset folder, e.g. "labels.csv". */
  file: string;
  /** sha256 the apply expected (null: expected the file to be absent). */
  expected: string | null;
  /** sha256 found now (null: the file is absent). */
  found: string | null;
  /** What the expectation came from: the run the decisions were made on, or the plan's own read. */
  since: 'run' | 'plan';
}

export class ConflictError extends Error {
  constructor(readonly conflicts: FileConflict[]) {
    super(
      `${conflicts.map((c) => `${c.file} changed since ${c.since === 'run' ? 'the scoring run read it' : 'the apply plan read it'}`).join('; ')}; nothing was written. ` +
        'Re-read the dataset and apply the decisions again.',
    );
    this.name = 'ConflictError';
  }

  get files(): string[] {
    return [...new Set(this.conflicts.map((c) => c.file))];
  }
}

export class InterruptedApplyError extends Error {
  constructor(
    readonly logFile: string,
    readonly batches: string[],
  ) {
    super(
      `an earlier apply was interrupted (${logFile}: batch ${batches.join(', ')}); recover it first (graph-curator apply <folder> --recover)`,
    );
    this.name = 'InterruptedApplyError';
  }
}
