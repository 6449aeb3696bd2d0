// Which labelled nodes train the model for a slice: those of the history window, optionally
// thinned to a label rate. The class set of a model only grows along a warm-started chain, so a
// warm start can keep the previous output rows and append rows for classes that appeared since.
import type { Dataset } from '../dataset/types';
import { SeededRandom } from '../util/random';

export interface WindowRequest {
  /** Index of the slice being scored. */
  slice: number;
  historyWindow: number | 'all';
  /** Whether the scored slice's own labels are used (true when scoring; false when they are the test set). */
  includeCurrentSlice: boolean;
  labelRate: number;
  seed: number;
}

export interface TrainingSelection {
  /** Global node indices of the training nodes, ascending. */
  nodes: Int32Array;
  /** Global class index (into dataset.classNames) of each training node. */
  globalClasses: Int32Array;
}

export function firstWindowSlice(slice: number, historyWindow: number | 'all'): number {
  return historyWindow === 'all' ? 0 : Math.max(0, slice - historyWindow);
}

export function selectTrainingNodes(dataset: Dataset, labels: Int32Array, request: WindowRequest): TrainingSelection {
  const first = firstWindowSlice(request.slice, request.historyWindow);
  const last = request.includeCurrentSlice ? request.slice : request.slice - 1;
  const chosen: number[] = [];
  for (let node = 0; node < labels.length; node++) {
    const s = dataset.nodeSlice[node];
    if (labels[node] >= 0 && s >= first && s <= last) chosen.push(node);
  }
  let nodes = chosen;
  if (request.labelRate < 1) {
    const random = new SeededRandom(request.seed ^ 0x51a7e);
    const shuffled = random.shuffle(chosen.slice());
    nodes = shuffled.slice(0, Math.max(1, Math.round(shuffled.length * request.labelRate))).sort((a, b) => a - b);
  }
  const out = Int32Array.from(nodes);
  const globalClasses = new Int32Array(out.length);
  for (let i = 0; i < out.length; i++) globalClasses[i] = labels[out[i]];
  return { nodes: out, globalClasses };
}

/**
 * The model's classes as global class indices: the previous model's classes in their order
 * (kept rows), then classes present in the training selection that it lacked, ascending.
 */
export function modelClassSet(selection: TrainingSelection, previous: Int32Array | null): Int32Array {
  const result: number[] = previous ? Array.from(previous) : [];
  const known = new Set(result);
  const present = Array.from(new Set(selection.globalClasses)).sort((a, b) => a - b);
  for (const c of present) if (!known.has(c)) result.push(c);
  return Int32Array.from(result);
}
