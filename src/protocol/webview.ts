// The messages between the extension host and the review panel's webview. Both sides import this
// file. One union per direction, each discriminated by `type`. Messages that expect an answer
// carry a `requestId` that the answer (`thresholdPreview`, `done` or `error`) repeats.
//
// The host validates every webview → host message with isWebviewToHostMessage before acting on
// it: a webview is a browser page and its messages are untrusted input.
//
// The graph payload is columnar (plain number arrays, which survive postMessage's JSON-like
// transfer in every VS Code version) and capped: a neighbourhood keeps at most
// neighbourhoodEdgeCap edges, members' internal links first (see src/review/neighbourhood.ts).
import type { DecisionKind } from '../engine/decisions/types';

export const neighbourhoodEdgeCap = 20_000;
/** Longest text sent per node; the table and the tooltip show the start of longer texts. */
export const nodeTextCap = 600;

// ---- shared shapes ----

export interface WeightedTermView {
  term: string;
  weight: number;
}

export interface ClassView {
  name: string;
  /** Index into the webview's class palette. */
  colour: number;
  /** known: in classes.json (or labels); pending: created by a pending decision; merged: retired by a pending merge-classes. */
  status: 'known' | 'pending' | 'merged';
}

export type CandidateStatus = 'open' | 'named' | 'merged-into-class' | 'dismissed' | 'merged' | 'split' | 'emptied';

export interface QueueEntry {
  id: string;
  size: number;
  status: CandidateStatus;
  /** Times skipped; skipped candidates go to the back of the queue. */
  skips: number;
  topTerms: string[];
  meanNovelty: number;
  looksLikeDrift: boolean;
  /** Closed by a decision that is applied (in the label files): done, not undoable. */
  applied?: boolean;
}

/**
 * Nodes of the current candidate's neighbourhood, columnar. The first `memberCount` entries are
 * the members; the rest are their one-hop neighbours. Class columns are indices into
 * ReviewSnapshot.classes, −1 for none.
 */
export interface NodeColumns {
  ids: string[];
  texts: string[];
  label: number[];
  predicted: number[];
  /** Class a pending decision gives the node, −1 for none. */
  pending: number[];
  novelty: number[];
}

export interface NeighbourhoodGraph {
  memberCount: number;
  nodes: NodeColumns;
  /** Edges as positions into `nodes`. */
  source: number[];
  target: number[];
  /** Edges the neighbourhood has in full; more than source.length when the cap cut it. */
  totalEdges: number;
  truncated: boolean;
}

export interface CandidateView {
  id: string;
  size: number;
  status: CandidateStatus;
  topTerms: WeightedTermView[];
  /** Members per slice in time order: the emergence curve. */
  sliceCounts: { slice: string; count: number }[];
  nearestMembers: { id: string; text: string; distance: number }[];
  neighbourClasses: { className: string; count: number }[];
  meanNovelty: number;
  /** Mean silhouette from discovery; null for candidates made by merging or splitting. */
  cohesion: number | null;
  looksLikeDrift: boolean;
  driftTowards: string | null;
  graph: NeighbourhoodGraph;
}

export interface PendingDecisionView {
  id: string;
  kind: DecisionKind;
  /** One line for the pending list, e.g. `name "turbine icing" (42 nodes)`. */
  summary: string;
}

export type ThresholdMode = 'alpha' | 'quantile';

export interface ThresholdSetting {
  mode: ThresholdMode;
  /** DOC threshold width (mode alpha). */
  alpha: number;
  /** Fraction of the slice's nodes to reject (mode quantile), in [0, 1]. */
  quantile: number;
  /** Neighbour smoothing weight, in [0, 1]. */
  lambda: number;
}

export interface ThresholdPreviewResult {
  setting: ThresholdSetting;
  /** Nodes of the slice that would be rejected, out of `scored`. */
  rejected: number;
  scored: number;
  /** Open candidates that would keep at least the minimum candidate size of rejected members. */
  candidatesKept: number;
  /** Rejected nodes in no open candidate (they would need a new discovery run to be grouped). */
  ungroupedRejected: number;
  /** Each of the run's candidates at this setting (absent where the host has no fit to preview from). */
  candidates?: CandidatePreview[];
}

export interface CandidatePreview {
  id: string;
  /** Its members in the scored slice… */
  members: number;
  /** …of which this setting still rejects so many. */
  stillRejected: number;
  /** At least the minimum candidate size stays rejected: the candidate would remain. */
  kept: boolean;
}

// ---- second look: doubtful labels and what to label next (docs/second-look.md) ----

export type SecondLookQueueKind = 'doubts' | 'labelNext';
/** open: no pending decision on the node; kept: keep-label; changed: a pending decision gives it a class. */
export type SecondLookItemStatus = 'open' | 'kept' | 'changed';

export interface SecondLookItemView {
  /** 1 = first in the engine's ranking. */
  rank: number;
  node: string;
  /** Start of the node's text. */
  text: string;
  slice: string;
  /** The curated label; null for an unlabelled node (label next). */
  currentLabel: string | null;
  /** Doubts: the other class with the most evidence; label next: the model's top class. A suggestion, not a decision. */
  suggestedLabel: string;
  /** Doubts: disagreement score in [0, 1]; label next: usefulness. */
  score: number;
  /** The evidence behind the score in a few words (margin, neighbours, outputs), as the engine reported it. */
  evidence: string;
  status: SecondLookItemStatus;
  /** Class a pending decision gives the node (after merges of classes), null when none. */
  pendingLabel: string | null;
  /** The pending decision that settled the item, null while it is open. */
  decisionId: string | null;
}

export interface SecondLookQueueView {
  kind: SecondLookQueueKind;
  slice: string;
  /** One line: what was checked or ranked, e.g. "9 doubtful of 140 labels checked in 2024-Q1 … 2024-Q4". */
  summary: string;
  /** Why the engine could not build this queue (e.g. too few labels), null when it did. */
  problem: string | null;
  items: SecondLookItemView[];
  openCount: number;
}

export interface SecondLookView {
  /** When the queues were computed (ISO-8601). */
  computedAt: string;
  doubts: SecondLookQueueView;
  labelNext: SecondLookQueueView;
}

export interface ReviewSnapshot {
  dataset: string;
  slice: string;
  runId: string | null;
  classes: ClassView[];
  queue: QueueEntry[];
  current: CandidateView | null;
  pending: PendingDecisionView[];
  canUndo: boolean;
  canRedo: boolean;
  /** The run's own setting and its counts; null when the host has no scores to preview with. */
  threshold: ThresholdPreviewResult | null;
  /** Why moving the setting cannot preview (the controls then stay still); absent when it can. */
  previewsOff?: string;
  /** The second-look queues; absent until they are computed for this review. */
  secondLook?: SecondLookView;
}

// ---- host → webview ----

export interface SnapshotMessage {
  type: 'snapshot';
  snapshot: ReviewSnapshot;
}

export interface ThresholdPreviewMessage {
  type: 'thresholdPreview';
  requestId: number;
  preview: ThresholdPreviewResult;
}

/** A request finished; `message` is shown to the curator (e.g. the path a file was written to). */
export interface DoneMessage {
  type: 'done';
  requestId: number;
  message: string;
}

export interface ErrorMessage {
  type: 'error';
  /** The request that failed, absent when the failure answers no request. */
  requestId?: number;
  message: string;
}

export type HostToWebviewMessage = SnapshotMessage | ThresholdPreviewMessage | DoneMessage | ErrorMessage;

// ---- webview → host ----

/**
 * A decision as the curator makes it. The host's review session fills in what the webview does
 * not know or must not choose: decision id, time, member lists of whole candidates, split parts.
 */
export type DecisionRequest =
  | { kind: 'name-new-class'; candidateId: string; className: string; description: string; note?: string }
  | { kind: 'merge-into-class'; candidateId: string; className: string; note?: string }
  | { kind: 'move-members'; members: string[]; className: string; description?: string; note?: string }
  | { kind: 'merge-classes'; from: string; into: string; note?: string }
  | { kind: 'merge-candidates'; candidateIds: string[]; note?: string }
  /** parts: how many groups to split into (default 2). */
  | { kind: 'split-candidate'; candidateId: string; parts?: number; note?: string }
  | { kind: 'dismiss'; candidateId: string; note?: string }
  | { kind: 'skip'; candidateId: string; note?: string }
  | { kind: 'keep-label'; node: string; note?: string };

export interface ReadyMessage {
  type: 'ready';
}
export interface SelectCandidateMessage {
  type: 'selectCandidate';
  candidateId: string;
}
export interface DecideMessage {
  type: 'decide';
  requestId: number;
  decision: DecisionRequest;
}
export interface UndoMessage {
  type: 'undo';
  requestId: number;
}
export interface RedoMessage {
  type: 'redo';
  requestId: number;
}
export interface PreviewThresholdMessage {
  type: 'previewThreshold';
  requestId: number;
  setting: ThresholdSetting;
}
export interface ExportDecisionsMessage {
  type: 'exportDecisions';
  requestId: number;
}
export interface ApplyDecisionsMessage {
  type: 'applyDecisions';
  requestId: number;
}
export interface OpenNodeMessage {
  type: 'openNode';
  nodeId: string;
}
/** Compute (or recompute) the second-look queues for the run under review; answered with `done` or `error`. */
export interface LoadSecondLookMessage {
  type: 'loadSecondLook';
  requestId: number;
}

export type WebviewToHostMessage =
  | ReadyMessage
  | SelectCandidateMessage
  | DecideMessage
  | UndoMessage
  | RedoMessage
  | PreviewThresholdMessage
  | ExportDecisionsMessage
  | ApplyDecisionsMessage
  | OpenNodeMessage
  | LoadSecondLookMessage;

export type WebviewToHostType = WebviewToHostMessage['type'];

// ---- runtime guards for webview → host messages ----

/** Longest name, note or id accepted; a real one is far shorter, a huge one is a malformed message. */
const maxTextLength = 10_000;
/** Most nodes one move-members decision may name. */
const maxMembers = 1_000_000;

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function isRequestId(value: unknown): value is number {
  return typeof value === 'number' && Number.isSafeInteger(value) && value >= 0;
}

function isName(value: unknown): value is string {
  return typeof value === 'string' && value.trim().length > 0 && value.length <= maxTextLength;
}

function isText(value: unknown): value is string {
  return typeof value === 'string' && value.length <= maxTextLength;
}

function isOptionalText(value: unknown): boolean {
  return value === undefined || isText(value);
}

function isDistinctNames(value: unknown, minimum: number, maximum: number): value is string[] {
  return (
    Array.isArray(value) &&
    value.length >= minimum &&
    value.length <= maximum &&
    value.every(isName) &&
    new Set(value).size === value.length
  );
}

function isFraction(value: unknown): value is number {
  return typeof value === 'number' && value >= 0 && value <= 1;
}

export function isThresholdSetting(value: unknown): value is ThresholdSetting {
  return (
    isRecord(value) &&
    (value.mode === 'alpha' || value.mode === 'quantile') &&
    typeof value.alpha === 'number' &&
    Number.isFinite(value.alpha) &&
    value.alpha >= 0 &&
    value.alpha <= 100 &&
    isFraction(value.quantile) &&
    isFraction(value.lambda)
  );
}

const decisionGuards: { [K in DecisionRequest['kind']]: (d: Record<string, unknown>) => boolean } = {
  'name-new-class': (d) => isName(d.candidateId) && isName(d.className) && isText(d.description),
  'merge-into-class': (d) => isName(d.candidateId) && isName(d.className),
  'move-members': (d) => isDistinctNames(d.members, 1, maxMembers) && isName(d.className) && isOptionalText(d.description),
  'merge-classes': (d) => isName(d.from) && isName(d.into) && d.from !== d.into,
  'merge-candidates': (d) => isDistinctNames(d.candidateIds, 2, 1000),
  'split-candidate': (d) =>
    isName(d.candidateId) &&
    (d.parts === undefined || (Number.isInteger(d.parts) && (d.parts as number) >= 2 && (d.parts as number) <= 20)),
  dismiss: (d) => isName(d.candidateId),
  skip: (d) => isName(d.candidateId),
  'keep-label': (d) => isName(d.node),
};

export const decisionRequestKinds = Object.keys(decisionGuards) as DecisionRequest['kind'][];

export function isDecisionRequest(value: unknown): value is DecisionRequest {
  if (!isRecord(value) || typeof value.kind !== 'string' || !Object.prototype.hasOwnProperty.call(decisionGuards, value.kind)) return false;
  return isOptionalText(value.note) && decisionGuards[value.kind as DecisionRequest['kind']](value);
}

const messageGuards: { [K in WebviewToHostType]: (m: Record<string, unknown>) => boolean } = {
  ready: () => true,
  selectCandidate: (m) => isName(m.candidateId),
  decide: (m) => isRequestId(m.requestId) && isDecisionRequest(m.decision),
  undo: (m) => isRequestId(m.requestId),
  redo: (m) => isRequestId(m.requestId),
  previewThreshold: (m) => isRequestId(m.requestId) && isThresholdSetting(m.setting),
  exportDecisions: (m) => isRequestId(m.requestId),
  applyDecisions: (m) => isRequestId(m.requestId),
  openNode: (m) => isName(m.nodeId),
  loadSecondLook: (m) => isRequestId(m.requestId),
};

export const webviewToHostTypes = Object.keys(messageGuards) as WebviewToHostType[];

export function isWebviewToHostMessage(value: unknown): value is WebviewToHostMessage {
  if (!isRecord(value) || typeof value.type !== 'string' || !Object.prototype.hasOwnProperty.call(messageGuards, value.type)) return false;
  return messageGuards[value.type as WebviewToHostType](value);
}

/** A short description of why a message was refused, for the error shown to the curator and the log. */
export function describeRefusedMessage(value: unknown): string {
  if (!isRecord(value)) return `refused a webview message that is not an object (${value === null ? 'null' : typeof value})`;
  const type = typeof value.type === 'string' ? value.type : String(value.type);
  if (!Object.prototype.hasOwnProperty.call(messageGuards, type)) return `refused a webview message of unknown type "${type}"`;
  if (type === 'decide' && isRecord(value.decision))
    return `refused a malformed "${String(value.decision.kind)}" decision from the webview`;
  return `refused a malformed "${type}" message from the webview`;
}
