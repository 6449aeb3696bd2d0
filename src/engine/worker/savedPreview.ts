// Threshold previews for a saved run whose fit is no longer in this worker's memory (a window
// reload, a restarted worker): from the fit saved beside the run (threshold-fit.json).
import type { Dataset } from '../dataset/types';
import { readThresholdFit } from '../pipeline/thresholdFitFile';
import { createThresholdPreviewer, thresholdPreviewInputOf, type ThresholdPreviewer } from '../../review/thresholdPreview';
import type { RunForReview } from './runForReview';

/**
 * Null when the run has no saved fit, or one that no longer fits the dataset: the panel then says
 * to score the slice again, as it did before runs saved their fit.
 */
export async function savedPreviewerOf(dataset: Dataset, run: RunForReview): Promise<ThresholdPreviewer | null> {
  try {
    const saved = await readThresholdFit(run.runFolder, dataset);
    if (!saved) return null;
    return createThresholdPreviewer(thresholdPreviewInputOf(dataset, saved.fit, saved, run.candidates));
  } catch {
    return null;
  }
}
