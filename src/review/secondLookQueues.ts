// The second-look queues a review session keeps beside its candidates: the doubtful labels and
// the label-next suggestions the engine computed for the run under review (src/engine/secondLook).
// They are what to look at, never what to do: acting on an item is an ordinary decision
// ('keep-label' or 'move-members'), so it joins the session's history, undo, redo and apply path.
// The queues are saved with the session (review-session JSON, field `secondLook`) so that a
// reopened panel shows them again; being read back from disk, they are checked before use.
import type { DoubtfulLabel, DoubtsReport, LabelNextReport, LabelSuggestion } from '../engine/secondLook/reportTypes';

/** Most items kept per queue: the panel lists them all, and each snapshot carries them. */
export const secondLookItemCap = 500;

export interface SecondLookQueues {
  /** When the reports were computed (ISO-8601). */
  computedAt: string;
  /** Null when the engine could not check the labels; `problems.doubts` says why. */
  doubts: DoubtsReport | null;
  labelNext: LabelNextReport | null;
  problems: { doubts?: string; labelNext?: string };
}

export interface SecondLookInputs {
  doubts: DoubtsReport | Error;
  labelNext: LabelNextReport | Error;
  computedAt: Date;
}

/** The queues as a session keeps them: each report capped at secondLookItemCap items, or the reason it is missing. */
export function secondLookQueuesOf(inputs: SecondLookInputs): SecondLookQueues {
  const problems: SecondLookQueues['problems'] = {};
  if (inputs.doubts instanceof Error) problems.doubts = inputs.doubts.message;
  if (inputs.labelNext instanceof Error) problems.labelNext = inputs.labelNext.message;
  return {
    computedAt: inputs.computedAt.toISOString(),
    doubts: inputs.doubts instanceof Error ? null : { ...inputs.doubts, doubts: inputs.doubts.doubts.slice(0, secondLookItemCap) },
    labelNext:
      inputs.labelNext instanceof Error
        ? null
        : { ...inputs.labelNext, suggestions: inputs.labelNext.suggestions.slice(0, secondLookItemCap) },
    problems,
  };
}

export function cloneQueues(queues: SecondLookQueues): SecondLookQueues {
  return JSON.parse(JSON.stringify(queues)) as SecondLookQueues;
}

// ---- shape checks for queues read back from a saved session ----

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}
const isText = (value: unknown): value is string => typeof value === 'string' && value.length > 0;
const isNumber = (value: unknown): value is number => typeof value === 'number' && Number.isFinite(value);
const isCount = (value: unknown): value is number => isNumber(value) && Number.isInteger(value) && value >= 0;
const isOutputs = (value: unknown): boolean =>
  Array.isArray(value) && value.every((o) => isRecord(o) && isText(o.className) && isNumber(o.output));
const isCounts = (value: unknown): boolean => isRecord(value) && Object.values(value).every(isCount);

function isDoubtfulLabel(value: unknown): value is DoubtfulLabel {
  return (
    isRecord(value) &&
    isCount(value.rank) &&
    isText(value.node) &&
    isText(value.slice) &&
    isText(value.curatedLabel) &&
    isText(value.suggestedLabel) &&
    isNumber(value.score) &&
    isNumber(value.selfConfidenceMargin) &&
    (value.neighbourDisagreement === null || isNumber(value.neighbourDisagreement)) &&
    isOutputs(value.outputs) &&
    isCounts(value.neighbourLabels) &&
    isCount(value.unlabelledNeighbours) &&
    typeof value.confidentLearning === 'boolean'
  );
}

function isLabelSuggestion(value: unknown): value is LabelSuggestion {
  return (
    isRecord(value) &&
    isCount(value.rank) &&
    isText(value.node) &&
    isText(value.slice) &&
    isNumber(value.usefulness) &&
    isNumber(value.uncertainty) &&
    isCount(value.unlabelledNeighbours) &&
    isCounts(value.neighbourLabels) &&
    isText(value.predictedLabel) &&
    isOutputs(value.outputs)
  );
}

function doubtsProblem(value: unknown): string | null {
  if (value === null) return null;
  if (!isRecord(value) || value.format !== 'graph-curator-doubts') return 'doubts is not a doubts report';
  if (!isText(value.slice) || !isCount(value.labelsChecked) || !isRecord(value.windowSlices)) return 'doubts lacks its slice or counts';
  if (!Array.isArray(value.doubts) || value.doubts.length > secondLookItemCap) return 'doubts has no list of doubtful labels';
  const bad = value.doubts.findIndex((entry) => !isDoubtfulLabel(entry));
  return bad >= 0 ? `doubtful label ${bad + 1} is malformed` : null;
}

function labelNextProblem(value: unknown): string | null {
  if (value === null) return null;
  if (!isRecord(value) || value.format !== 'graph-curator-label-next') return 'labelNext is not a label-next report';
  if (!isText(value.slice) || !isCount(value.unlabelledInSlice)) return 'labelNext lacks its slice or counts';
  if (!Array.isArray(value.suggestions) || value.suggestions.length > secondLookItemCap) return 'labelNext has no list of suggestions';
  const bad = value.suggestions.findIndex((entry) => !isLabelSuggestion(entry));
  return bad >= 0 ? `suggestion ${bad + 1} is malformed` : null;
}

/** Why `value` is not a SecondLookQueues, or null when it is one. */
export function secondLookQueuesProblem(value: unknown): string | null {
  if (!isRecord(value)) return 'is not an object';
  if (typeof value.computedAt !== 'string' || Number.isNaN(Date.parse(value.computedAt))) return 'has no ISO-8601 computedAt time';
  if (!isRecord(value.problems) || !Object.values(value.problems).every((p) => typeof p === 'string')) return 'has malformed problems';
  return doubtsProblem(value.doubts) ?? labelNextProblem(value.labelNext);
}
