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
  const nodeCount = rowCountOf(probabilities, classCount, 'docNovelty');
  checkThresholds(thresholds, classCount, 'docNovelty');
  const novelty = new Float32Array(nodeCount);
  for (let i = 0; i < nodeCount; i++) {
    const base = i * classCount;
    let ratio = -Infinity;
    for (let c = 0; c < classCount; c++) {
      // Division rather than multiplication by the inverse keeps p < t ⇔ p / t < 1 exact.
      const r = probabilities[base + c] / thresholds[c];
      if (r > ratio) ratio = r;
    }
    novelty[i] = Math.max(0, 1 - ratio);
  }
  return novelty;
}

/**
 * The signed margin the pipeline smooths: min_c (logit t_c − logit p_c), in logit units. It is
 * > 0 exactly when every p_c < t_c (DOC rejects the node), and negative for accepted nodes by as
 * much as their best class clears its threshold. Measured in probabilities (1 − max_c p_c/t_c)
 * an accepted node's margin could not fall below 1 − 1/t_c, a few thousandths when thresholds
 * sit near 1, while a rejected node's reaches 1: neighbour smoothing then turned known nodes
 * next to a few novel ones into rejections (on the 10,000-node benchmark graph 93% of
 * known-class nodes were rejected). In logit units both sides have room, so smoothing weighs
 * confidence on either side alike. Outputs of exactly 0 or 1 (float32 sigmoid saturation) and
 * thresholds of 1 are moved 2⁻²⁵ inwards, which keeps every comparison p < t as it was.
 */
export function docMargin(probabilities: Float32Array, classCount: number, thresholds: Float32Array): Float32Array {
  const nodeCount = rowCountOf(probabilities, classCount, 'docMargin');
  checkThresholds(thresholds, classCount, 'docMargin');
  const thresholdLogits = Float64Array.from(thresholds, logitOf);
  const margin = new Float32Array(nodeCount);
  for (let i = 0; i < nodeCount; i++) {
    const base = i * classCount;
    let smallest = Infinity;
    for (let c = 0; c < classCount; c++) {
      const gap = thresholdLogits[c] - logitOf(probabilities[base + c]);
      if (gap < smallest) smallest = gap;
    }
    margin[i] = smallest;
  }
  return margin;
}

/** Below the gap between 1 and the largest float32 under 1 (2⁻²⁴), so distinct float32 values keep their order. */
const SATURATION_NUDGE = 2 ** -25;

function logitOf(p: number): number {
  const q = p >= 1 ? 1 - SATURATION_NUDGE : p <= 0 ? SATURATION_NUDGE : p;
  return Math.log(q / (1 - q));
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
