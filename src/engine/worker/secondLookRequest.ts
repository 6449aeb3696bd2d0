// The `secondLook` request: what `graph-curator doubts` and `graph-curator suggest` compute, for
// the run an open review is of (its dataset folder, slice and settings), put into the review's
// session as two more queues. The labels are read afresh, so labels applied since the run are
// the ones checked. A queue the engine cannot build (too few labels, one class only) carries the
// reason instead; cancelling stops both.
import { loadDataset } from '../dataset/load';
import { defaultDoubtFolds, findDoubtfulLabels } from '../secondLook/doubts';
import { defaultSuggestionCount, suggestLabelNext } from '../secondLook/labelNext';
import { CancelledError, throwIfCancelled, type ProgressSink } from '../util/progress';
import type { SecondLookOutcome, SecondLookParams } from '../../protocol/worker';
import { secondLookQueuesOf } from '../../review/secondLookQueues';
import type { RequestContext } from './requestHandlers';
import type { ReviewRegistry } from './reviewRegistry';
import { sliceIndexOf } from './scoreRequest';

const plural = (count: number, word: string) => `${count} ${word}${count === 1 ? '' : 's'}`;

/** Stage names say which of the two computations a progress message belongs to. */
function stagePrefixed(progress: ProgressSink, prefix: string): ProgressSink {
  return { report: (stage, fraction) => progress.report(`${prefix}: ${stage}`, fraction) };
}

/** The report, or the error that explains why there is none; cancellation is not such an error. */
async function orProblem<T>(compute: () => Promise<T>): Promise<T | Error> {
  try {
    return await compute();
  } catch (error) {
    if (error instanceof CancelledError) throw error;
    return error instanceof Error ? error : new Error(String(error));
  }
}

export async function secondLookForReview(
  reviews: ReviewRegistry,
  params: SecondLookParams,
  { progress, cancel }: RequestContext,
): Promise<SecondLookOutcome> {
  const { folder, record } = reviews.runOf(params.reviewId);
  const dataset = await loadDataset(folder, { progress, cancel });
  throwIfCancelled(cancel);
  if (dataset.manifest.name !== record.dataset)
    throw new Error(`${folder} now holds dataset "${dataset.manifest.name}", not "${record.dataset}" of run ${record.runId}`);
  const slice = sliceIndexOf(dataset, record.slice);
  const doubts = await orProblem(() =>
    findDoubtfulLabels(dataset, record.settings, {
      slice,
      folds: params.folds ?? defaultDoubtFolds,
      progress: stagePrefixed(progress, 'doubtful labels'),
      cancel,
    }),
  );
  throwIfCancelled(cancel);
  const labelNext = await orProblem(() =>
    suggestLabelNext(dataset, record.settings, {
      slice,
      count: params.count ?? defaultSuggestionCount,
      progress: stagePrefixed(progress, 'label next'),
      cancel,
    }),
  );
  throwIfCancelled(cancel);
  const queues = secondLookQueuesOf({ doubts, labelNext, computedAt: new Date() });
  const outcome = await reviews.attachSecondLook(params.reviewId, queues);
  const doubtful = queues.doubts?.doubts.length ?? 0;
  const suggested = queues.labelNext?.suggestions.length ?? 0;
  const parts = [
    queues.doubts
      ? `${plural(doubtful, 'doubtful label')} of ${queues.doubts.labelsChecked} checked`
      : `labels not checked: ${queues.problems.doubts}`,
    queues.labelNext
      ? `${plural(suggested, 'suggestion')} among ${plural(queues.labelNext.unlabelledInSlice, 'unlabelled node')} of ${queues.labelNext.slice}`
      : `no suggestions: ${queues.problems.labelNext}`,
  ];
  return { ...outcome, summary: `${parts.join('; ')}.`, doubtful, suggested };
}
