// SIGN/SGC-style precomputation: [X, ÂX, Â²X, …] with the symmetric normalisation and
// self-loops. Depends only on the graph and the features, so a caller can compute it once and
// reuse it across settings and seeds.
import type { CsrMatrix } from '../graph/csr';
import { symmetricNormalized } from '../graph/normalize';
import { SpmmPool } from '../graph/parallelSpmm';
import { simdAvailable } from '../simd/kernels';
import { spmm } from '../graph/spmm';
import { throwIfCancelled, type CancelSignal } from '../util/progress';
import type { GraphInputs, PropagatedFeatures } from './types';

/**
 * Multiply-adds (non-zeros × feature columns × steps) from which propagation inside
 * trainAndPredict uses a second thread; below it a worker's start-up costs more than it saves.
 */
export const parallelPropagationThreshold = 20_000_000;

export function precomputePropagation(inputs: GraphInputs, steps: number): PropagatedFeatures {
  const normalized = prepare(inputs, steps);
  const blocks: Float32Array[] = [inputs.features];
  for (let s = 1; s <= steps; s++) blocks.push(spmm(normalized!, blocks[s - 1], inputs.featureDim));
  return interleave(inputs, blocks, steps);
}

/** As precomputePropagation, with the sparse products spread over a worker pool. */
export async function precomputePropagationWith(
  pool: SpmmPool,
  inputs: GraphInputs,
  steps: number,
  cancel?: CancelSignal,
): Promise<PropagatedFeatures> {
  const normalized = prepare(inputs, steps);
  const blocks: Float32Array[] = [inputs.features];
  for (let s = 1; s <= steps; s++) {
    throwIfCancelled(cancel);
    blocks.push(await pool.multiply(normalized!, blocks[s - 1], inputs.featureDim));
  }
  return interleave(inputs, blocks, steps);
}

/**
 * Propagation for trainAndPredict: on two threads when the work is large enough and the SIMD
 * kernel is missing (one thread with it measured faster than two with the JS loop).
 */
export async function propagateForTraining(inputs: GraphInputs, steps: number, cancel?: CancelSignal): Promise<PropagatedFeatures> {
  const work = inputs.adjacency.rowPtr[inputs.adjacency.rowCount] * inputs.featureDim * steps;
  if (work < parallelPropagationThreshold || simdAvailable()) return precomputePropagation(inputs, steps);
  const pool = await SpmmPool.create(2);
  try {
    return await precomputePropagationWith(pool, inputs, steps, cancel);
  } finally {
    await pool.dispose();
  }
}

function prepare(inputs: GraphInputs, steps: number): CsrMatrix | null {
  const { nodeCount, features, featureDim } = inputs;
  if (!Number.isInteger(steps) || steps < 0) throw new Error(`propagation steps must be a whole number ≥ 0, got ${steps}`);
  if (features.length !== nodeCount * featureDim) {
    throw new Error(`features hold ${features.length} values, expected ${nodeCount} nodes × ${featureDim} = ${nodeCount * featureDim}`);
  }
  return steps > 0 ? symmetricNormalized(inputs.adjacency) : null;
}

function interleave(inputs: GraphInputs, blocks: Float32Array[], steps: number): PropagatedFeatures {
  const { nodeCount, featureDim } = inputs;
  const dim = featureDim * (steps + 1);
  const data = new Float32Array(nodeCount * dim);
  for (let node = 0; node < nodeCount; node++) {
    for (let s = 0; s <= steps; s++) {
      data.set(blocks[s].subarray(node * featureDim, (node + 1) * featureDim), node * dim + s * featureDim);
    }
  }
  return { steps, data, dim };
}
