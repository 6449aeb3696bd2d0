// Threshold previews for a saved run whose fit is no longer in this worker's memory (a window
// reload, a restarted worker): from the fit saved beside the run (threshold-fit.json).
import type { Dataset } from '../dataset/types';
import { readThresholdFit } from '../pipeline/thresholdFitFile';
import { createThresholdPreviewer, thresholdPreviewInputOf, type ThresholdPreviewer } from '../../review/thresholdPreview';
import type { RunForReview } from './runForReview';

/**
 * No previewer when the run has no saved fit (a run saved before runs kept it), or one that is
 * damaged or no longer fits the dataset: `problem` then says which file and why, and the panel
 * says to score the slice again.
 */
export async function savedPreviewerOf(
  dataset: Dataset,
  run: RunForReview,
): Promise<{ previewer: ThresholdPreviewer | null; problem?: string }> {
  try {
    const saved = await readThresholdFit(run.runFolder, dataset);
    if (!saved) return { previewer: null };
    return { previewer: createThresholdPreviewer(thresholdPreviewInputOf(dataset, saved.fit, saved, run.candidates)) };
  } catch (error) {
    return { previewer: null, problem: (error as Error).message };
  }
}
