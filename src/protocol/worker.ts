// The messages between the extension host and the engine worker thread. Both sides import this
// file. One union per direction, each discriminated by `type`; every request carries an id that
// its progress messages and its single final reply (result or error) repeat.
//
// Adding a request kind (e.g. `evaluate`): add its parameters to RequestParams, its result to
// RequestResults, a guard for each to paramGuards and resultGuards below (the compiler insists),
// and a handler in src/engine/worker/requestHandlers.ts.
import type { LocatedProblem } from '../engine/dataset/types';
import type { DatasetSummary } from '../engine/dataset/summary';
import type { RunRecord } from '../engine/pipeline/runStore';
import type { RunSettings } from '../engine/pipeline/runSettings';
import type { DecisionsFile } from '../engine/decisions/types';
import type { ApplyPlan } from '../engine/decisions/plan';
import type { ApplyResult } from '../engine/decisions/apply';
import type { ReviewSessionJson } from '../review/reviewSession';
import type { HostToWebviewMessage } from './webview';

export type { DatasetSummary, RunRecord, RunSettings, DecisionsFile, ApplyPlan, ApplyResult, ReviewSessionJson };

export interface ScoreParams {
  folder: string;
  /** Slice key; the newest slice when absent. */
  slice?: string;
  settings: RunSettings;
  /** Group the rejected nodes into candidates (default true). */
  discover?: boolean;
}

export interface ScoreOutcome {
  runId: string;
  /** Absolute path of runs/<runId>/. */
  runFolder: string;
  record: RunRecord;
  /** Absolute path of candidates.json, null when discovery was skipped. */
  candidatesFile: string | null;
  candidateCount: number;
}

/** A candidate as lists show it (tree view, overview editor). */
export interface CandidateBrief {
  id: string;
  size: number;
  topTerms: string[];
  looksLikeDrift: boolean;
}

export interface DatasetOverview {
  summary: DatasetSummary;
  /** Complete runs, newest first (at most overviewRunLimit). */
  runs: RunRecord[];
  /** Candidates of the newest run that has them, largest first. */
  latestCandidates: { runId: string; slice: string; candidates: CandidateBrief[] } | null;
}

export const overviewRunLimit = 10;

export interface OpenReviewParams {
  folder: string;
  runId: string;
  /** A session saved by the host (workspace state), used when the run folder holds none. */
  saved?: unknown;
  /**
   * Where the worker writes the session after every change (runs/<runId>/pending-decisions.json);
   * null in Restricted Mode, where nothing is written.
   */
  persistPath: string | null;
  /** Ids of decisions just applied to the label files: the restored session marks them applied. */
  appliedIds?: string[];
}

export interface OpenReviewOutcome {
  reviewId: number;
  /** Where the pending decisions came from. */
  restoredFrom: 'file' | 'state' | 'none';
  /** Why a saved session could not be used (it is then ignored, never deleted). */
  restoreProblem?: string;
  session: ReviewSessionJson;
  dataset: string;
  slice: string;
  /** Threshold previews need the fit kept in memory since the slice was scored in this worker. */
  previewAvailable: boolean;
  /** Why the fit saved beside the run could not be read (the file and, for bad JSON, line and column). */
  previewProblem?: string;
}

export interface ReviewMessageOutcome {
  /** Messages for the webview, in order. */
  posts: HostToWebviewMessage[];
  /** The session after the message, when it changed. */
  session: ReviewSessionJson | null;
}

export interface PlanApplyOutcome {
  plan: ApplyPlan;
  /** formatPlanSummary(plan). */
  summary: string;
}

export interface ApplyPlanOutcome {
  result: ApplyResult;
  /** The generated commit message (subject, blank line, body). */
  commitMessage: string;
}

export interface ReportParams {
  folder: string;
  settings: RunSettings;
  /** Held-out true labels (id,label); null or absent: each slice is tested on its own curated labels. */
  truthFile?: string | null;
  /** Sweeps on the newest few slices with fewer epochs; the main evaluation is unchanged. */
  quick: boolean;
  /** The webview's CSP nonce, put on the report's <style> and <script>. */
  nonce: string;
  /** Read and write runs/report-cache (default true); false in Restricted Mode, where nothing is written. */
  useCache?: boolean;
}

export interface ReportOutcome {
  /** A <style> element for the document head, colours from --vscode-* variables only. */
  head: string;
  /** The report markup and its tooltip <script>, for the document body. */
  body: string;
  summary: {
    dataset: string;
    slices: number;
    fromCache: boolean;
    /** When the report was computed (a cached report keeps its original time). */
    createdAt: string;
    computeSeconds: number;
  };
}

export interface SecondLookParams {
  /** The open review whose run (dataset, slice, settings) the queues are computed for. */
  reviewId: number;
  /** Cross-fitting folds for the doubtful labels (default 5). */
  folds?: number;
  /** How many unlabelled nodes to suggest (default 20). */
  count?: number;
}

export interface SecondLookOutcome extends ReviewMessageOutcome {
  /** One line for the curator, e.g. "9 doubtful labels of 140 checked; 20 suggestions of 61 unlabelled nodes". */
  summary: string;
  doubtful: number;
  suggested: number;
}

export type CommitLabelsOutcome =
  { outcome: 'committed'; commit: string; root: string; files: string[] } | { outcome: 'nothing-to-commit' } | { outcome: 'no-repository' };

export interface RequestParams {
  validate: { folder: string };
  summary: { folder: string };
  overview: { folder: string };
  score: ScoreParams;
  openReview: OpenReviewParams;
  reviewMessage: { reviewId: number; message: unknown };
  reviewDecisions: { reviewId: number };
  closeReview: { reviewId: number };
  planApply: { folder: string; decisions: DecisionsFile; source: string; rebase?: boolean };
  applyPlan: { plan: ApplyPlan };
  /** Writes an exported decisions file atomically. */
  exportDecisions: { file: string; decisions: DecisionsFile };
  /** git without a shell: commits only the dataset's label files; `initialise` runs git init first when needed. */
  commitLabels: { folder: string; message: string; initialise?: boolean };
  /** The quality-over-time report, built and rendered in the worker. */
  report: ReportParams;
  /** Doubtful labels and label-next suggestions for an open review, attached to its session. */
  secondLook: SecondLookParams;
}

export interface RequestResults {
  validate: LocatedProblem[];
  summary: DatasetSummary;
  overview: DatasetOverview;
  score: ScoreOutcome;
  openReview: OpenReviewOutcome;
  reviewMessage: ReviewMessageOutcome;
  reviewDecisions: DecisionsFile;
  closeReview: boolean;
  planApply: PlanApplyOutcome;
  applyPlan: ApplyPlanOutcome;
  exportDecisions: string;
  commitLabels: CommitLabelsOutcome;
  report: ReportOutcome;
  secondLook: SecondLookOutcome;
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
  /** A label file changed since it was read: nothing was written; re-read and apply again. */
  | { kind: 'conflict'; message: string; files: string[] }
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

function isFolderParams(value: unknown): value is { folder: string } {
  return isRecord(value) && typeof value.folder === 'string' && value.folder.length > 0;
}

const isWhole = (value: unknown, minimum: number): boolean => typeof value === 'number' && Number.isInteger(value) && value >= minimum;
const isNumberIn = (value: unknown, low: number, high: number): boolean =>
  typeof value === 'number' && Number.isFinite(value) && value >= low && value <= high;

/** Why `value` is not a complete RunSettings, or null when it is one. */
export function runSettingsProblem(value: unknown): string | null {
  if (!isRecord(value)) return 'settings are not an object';
  const checks: [keyof RunSettings, boolean][] = [
    ['model', ['mlp', 'gcn', 'sage', 'sign'].includes(value.model as string)],
    ['historyWindow', value.historyWindow === 'all' || isWhole(value.historyWindow, 0)],
    ['alpha', isNumberIn(value.alpha, 0, 100)],
    ['thresholdFolds', value.thresholdFolds === 0 || isWhole(value.thresholdFolds, 2)],
    ['thresholdScale', value.thresholdScale === 'std' || value.thresholdScale === 'mad'],
    ['smoothingWeight', isNumberIn(value.smoothingWeight, 0, 1)],
    ['smoothingRounds', isWhole(value.smoothingRounds, 0)],
    ['noveltyMethod', ['doc', 'msp', 'energy'].includes(value.noveltyMethod as string)],
    [
      'rejectQuantile',
      value.rejectQuantile === null || (isNumberIn(value.rejectQuantile, 0, 1) && value.rejectQuantile !== 0 && value.rejectQuantile !== 1),
    ],
    ['temperature', isNumberIn(value.temperature, Number.MIN_VALUE, 1e6)],
    ['labelRate', isNumberIn(value.labelRate, Number.MIN_VALUE, 1)],
    ['warmStart', typeof value.warmStart === 'boolean'],
    ['epochs', isWhole(value.epochs, 1)],
    ['batchRows', isWhole(value.batchRows, 0)],
    ['hiddenUnits', isWhole(value.hiddenUnits, 1)],
    ['learningRate', isNumberIn(value.learningRate, Number.MIN_VALUE, 10)],
    ['seed', isWhole(value.seed, Number.MIN_SAFE_INTEGER)],
  ];
  const bad = checks.filter(([, ok]) => !ok).map(([key]) => key);
  return bad.length === 0 ? null : `settings have missing or out-of-range ${bad.join(', ')}`;
}

const isReviewId = (value: unknown): boolean => isRecord(value) && isRequestId(value.reviewId);
const isOptionalText = (value: unknown): boolean => value === undefined || typeof value === 'string';
const isDecisionsFileShape = (value: unknown): boolean =>
  isRecord(value) && value.format === 'graph-curator-decisions' && Array.isArray(value.decisions) && typeof value.dataset === 'string';
const isOptionalWholeIn = (value: unknown, low: number, high: number): boolean =>
  value === undefined || (isWhole(value, low) && (value as number) <= high);
const isStringList = (value: unknown): value is string[] => Array.isArray(value) && value.every((item) => typeof item === 'string');

function isReportParams(value: unknown): boolean {
  if (!isFolderParams(value)) return false;
  const { settings, truthFile, quick, nonce, useCache } = value as Record<string, unknown>;
  return (
    runSettingsProblem(settings) === null &&
    (truthFile === undefined || truthFile === null || (typeof truthFile === 'string' && truthFile.length > 0)) &&
    typeof quick === 'boolean' &&
    // The nonce lands inside an HTML attribute and a CSP: base64 characters only.
    typeof nonce === 'string' &&
    /^[A-Za-z0-9+/=]{8,}$/.test(nonce) &&
    (useCache === undefined || typeof useCache === 'boolean')
  );
}

const paramGuards: { [K in RequestType]: Guard } = {
  validate: isFolderParams,
  summary: isFolderParams,
  overview: isFolderParams,
  score: (value) =>
    isFolderParams(value) &&
    isOptionalText((value as Record<string, unknown>).slice) &&
    ((value as Record<string, unknown>).discover === undefined || typeof (value as Record<string, unknown>).discover === 'boolean') &&
    runSettingsProblem((value as Record<string, unknown>).settings) === null,
  openReview: (value) =>
    isFolderParams(value) &&
    typeof (value as Record<string, unknown>).runId === 'string' &&
    /^[A-Za-z0-9._-]+$/.test((value as Record<string, unknown>).runId as string) &&
    ((value as Record<string, unknown>).persistPath === null || typeof (value as Record<string, unknown>).persistPath === 'string') &&
    ((value as Record<string, unknown>).appliedIds === undefined ||
      (Array.isArray((value as Record<string, unknown>).appliedIds) &&
        ((value as Record<string, unknown>).appliedIds as unknown[]).every((id) => typeof id === 'string'))),
  reviewMessage: (value) => isReviewId(value) && 'message' in (value as Record<string, unknown>),
  reviewDecisions: isReviewId,
  closeReview: isReviewId,
  planApply: (value) =>
    isFolderParams(value) &&
    isDecisionsFileShape((value as Record<string, unknown>).decisions) &&
    typeof (value as Record<string, unknown>).source === 'string' &&
    ((value as Record<string, unknown>).rebase === undefined || typeof (value as Record<string, unknown>).rebase === 'boolean'),
  applyPlan: (value) => isRecord(value) && isRecord(value.plan) && typeof value.plan.folder === 'string',
  exportDecisions: (value) =>
    isRecord(value) && typeof value.file === 'string' && value.file.length > 0 && isDecisionsFileShape(value.decisions),
  commitLabels: (value) =>
    isFolderParams(value) &&
    typeof (value as Record<string, unknown>).message === 'string' &&
    ((value as Record<string, unknown>).message as string).trim().length > 0 &&
    ((value as Record<string, unknown>).initialise === undefined || typeof (value as Record<string, unknown>).initialise === 'boolean'),
  report: isReportParams,
  secondLook: (value) =>
    isReviewId(value) &&
    isOptionalWholeIn((value as Record<string, unknown>).folds, 2, 50) &&
    isOptionalWholeIn((value as Record<string, unknown>).count, 1, 1000),
};

const resultGuards: { [K in RequestType]: Guard } = {
  validate: (value) => Array.isArray(value) && value.every(isLocatedProblem),
  summary: isRecord,
  overview: (value) => isRecord(value) && isRecord(value.summary) && Array.isArray(value.runs),
  score: (value) =>
    isRecord(value) &&
    typeof value.runId === 'string' &&
    typeof value.runFolder === 'string' &&
    isRecord(value.record) &&
    (value.candidatesFile === null || typeof value.candidatesFile === 'string'),
  openReview: (value) =>
    isRecord(value) && isRequestId(value.reviewId) && isRecord(value.session) && typeof value.previewAvailable === 'boolean',
  reviewMessage: (value) => isRecord(value) && Array.isArray(value.posts) && (value.session === null || isRecord(value.session)),
  reviewDecisions: isDecisionsFileShape,
  closeReview: (value) => typeof value === 'boolean',
  planApply: (value) => isRecord(value) && isRecord(value.plan) && typeof value.summary === 'string',
  applyPlan: (value) => isRecord(value) && isRecord(value.result) && typeof value.commitMessage === 'string',
  exportDecisions: (value) => typeof value === 'string',
  commitLabels: (value) =>
    isRecord(value) &&
    (value.outcome === 'nothing-to-commit' ||
      value.outcome === 'no-repository' ||
      (value.outcome === 'committed' && typeof value.commit === 'string' && isStringList(value.files))),
  report: (value) =>
    isRecord(value) &&
    typeof value.head === 'string' &&
    typeof value.body === 'string' &&
    isRecord(value.summary) &&
    typeof value.summary.dataset === 'string' &&
    isWhole(value.summary.slices, 0) &&
    typeof value.summary.fromCache === 'boolean' &&
    typeof value.summary.createdAt === 'string' &&
    typeof value.summary.computeSeconds === 'number',
  secondLook: (value) =>
    isRecord(value) &&
    Array.isArray(value.posts) &&
    (value.session === null || isRecord(value.session)) &&
    typeof value.summary === 'string' &&
    isWhole(value.doubtful, 0) &&
    isWhole(value.suggested, 0),
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
    case 'conflict':
      return isStringList(value.files);
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
