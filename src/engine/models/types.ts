// What the models take and give. Every model has the same open-set head: one sigmoid output
// per known class (not a softmax), so a node can score low on every class and be rejected.
import type { CsrMatrix } from '../graph/csr';

export type ModelKind = 'mlp' | 'gcn' | 'sage' | 'sign';

export const modelKinds: readonly ModelKind[] = ['mlp', 'gcn', 'sage', 'sign'];

export interface GraphInputs {
  nodeCount: number;
  /** Row-major, nodeCount × featureDim. */
  features: Float32Array;
  featureDim: number;
  /** Symmetric, raw weights, no self-loops added (normalisation adds its own). */
  adjacency: CsrMatrix;
}

export interface TrainingSet {
  /** Dense node indices of the labelled nodes used for training. */
  nodeIndex: Int32Array;
  /** Class of each labelled node, in [0, classCount). */
  classIndex: Int32Array;
  classCount: number;
}

export interface ModelSettings {
  kind: ModelKind;
  hiddenUnits: number;
  /** Adam steps: full-batch epochs, or mini-batches when the training rows exceed batchRows. */
  epochs: number;
  /** Rows per mini-batch of mlp/sign training (0 or ≥ the training rows = full batch). */
  batchRows: number;
  learningRate: number;
  /** L2 penalty added to every gradient, as Adam's weight_decay in PyTorch does. */
  weightDecay: number;
  /** Probability of dropping a hidden unit during training. */
  dropout: number;
  seed: number;
  /** Number of propagation steps K for sign: input is [X, ÂX, …, Â^K X]. */
  propagationSteps: number;
}

export const defaultModelSettings: ModelSettings = {
  kind: 'sign',
  hiddenUnits: 64,
  epochs: 200,
  batchRows: 8192,
  learningRate: 0.01,
  weightDecay: 5e-4,
  dropout: 0.5,
  seed: 0,
  propagationSteps: 2,
};

export interface NamedTensor {
  name: string;
  shape: number[];
  data: Float32Array;
}

/** Plain, serialisable weights (for warm start and saving). */
export interface ModelWeights {
  kind: ModelKind;
  classCount: number;
  inputDim: number;
  hiddenUnits: number;
  tensors: NamedTensor[];
}

/** [X, ÂX, Â²X, …] concatenated per row; depends only on the graph and features, not on settings. */
export interface PropagatedFeatures {
  steps: number;
  data: Float32Array;
  dim: number;
}

export interface ModelOutput {
  /** nodeCount × classCount, before the sigmoid. */
  logits: Float32Array;
  classCount: number;
  /** nodeCount × hiddenUnits: the hidden layer (no dropout), for discovery. */
  embeddings: Float32Array;
  hiddenUnits: number;
  weights: ModelWeights;
  /** Training loss of each epoch (with dropout, as optimised). */
  lossHistory: number[];
  /** Seconds per stage: propagate, train, predict. */
  timings: Record<string, number>;
  /** Remarks worth showing to the user, e.g. why a warm start was not used. */
  notes: string[];
}
