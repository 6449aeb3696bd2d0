// The apply path in one import, for the CLI and the VS Code host (which shows plan.labelsFile /
// plan.classesFile as a preview diff, then calls applyPlan, then commits).
export type { Decision, DecisionKind, DecisionsFile } from './types';
export {
  readDecisionsFile,
  parseDecisionsText,
  decisionsShapeProblems,
  InvalidDecisionsError,
  DECISION_KINDS,
  type DecisionsRead,
  type DecisionLocator,
} from './decisionsFile';
export {
  planApply,
  type ApplyPlan,
  type PlanOptions,
  type LabelChange,
  type ClassCount,
  type PlannedFile,
  type DecisionOutcome,
} from './plan';
export { applyPlan, APPLY_STEPS, type ApplyStep, type ApplyHooks, type ApplyOptions, type ApplyResult } from './apply';
export {
  recoverInterruptedApply,
  readAppliedBatches,
  type RecoveryReport,
  type BatchRecovery,
  type RecoveryOutcome,
  type RecoveryOptions,
  type FileState,
} from './recover';
export { effectiveEntries, type AppliedBatch, type BatchBegin, type BatchEnd, type BatchState, type BatchLogRead } from './batchLog';
export { ConflictError, InterruptedApplyError, type FileConflict } from './applyErrors';
export { formatPlanSummary, labelCommitMessage } from './summary';
