// The settings of one scoring run. Stored with its results so every label change can name the
// exact settings that suggested it (settingsHash).
import { createHash } from 'node:crypto';
import type { ModelKind, ModelSettings } from '../models/types';

export type NoveltyMethod = 'doc' | 'msp' | 'energy';

export interface RunSettings {
  model: ModelKind;
  /** Slices of history before the scored slice whose labels are used; 'all' = every earlier slice. */
  historyWindow: number | 'all';
  /** DOC threshold width: threshold = max(0.5, 1 − alpha·σ). */
  alpha: number;
  /**
   * Folds of cross-fitting for the DOC thresholds: the Gaussian is fitted on out-of-fold outputs
   * of the training nodes (k extra trainings). 0 fits on the training outputs themselves.
   */
  thresholdFolds: number;
  /** Scale of the Gaussian fit: 'std' (population standard deviation) or 'mad' (robust: 1.4826 · median absolute deviation). */
  thresholdScale: 'std' | 'mad';
  /** Neighbour smoothing weight (0 turns smoothing off) and number of rounds. */
  smoothingWeight: number;
  smoothingRounds: number;
  noveltyMethod: NoveltyMethod;
  /** When set, reject this fraction of the slice's nodes with the highest novelty instead of the DOC rule. */
  rejectQuantile: number | null;
  /** Energy temperature. */
  temperature: number;
  /** Fraction of the window's labelled nodes used for training (seeded choice). */
  labelRate: number;
  warmStart: boolean;
  /**
   * Training steps (Adam updates) per model: full-batch epochs when the training rows fit in one
   * batch of batchRows, otherwise one mini-batch per step (mlp and sign only).
   */
  epochs: number;
  /** Rows of a training mini-batch for mlp/sign (0 = always full batch); gcn/sage train full batch. */
  batchRows: number;
  hiddenUnits: number;
  learningRate: number;
  seed: number;
}

export const defaultRunSettings: RunSettings = {
  model: 'sign',
  historyWindow: 4,
  alpha: 3,
  thresholdFolds: 3,
  thresholdScale: 'mad',
  smoothingWeight: 0.5,
  smoothingRounds: 2,
  noveltyMethod: 'doc',
  rejectQuantile: null,
  temperature: 1,
  labelRate: 1,
  warmStart: false,
  epochs: 200,
  batchRows: 8192,
  hiddenUnits: 64,
  learningRate: 0.01,
  seed: 7,
};

/** Keys sorted so that the same settings always hash the same. */
export function settingsHash(settings: RunSettings): string {
  const sorted = Object.fromEntries(Object.entries(settings).sort(([a], [b]) => a.localeCompare(b)));
  return createHash('sha256').update(JSON.stringify(sorted)).digest('hex').slice(0, 16);
}

export function describeWindow(window: number | 'all'): string {
  return window === 'all' ? 'all earlier slices' : `${window} earlier slice${window === 1 ? '' : 's'}`;
}

export function modelSettingsOf(settings: RunSettings): ModelSettings {
  return {
    kind: settings.model,
    hiddenUnits: settings.hiddenUnits,
    epochs: settings.epochs,
    batchRows: settings.batchRows,
    learningRate: settings.learningRate,
    weightDecay: 5e-4,
    dropout: 0.5,
    seed: settings.seed,
    propagationSteps: 2,
  };
}
