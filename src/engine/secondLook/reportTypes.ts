// The JSON the second-look commands write and the review panel reads (docs/second-look.md).
// Plain objects, node and class references by id and name, so a report can be sent to the
// webview or saved as is. Acting on an entry is a decision ('move-members' with the suggested or
// another class, or 'keep-label'), recorded and applied like every other label change.

export interface ClassOutput {
  className: string;
  output: number;
}

export interface DoubtfulLabel {
  /** 1 = most doubtful. */
  rank: number;
  node: string;
  /** Slice key of the node. */
  slice: string;
  curatedLabel: string;
  /** The other class with the most evidence (outputs and neighbours mixed, see docs). */
  suggestedLabel: string;
  /** Disagreement score in [0, 1]; above 0.5 the evidence leans away from the curated label. */
  score: number;
  /** Normalised out-of-fold output of the curated class minus the highest other one, in [−1, 1]. */
  selfConfidenceMargin: number;
  /** Share of labelled neighbours whose label differs from the curated one; null when none is labelled. */
  neighbourDisagreement: number | null;
  /** The three highest out-of-fold sigmoid outputs, best first. */
  outputs: ClassOutput[];
  /** Labelled neighbours by class, most first. */
  neighbourLabels: Record<string, number>;
  unlabelledNeighbours: number;
  /** Counted off the diagonal of the confident joint. */
  confidentLearning: boolean;
  /** The class the confident joint counts the node under, or null when no output reaches its threshold. */
  confidentClass: string | null;
}

export interface DoubtsReport {
  format: 'graph-curator-doubts';
  version: 1;
  dataset: string;
  /** The scored slice; the checked labels are those of its training window. */
  slice: string;
  windowSlices: { first: string; last: string };
  settingsHash: string;
  folds: number;
  neighbourWeight: number;
  labelsChecked: number;
  /** Classes of the model, in the order of selfConfidence and the joint's rows and columns. */
  classes: string[];
  /** Average self-confidence (normalised outputs) of each class: its confident-learning threshold. */
  selfConfidence: (number | null)[];
  /** confidentJoint[given][confident], counts of nodes. */
  confidentJoint: number[][];
  confidentLearningFlags: number;
  /** sha256 of labels.csv and classes.json as read, for a decisions file's baseHashes. */
  baseHashes: Record<string, string>;
  /** Ranked by score, highest first: the doubtful labels (or every checked label when asked). */
  doubts: DoubtfulLabel[];
}

export interface LabelSuggestion {
  rank: number;
  node: string;
  slice: string;
  /** uncertainty × (1 + ln(1 + unlabelledNeighbours)). */
  usefulness: number;
  /** 1 − (top normalised output − second), in [0, 1]. */
  uncertainty: number;
  unlabelledNeighbours: number;
  neighbourLabels: Record<string, number>;
  /** The class with the highest output: a starting point, not a label. */
  predictedLabel: string;
  outputs: ClassOutput[];
}

export interface LabelNextReport {
  format: 'graph-curator-label-next';
  version: 1;
  dataset: string;
  slice: string;
  settingsHash: string;
  trainingNodes: number;
  /** Unlabelled nodes of the slice, all of which were ranked. */
  unlabelledInSlice: number;
  classes: string[];
  baseHashes: Record<string, string>;
  suggestions: LabelSuggestion[];
}
