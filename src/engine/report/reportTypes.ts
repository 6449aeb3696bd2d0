// The data behind the quality-over-time report: one evaluation of the chosen settings (graph
// model beside the MLP baseline), warm against cold start, and two settings sweeps. Plain JSON,
// so it can be cached on disk, written with --json and rendered without the engine.
import type { EvaluationReport } from '../pipeline/evaluateSlices';
import type { RunSettings } from '../pipeline/runSettings';

/** Bump when the shape or the meaning of a cached report changes: old cache files are then ignored. */
export const REPORT_FORMAT_VERSION = 1;

export const HISTORY_WINDOW_SWEEP: readonly (number | 'all')[] = [1, 2, 3, 5, 'all'];
export const LABEL_RATE_SWEEP: readonly number[] = [0.1, 0.3, 0.5, 0.7, 0.9];

/** GEM-style summaries of an accuracy matrix, over the slices where the matrix is complete. */
export interface ContinualSummary {
  averageAccuracy: number | null;
  backwardTransfer: number | null;
  /** Mean over consecutive kept slices of R[i−1][i] minus the untrained model's accuracy on slice i. */
  forwardTransfer: number | null;
  /** Slices whose rows and columns of the matrix are all defined (the ones the summaries read). */
  slicesUsed: string[];
  /** Closed-set accuracy per slice of the model before any training (random initialisation, seeded). */
  untrainedAccuracy: (number | null)[];
}

export interface WarmColdRow {
  slice: string;
  warm: number | null;
  cold: number | null;
  /** warm − cold, null when either is undefined. */
  difference: number | null;
}

export interface WarmAgainstCold {
  graph: WarmColdRow[];
  baseline: WarmColdRow[];
  meanDifference: { graph: number | null; baseline: number | null };
}

export interface SweepSliceFigures {
  slice: string;
  accuracy: number | null;
  macroF1: number | null;
  trainingNodes: number;
  trainSeconds: number;
}

export interface SweepModelFigures {
  /** Mean over the sweep slices where the figure is defined. */
  meanAccuracy: number | null;
  meanMacroF1: number | null;
  /** Mean number of training nodes (replayed labelled nodes) per fitted slice. */
  meanTrainingNodes: number;
  /** Training time summed over the sweep slices. */
  trainSeconds: number;
  perSlice: SweepSliceFigures[];
}

export interface SweepPoint {
  setting: number | 'all';
  label: string;
  graph: SweepModelFigures;
  baseline: SweepModelFigures;
}

export interface SettingSweep {
  parameter: 'historyWindow' | 'labelRate';
  points: SweepPoint[];
}

/** What the sweeps actually ran, printed in the report so their cost trade-offs are visible. */
export interface SweepPlan {
  quick: boolean;
  slices: string[];
  epochs: number;
  /** Sweeps fit every slice from a fresh start, so each point depends on its own setting only. */
  warmStart: false;
  /** Cross-fitting only moves the DOC thresholds, which no sweep figure reads. */
  thresholdFolds: 0;
}

export interface QualityReport {
  formatVersion: number;
  createdAt: string;
  cacheKey: string;
  /** Wall-clock seconds the report took to compute (not to load from the cache). */
  computeSeconds: number;
  dataset: {
    name: string;
    folder: string;
    nodes: number;
    labelled: number;
    slices: { key: string; nodeCount: number }[];
    contentHashes: Record<string, string>;
  };
  reference: { source: string; sha256: string | null };
  settings: RunSettings;
  /** settingsHash(settings): the name label changes carry for the settings that suggested them. */
  settingsHash: string;
  evaluation: EvaluationReport;
  continual: { graph: ContinualSummary; baseline: ContinualSummary };
  warmAgainstCold: WarmAgainstCold;
  sweepPlan: SweepPlan;
  historySweep: SettingSweep;
  labelRateSweep: SettingSweep;
}
