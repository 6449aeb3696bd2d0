// Scoring one slice as a curator asks for it: fit on the history window (or along the warm-start
// chain up to the slice), then extract the slice's per-node results.
import type { Dataset } from '../dataset/types';
import type { CancelSignal, ProgressSink } from '../util/progress';
import { throwIfCancelled } from '../util/progress';
import { firstWindowSlice } from './trainingWindow';
import { fitSlice, NoTrainingLabelsError, type PrefixFit } from './modelOnPrefix';
import type { RunSettings } from './runSettings';
import { sliceScoresOf, type SliceScores } from './sliceScores';

export interface ScoreOptions {
  progress?: ProgressSink;
  cancel?: CancelSignal;
}

export interface ScoredSlice {
  scores: SliceScores;
  fit: PrefixFit;
}

export async function scoreSlice(dataset: Dataset, settings: RunSettings, slice: number, options: ScoreOptions = {}): Promise<ScoredSlice> {
  let previous: PrefixFit | null = null;
  if (settings.warmStart) {
    // The chain starts where the window of the first slice with labels would start.
    for (let s = firstWindowSlice(slice, 'all'); s < slice; s++) {
      throwIfCancelled(options.cancel);
      try {
        previous = await fitSlice(dataset, settings, s, {
          labels: dataset.labels,
          includeCurrentSlice: true,
          previous: previous ? { weights: previous.weights, modelClasses: previous.modelClasses } : null,
          cancel: options.cancel,
        });
      } catch (error) {
        if (!(error instanceof NoTrainingLabelsError)) throw error;
      }
    }
  }
  const fit = await fitSlice(dataset, settings, slice, {
    labels: dataset.labels,
    includeCurrentSlice: true,
    previous: previous ? { weights: previous.weights, modelClasses: previous.modelClasses } : null,
    progress: options.progress,
    cancel: options.cancel,
  });
  return { scores: sliceScoresOf(dataset, fit, settings), fit };
}
