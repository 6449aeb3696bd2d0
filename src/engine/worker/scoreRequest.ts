// The `score` request: what `graph-curator score` does, inside the worker: load, fit and score a
// slice, group its rejected nodes into candidates, save the run.
import * as path from 'node:path';
import type { Dataset } from '../dataset/types';
import { loadDataset } from '../dataset/load';
import { discoverForFit } from '../pipeline/discoverSlice';
import { newRunId, saveRun } from '../pipeline/runStore';
import { scoreSlice } from '../pipeline/scoreSlice';
import { throwIfCancelled, type CancelSignal, type ProgressSink } from '../util/progress';
import type { ScoreOutcome, ScoreParams } from '../../protocol/worker';
import type { RememberedFit } from './reviewRegistry';

/** Index of the slice with key `key`, or the newest slice. */
export function sliceIndexOf(dataset: Dataset, key: string | undefined): number {
  if (dataset.slices.length === 0) throw new Error(`dataset "${dataset.manifest.name}" has no slices (no nodes)`);
  if (key === undefined) return dataset.slices.length - 1;
  const slice = dataset.slices.find((s) => s.key === key);
  if (!slice) throw new Error(`"${key}" is not a slice of dataset "${dataset.manifest.name}"`);
  return slice.index;
}

export async function scoreAndSave(
  params: ScoreParams,
  context: { progress: ProgressSink; cancel: CancelSignal },
  remember?: (fit: RememberedFit) => void,
): Promise<ScoreOutcome> {
  const { progress, cancel } = context;
  const dataset = await loadDataset(params.folder, { progress, cancel });
  throwIfCancelled(cancel);
  const slice = sliceIndexOf(dataset, params.slice);
  const { scores, fit } = await scoreSlice(dataset, params.settings, slice, { progress, cancel });
  throwIfCancelled(cancel);
  const runId = newRunId(params.settings, scores.sliceKey);
  let candidates;
  if (params.discover !== false) {
    progress.report('discover', 0);
    candidates = await discoverForFit(dataset, fit, scores, params.settings, runId);
    progress.report('discover', 1);
    throwIfCancelled(cancel);
  }
  // From here on the run is written whole: saveRun writes run.json last, so a run folder is either
  // complete or ignored by every reader.
  progress.report('save', 0);
  const { folder: runFolder, record } = await saveRun(dataset, scores, params.settings, { runId, candidates, previewFit: fit });
  progress.report('save', 1);
  remember?.({ folder: dataset.folder, runId, dataset, fit, settings: params.settings });
  return {
    runId,
    runFolder,
    record,
    candidatesFile: record.files.candidates ? path.join(runFolder, record.files.candidates) : null,
    candidateCount: candidates?.candidates.length ?? 0,
  };
}
