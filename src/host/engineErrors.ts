// Errors with which engine requests fail on the host side. Built from the worker's ErrorMessage,
// or by the host itself when the worker dies or the user cancels.
import type { LocatedProblem } from '../engine/dataset/types';
import type { WorkerFailure } from '../protocol/worker';

/** The user (or a newer request) cancelled the request. */
export class RequestCancelledError extends Error {
  constructor(message = 'The request was cancelled.') {
    super(message);
    this.name = 'RequestCancelledError';
  }
}

/** The dataset is malformed; problems name file, line and column. */
export class DatasetProblemsError extends Error {
  constructor(
    message: string,
    readonly problems: LocatedProblem[],
  ) {
    super(message);
    this.name = 'DatasetProblemsError';
  }
}

/** The engine failed for another reason (an I/O error or a bug); workerStack is the worker's stack trace. */
export class EngineFailureError extends Error {
  constructor(
    message: string,
    readonly workerStack?: string,
  ) {
    super(message);
    this.name = 'EngineFailureError';
  }
}

/** A label file changed since it was read: nothing was written; re-reading and applying again is safe. */
export class LabelFilesConflictError extends Error {
  constructor(
    message: string,
    readonly files: string[],
  ) {
    super(message);
    this.name = 'LabelFilesConflictError';
  }
}

/** The worker thread exited (crashed or was terminated) before answering. */
export class WorkerExitedError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'WorkerExitedError';
  }
}

export function errorFromFailure(failure: WorkerFailure): Error {
  switch (failure.kind) {
    case 'dataset':
      return new DatasetProblemsError(failure.message, failure.problems);
    case 'cancelled':
      return new RequestCancelledError();
    case 'conflict':
      return new LabelFilesConflictError(failure.message, failure.files);
    case 'internal':
      return new EngineFailureError(failure.message, failure.stack);
  }
}
