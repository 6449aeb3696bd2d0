// SIGN/SGC-style precomputation: [X, ÂX, Â²X, …] with the symmetric normalisation and
// self-loops. Depends only on the graph and the features, so a caller can compute it once and
// reuse it across settings and seeds.
import { symmetricNormalized } from '../graph/normalize';
import { spmm } from '../graph/spmm';
import type { GraphInputs, PropagatedFeatures } from './types';

export function precomputePropagation(inputs: GraphInputs, steps: number): PropagatedFeatures {
  const { nodeCount, features, featureDim } = inputs;
  if (!Number.isInteger(steps) || steps < 0) throw new Error(`propagation steps must be a whole number ≥ 0, got ${steps}`);
  if (features.length !== nodeCount * featureDim) {
    throw new Error(`features hold ${features.length} values, expected ${nodeCount} nodes × ${featureDim} = ${nodeCount * featureDim}`);
  }
  const blocks: Float32Array[] = [features];
  if (steps > 0) {
    const normalized = symmetricNormalized(inputs.adjacency);
    for (let s = 1; s <= steps; s++) blocks.push(spmm(normalized, blocks[s - 1], featureDim));
  }
  const dim = featureDim * (steps + 1);
  const data = new Float32Array(nodeCount * dim);
  for (let node = 0; node < nodeCount; node++) {
    for (let s = 0; s <= steps; s++) {
      data.set(blocks[s].subarray(node * featureDim, (node + 1) * featureDim), node * dim + s * featureDim);
    }
  }
  return { steps, data, dim };
}
