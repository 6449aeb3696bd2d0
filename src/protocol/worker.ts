// The messages between the extension host and the engine worker thread. Both sides import this
// file. One union per direction, each discriminated by `type`; every request carries an id that
// its progress messages and its single final reply (result or error) repeat.
//
// Adding a request kind (e.g. `score`): add its parameters to RequestParams, its result to
// RequestResults, a guard for each to paramGuards and resultGuards below (the compiler insists),
// and a handler in src/engine/worker/requestHandlers.ts.
import type { LocatedProblem } from '../engine/dataset/types';
import type { DatasetSummary } from '../engine/dataset/summary';

export type { DatasetSummary };

export interface RequestParams {
  validate: { folder: string };
  summary: { folder: string };
  // score: added by the lead.
}

export interface RequestResults {
  validate: LocatedProblem[];
  summary: DatasetSummary;
  // score: added by the lead.
}

export type RequestType = keyof RequestParams;

// ---- host → worker ----

export type EngineRequest = { [K in RequestType]: { type: K; id: number; params: RequestParams[K] } }[RequestType];
export type ValidateRequest = Extract<EngineRequest, { type: 'validate' }>;
export type SummaryRequest = Extract<EngineRequest, { type: 'summary' }>;

/** Asks the worker to stop request `id`; the worker answers with an error of kind 'cancelled'. */
export interface CancelMessage {
  type: 'cancel';
  id: number;
}

export type HostToWorkerMessage = EngineRequest | CancelMessage;

// ---- worker → host ----

export interface ProgressMessage {
  type: 'progress';
  id: number;
  /** Short stage name from the engine ("load", "validate", ...). */
  stage: string;
  /** In [0, 1], within the stage. */
  fraction: number;
}

export type ResultMessage = { [K in RequestType]: { type: 'result'; id: number; request: K; value: RequestResults[K] } }[RequestType];

export type WorkerFailure =
  /** The dataset is malformed: problems located in its files. */
  | { kind: 'dataset'; message: string; problems: LocatedProblem[] }
  | { kind: 'cancelled'; message: string }
  /** Anything else: a bug or an I/O failure inside the worker. */
  | { kind: 'internal'; message: string; stack?: string };

export interface ErrorMessage {
  type: 'error';
  id: number;
  error: WorkerFailure;
}

export type WorkerToHostMessage = ProgressMessage | ResultMessage | ErrorMessage;

// ---- runtime guards: messages cross a thread boundary as structured clones, so check their shape ----

type Guard = (value: unknown) => boolean;

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function isRequestId(value: unknown): value is number {
  return typeof value === 'number' && Number.isSafeInteger(value) && value >= 0;
}

function isLineNumber(value: unknown): boolean {
  return typeof value === 'number' && Number.isInteger(value) && value >= 0;
}

export function isLocatedProblem(value: unknown): value is LocatedProblem {
  return (
    isRecord(value) &&
    typeof value.file === 'string' &&
    isLineNumber(value.line) &&
    isLineNumber(value.column) &&
    typeof value.message === 'string'
  );
}

function isFolderParams(value: unknown): boolean {
  return isRecord(value) && typeof value.folder === 'string' && value.folder.length > 0;
}

const paramGuards: { [K in RequestType]: Guard } = {
  validate: isFolderParams,
  summary: isFolderParams,
};

const resultGuards: { [K in RequestType]: Guard } = {
  validate: (value) => Array.isArray(value) && value.every(isLocatedProblem),
  summary: isRecord,
};

export const requestTypes = Object.keys(paramGuards) as RequestType[];

export function isRequestType(value: unknown): value is RequestType {
  return typeof value === 'string' && Object.prototype.hasOwnProperty.call(paramGuards, value);
}

export function isEngineRequest(value: unknown): value is EngineRequest {
  return isRecord(value) && isRequestType(value.type) && isRequestId(value.id) && paramGuards[value.type](value.params);
}

export function isCancelMessage(value: unknown): value is CancelMessage {
  return isRecord(value) && value.type === 'cancel' && isRequestId(value.id);
}

export function isHostToWorkerMessage(value: unknown): value is HostToWorkerMessage {
  return isCancelMessage(value) || isEngineRequest(value);
}

export function isProgressMessage(value: unknown): value is ProgressMessage {
  return (
    isRecord(value) &&
    value.type === 'progress' &&
    isRequestId(value.id) &&
    typeof value.stage === 'string' &&
    typeof value.fraction === 'number' &&
    value.fraction >= 0 &&
    value.fraction <= 1
  );
}

export function isResultMessage(value: unknown): value is ResultMessage {
  return (
    isRecord(value) &&
    value.type === 'result' &&
    isRequestId(value.id) &&
    isRequestType(value.request) &&
    resultGuards[value.request](value.value)
  );
}

function isWorkerFailure(value: unknown): value is WorkerFailure {
  if (!isRecord(value) || typeof value.message !== 'string') return false;
  switch (value.kind) {
    case 'dataset':
      return Array.isArray(value.problems) && value.problems.every(isLocatedProblem);
    case 'cancelled':
      return true;
    case 'internal':
      return value.stack === undefined || typeof value.stack === 'string';
    default:
      return false;
  }
}

export function isErrorMessage(value: unknown): value is ErrorMessage {
  return isRecord(value) && value.type === 'error' && isRequestId(value.id) && isWorkerFailure(value.error);
}

export function isWorkerToHostMessage(value: unknown): value is WorkerToHostMessage {
  return isProgressMessage(value) || isResultMessage(value) || isErrorMessage(value);
}
