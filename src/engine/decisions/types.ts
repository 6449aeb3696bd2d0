// Curator decisions: what the review panel records and `graph-curator apply` turns into file
// changes. Node and class references are by name/id string, never by dense index, so a decisions
// file stays valid when the dataset is reloaded.

interface DecisionBase {
  /** Unique within its file, e.g. "d-0007". */
  id: string;
  /** ISO-8601 time the curator made the decision. */
  madeAt: string;
  /** Free text the curator gave; written to label-log.jsonl as the reason. */
  note?: string;
}

/** Label the candidate's members with a new class, registered in classes.json. */
export interface NameNewClassDecision extends DecisionBase {
  kind: 'name-new-class';
  candidateId: string;
  members: string[];
  className: string;
  description: string;
}

/** Label the candidate's members with an existing class. */
export interface MergeIntoClassDecision extends DecisionBase {
  kind: 'merge-into-class';
  candidateId: string;
  members: string[];
  className: string;
}

/** Label chosen nodes with a class (existing, or new when `description` is given). */
export interface MoveMembersDecision extends DecisionBase {
  kind: 'move-members';
  members: string[];
  className: string;
  description?: string;
}

/** Retire a class into another: every node labelled `from` gets `into`; classes.json marks `from` merged. */
export interface MergeClassesDecision extends DecisionBase {
  kind: 'merge-classes';
  from: string;
  into: string;
}

/** Review-only decisions: they reshape the queue and are recorded, but change no label. */
export interface MergeCandidatesDecision extends DecisionBase {
  kind: 'merge-candidates';
  candidateIds: string[];
  resultId: string;
}
export interface SplitCandidateDecision extends DecisionBase {
  kind: 'split-candidate';
  candidateId: string;
  /** Member node ids of each part; each part becomes a candidate with id `${candidateId}.${k}`. */
  parts: string[][];
}
export interface DismissDecision extends DecisionBase {
  kind: 'dismiss';
  candidateId: string;
}
export interface SkipDecision extends DecisionBase {
  kind: 'skip';
  candidateId: string;
}
/** Second-look decisions on one existing label. */
export interface KeepLabelDecision extends DecisionBase {
  kind: 'keep-label';
  node: string;
}

export type Decision =
  | NameNewClassDecision
  | MergeIntoClassDecision
  | MoveMembersDecision
  | MergeClassesDecision
  | MergeCandidatesDecision
  | SplitCandidateDecision
  | DismissDecision
  | SkipDecision
  | KeepLabelDecision;

export type DecisionKind = Decision['kind'];

/** The decisions file the review panel exports and `graph-curator apply --decisions FILE` reads. */
export interface DecisionsFile {
  format: 'graph-curator-decisions';
  version: 1;
  /** dataset.json name. */
  dataset: string;
  /** The scoring run that suggested the candidates, and its settings hash. */
  runId: string | null;
  settingsHash: string | null;
  /** Slice key the new classes are introduced in. */
  slice: string;
  /** Content hashes (sha256 hex, by file name) of the label files as read when the run started. */
  baseHashes: Record<string, string>;
  decisions: Decision[];
}
