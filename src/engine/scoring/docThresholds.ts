// DOC-style open-set rejection over one-vs-rest sigmoid outputs. A class's training nodes should
// score near 1; mirroring their scores around 1 gives a symmetric sample whose spread says how
// far below 1 a genuine member may still fall. Definitions match the reference pipeline
// (shared/reference/torch_pipeline.py): population standard deviation, threshold floor 0.5,
// novelty 1 − min(1, max_c p_c / t_c).
import { rowCountOf } from './rowShape';

export const DEFAULT_DOC_ALPHA = 3;

/** Threshold of a class that has no training nodes (the reference's sd = 0.5 gives max(0.5, 1 − 1.5) = 0.5). */
export const DOC_THRESHOLD_FLOOR = 0.5;

/**
 * Per-class thresholds. For class c, p = the sigmoid outputs p[node, c] of its training nodes;
 * σ = population std of {p} ∪ {2 − p}, whose mean is exactly 1, so σ² = mean((1 − p)²);
 * threshold = max(0.5, 1 − α·σ). A class with no training nodes gets 0.5.
 * probabilities: row-major nodes × classCount; trainNodes[k] has class trainClasses[k].
 */
export function docThresholds(
  probabilities: Float32Array,
  classCount: number,
  trainNodes: Int32Array,
  trainClasses: Int32Array,
  alpha: number = DEFAULT_DOC_ALPHA,
): Float32Array {
  const gaps = gapsFromOne(probabilities, classCount, trainNodes, trainClasses, alpha, 'docThresholds');
  // σ² = mean((1 − p)²) because the mirrored sample's mean is exactly 1.
  return thresholdsFromSpread(gaps, alpha, (g) => Math.sqrt(g.reduce((sum, d) => sum + d * d, 0) / g.length));
}

/** Scale factor that makes the median absolute deviation a consistent estimate of a Gaussian σ (1/Φ⁻¹(3/4)). */
export const MAD_TO_SIGMA = 1.4826;

/**
 * The same Gaussian fit with a robust scale: σ = 1.4826 · median(|1 − p|) over the mirrored
 * sample (mirroring leaves each absolute deviation from 1 unchanged). Used on out-of-fold
 * outputs, where a few members that any model would miss (a report written in another class's
 * words) would otherwise inflate σ until every threshold sits at the 0.5 floor.
 */
export function docThresholdsRobust(
  probabilities: Float32Array,
  classCount: number,
  trainNodes: Int32Array,
  trainClasses: Int32Array,
  alpha: number = DEFAULT_DOC_ALPHA,
): Float32Array {
  const gaps = gapsFromOne(probabilities, classCount, trainNodes, trainClasses, alpha, 'docThresholdsRobust');
  return thresholdsFromSpread(gaps, alpha, (g) => {
    const sorted = g.sort((x, y) => x - y);
    const mid = sorted.length >> 1;
    return MAD_TO_SIGMA * (sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2);
  });
}

/** |1 − p| of each training node's output for its own class, grouped by class, after checking the inputs. */
function gapsFromOne(
  probabilities: Float32Array,
  classCount: number,
  trainNodes: Int32Array,
  trainClasses: Int32Array,
  alpha: number,
  name: string,
): number[][] {
  const nodeCount = rowCountOf(probabilities, classCount, name);
  if (trainNodes.length !== trainClasses.length) {
    throw new RangeError(`${name}: ${trainNodes.length} training nodes but ${trainClasses.length} training classes`);
  }
  if (!Number.isFinite(alpha) || alpha < 0) throw new RangeError(`${name}: alpha must be a finite number ≥ 0, got ${alpha}`);
  const gaps: number[][] = Array.from({ length: classCount }, () => []);
  for (let k = 0; k < trainNodes.length; k++) {
    const node = trainNodes[k];
    const cls = trainClasses[k];
    if (node < 0 || node >= nodeCount) throw new RangeError(`${name}: training node ${node} (entry ${k}) is outside 0..${nodeCount - 1}`);
    if (cls < 0 || cls >= classCount) throw new RangeError(`${name}: training class ${cls} (entry ${k}) is outside 0..${classCount - 1}`);
    const p = probabilities[node * classCount + cls];
    if (!Number.isFinite(p)) throw new RangeError(`${name}: probability of training node ${node}, class ${cls} is ${p}`);
    gaps[cls].push(Math.abs(1 - p));
  }
  return gaps;
}

/** threshold = max(0.5, 1 − α·σ) per class; a class with no training nodes gets the floor. */
function thresholdsFromSpread(gaps: number[][], alpha: number, sigmaOf: (classGaps: number[]) => number): Float32Array {
  return Float32Array.from(gaps, (g) => (g.length === 0 ? DOC_THRESHOLD_FLOOR : Math.max(DOC_THRESHOLD_FLOOR, 1 - alpha * sigmaOf(g))));
}

function checkThresholds(thresholds: Float32Array, classCount: number, name: string): void {
  if (thresholds.length !== classCount) throw new RangeError(`${name}: ${thresholds.length} thresholds for ${classCount} classes`);
  for (let c = 0; c < classCount; c++) {
    if (!(thresholds[c] > 0)) throw new RangeError(`${name}: threshold of class ${c} must be > 0, got ${thresholds[c]}`);
  }
}

/**
 * Novelty of each node: 1 − min(1, max_c p_c / t_c), in [0, 1]. It is > 0 exactly when every
 * p_c < t_c, i.e. when DOC rejects the node; larger means further below every threshold.
 */
export function docNovelty(probabilities: Float32Array, classCount: number, thresholds: Float32Array): Float32Array {
  const margin = docMargin(probabilities, classCount, thresholds);
  for (let i = 0; i < margin.length; i++) if (margin[i] < 0) margin[i] = 0;
  return margin;
}

/**
 * The same score without the clamp: 1 − max_c p_c / t_c, negative for accepted nodes. Smoothing
 * this margin (rather than the clamped novelty) keeps the rule "rejected ⇔ score > 0" meaningful
 * after smoothing: a clamped score would turn every node with one rejected neighbour positive.
 */
export function docMargin(probabilities: Float32Array, classCount: number, thresholds: Float32Array): Float32Array {
  const nodeCount = rowCountOf(probabilities, classCount, 'docMargin');
  checkThresholds(thresholds, classCount, 'docMargin');
  const margin = new Float32Array(nodeCount);
  for (let i = 0; i < nodeCount; i++) {
    const base = i * classCount;
    let ratio = -Infinity;
    for (let c = 0; c < classCount; c++) {
      // Division rather than multiplication by the inverse keeps p < t ⇔ p / t < 1 exact.
      const r = probabilities[base + c] / thresholds[c];
      if (r > ratio) ratio = r;
    }
    margin[i] = 1 - ratio;
  }
  return margin;
}

/** DOC's rejection rule: 1 where every class probability is below its threshold. */
export function docRejected(probabilities: Float32Array, classCount: number, thresholds: Float32Array): Uint8Array {
  const nodeCount = rowCountOf(probabilities, classCount, 'docRejected');
  checkThresholds(thresholds, classCount, 'docRejected');
  const rejected = new Uint8Array(nodeCount);
  for (let i = 0; i < nodeCount; i++) {
    const base = i * classCount;
    let allBelow = 1;
    for (let c = 0; c < classCount; c++) {
      if (!(probabilities[base + c] < thresholds[c])) {
        allBelow = 0;
        break;
      }
    }
    rejected[i] = allBelow;
  }
  return rejected;
}
