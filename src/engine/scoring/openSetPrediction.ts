// The open-set label of each node: its best known class, or REJECTED when the scorer set it aside.
import { rowArgmax } from './sigmoid';

/** Predicted label of a node that fits no known class. */
export const REJECTED = -1;

/** Row argmax of `scores` (probabilities or logits), with REJECTED where rejected[i] is nonzero. */
export function openSetPredictions(scores: Float32Array, classCount: number, rejected: Uint8Array): Int32Array {
  const predicted = rowArgmax(scores, classCount);
  if (rejected.length !== predicted.length)
    throw new RangeError(`openSetPredictions: ${rejected.length} rejection flags for ${predicted.length} nodes`);
  for (let i = 0; i < predicted.length; i++) if (rejected[i]) predicted[i] = REJECTED;
  return predicted;
}
