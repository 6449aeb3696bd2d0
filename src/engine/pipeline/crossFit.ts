// Out-of-fold outputs of the training nodes: each node's output comes from a model that did not
// train on it. DOC thresholds fitted on these reflect how the model scores nodes it has not seen;
// fitted on the training outputs themselves they sit near 1 once a model memorises its few
// labelled nodes, and then most unseen nodes of known classes are rejected.
import { trainAndPredict } from '../models/train';
import type { GraphInputs, ModelSettings, PropagatedFeatures, TrainingSet } from '../models/types';
import { sigmoid } from '../scoring/sigmoid';
import type { CancelSignal, ProgressSink } from '../util/progress';
import { throwIfCancelled } from '../util/progress';
import { SeededRandom } from '../util/random';

/** Fold of each training node: stratified by class, seeded. */
export function stratifiedFolds(trainClass: Int32Array, folds: number, seed: number): Int32Array {
  const random = new SeededRandom(seed ^ 0xf01d5);
  const byClass = new Map<number, number[]>();
  trainClass.forEach((c, i) => {
    const list = byClass.get(c) ?? [];
    list.push(i);
    byClass.set(c, list);
  });
  const fold = new Int32Array(trainClass.length);
  let offset = 0;
  for (const c of Array.from(byClass.keys()).sort((a, b) => a - b)) {
    const members = random.shuffle(byClass.get(c) as number[]);
    // Continue the round-robin across classes so that small classes do not all land in fold 0.
    members.forEach((i, rank) => (fold[i] = (rank + offset) % folds));
    offset += members.length;
  }
  return fold;
}

export interface CrossFitRequest {
  inputs: GraphInputs;
  trainLocal: Int32Array;
  trainClass: Int32Array;
  classCount: number;
  settings: ModelSettings;
  folds: number;
  /**
   * Train only the models of the first foldModels folds (default: all). The rows of the other
   * folds are left unscored (NaN): on a large training set one held-out fold is already a big
   * enough sample to fit thresholds on, and every fold model costs a whole training.
   */
  foldModels?: number;
  precomputed?: PropagatedFeatures;
  progress?: ProgressSink;
  cancel?: CancelSignal;
  /** Called once per fold after its model is trained: lets a check see exactly what each fold trained on. */
  observeFold?: (fold: FoldObservation) => void;
}

export interface FoldObservation {
  fold: number;
  /** The training set the fold's model was given. */
  training: TrainingSet;
  /** Rows (indices into trainLocal) this fold's model scored. */
  heldOutRows: Int32Array;
  /** Their node indices in the inputs (trainLocal of those rows). */
  heldOutNodes: Int32Array;
  /** The fold model's logits for every node of the inputs. */
  logits: Float32Array;
}

/**
 * Held-out rows worth having for the threshold fit: beyond them, more fold models only refine
 * what is already well estimated (our choice: a few hundred members per class for a median
 * absolute deviation at ten classes or so).
 */
export const ENOUGH_HELD_OUT_ROWS = 2000;

/** Fold models needed for at least ENOUGH_HELD_OUT_ROWS held-out rows (all folds for small training sets). */
export function foldModelsFor(trainingRows: number, folds: number): number {
  return Math.min(folds, Math.max(1, Math.ceil(ENOUGH_HELD_OUT_ROWS / (trainingRows / folds))));
}

/**
 * trainCount × classCount sigmoid outputs, row i = training node i scored by the model of the
 * other folds (NaN for rows of folds beyond request.foldModels).
 */
export async function outOfFoldProbabilities(request: CrossFitRequest): Promise<Float32Array> {
  const { trainLocal, trainClass, classCount, folds } = request;
  const fold = stratifiedFolds(trainClass, folds, request.settings.seed);
  const result = new Float32Array(trainLocal.length * classCount).fill(Number.NaN);
  const foldModels = Math.min(folds, request.foldModels ?? folds);
  for (let f = 0; f < foldModels; f++) {
    throwIfCancelled(request.cancel);
    request.progress?.report('cross-fit', f / foldModels);
    const keep: number[] = [];
    const held: number[] = [];
    fold.forEach((k, i) => (k === f ? held : keep).push(i));
    if (held.length === 0 || keep.length === 0) continue;
    const training: TrainingSet = {
      nodeIndex: Int32Array.from(keep, (i) => trainLocal[i]),
      classIndex: Int32Array.from(keep, (i) => trainClass[i]),
      classCount,
    };
    const output = await trainAndPredict(
      request.inputs,
      training,
      { ...request.settings, seed: request.settings.seed + 101 * (f + 1) },
      { precomputed: request.precomputed, cancel: request.cancel },
    );
    request.observeFold?.({
      fold: f,
      training,
      heldOutRows: Int32Array.from(held),
      heldOutNodes: Int32Array.from(held, (i) => trainLocal[i]),
      logits: output.logits,
    });
    for (const i of held) {
      const node = trainLocal[i];
      result.set(sigmoid(output.logits.subarray(node * classCount, (node + 1) * classCount)), i * classCount);
    }
  }
  request.progress?.report('cross-fit', 1);
  return result;
}
