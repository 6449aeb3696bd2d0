// ACC, BWT and FWT of an accuracy matrix with undefined entries (slices with nothing to test):
// the summaries read a complete square, so first keep the slices whose rows and columns are all
// defined among themselves (the same rule evaluateSlices uses for its ACC and BWT).
import { averageAccuracy, backwardTransfer, forwardTransfer } from '../metrics/continual';
import type { ContinualSummary } from './reportTypes';

/** Indices of the slices kept: defined diagonal, then drop any slice with an undefined entry against the kept ones. */
export function completeSliceSet(matrix: (number | null)[][]): number[] {
  let keep = matrix.map((_, i) => i).filter((i) => matrix[i][i] !== null);
  for (;;) {
    const next = keep.filter((i) => keep.every((j) => matrix[i][j] !== null && matrix[j][i] !== null));
    if (next.length === keep.length) return keep;
    keep = next;
  }
}

/**
 * untrainedAccuracy[i] is b̄ of the forward-transfer definition: accuracy on slice i of the
 * untrained model. FWT is null when a kept slice after the first has no such accuracy.
 */
export function continualSummary(matrix: (number | null)[][], sliceKeys: string[], untrainedAccuracy: (number | null)[]): ContinualSummary {
  const keep = completeSliceSet(matrix);
  const empty: ContinualSummary = {
    averageAccuracy: null,
    backwardTransfer: null,
    forwardTransfer: null,
    slicesUsed: keep.map((i) => sliceKeys[i]),
    untrainedAccuracy,
  };
  if (keep.length < 2) return empty;
  const square = keep.map((i) => keep.map((j) => matrix[i][j] as number));
  const baseline = keep.map((i) => untrainedAccuracy[i]);
  const baselineComplete = baseline.every((b, k) => k === 0 || b !== null);
  return {
    ...empty,
    averageAccuracy: averageAccuracy(square),
    backwardTransfer: backwardTransfer(square),
    forwardTransfer: baselineComplete
      ? forwardTransfer(
          square,
          baseline.map((b) => b ?? NaN),
        )
      : null,
  };
}
