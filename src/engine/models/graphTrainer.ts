// Training of the message-passing models (gcn, sage): full-graph forward on every epoch,
// gradients by tfjs autograd through the sparse product (sparseMatMul's custom gradient),
// Adam in plain typed arrays as for the dense models.
//
//   gcn:  Z = Â · (dropout(relu(Â X W1 + b1)) W2) + b2          Â = D^-1/2 (A + I) D^-1/2
//   sage: h' = h W_self + M (h W_neighbour) + b                   M = row-mean of A (no self-loop)
//         two such layers, relu and dropout after the first. This is the sum form of the mean
//         aggregator, equal to the concatenation form [h, M h] · [W_self; W_neighbour].
// Products with a sparse matrix are taken after the dense one (Â (X W) rather than (Â X) W)
// because the hidden width is at most the input width.
import * as tf from '@tensorflow/tfjs';
import { transpose, type CsrMatrix } from '../graph/csr';
import { meanNormalized, symmetricNormalized } from '../graph/normalize';
import { sparseMatMul } from '../tf/sparseMatMul';
import { throwIfCancelled, yieldToEventLoop, type CancelSignal, type ProgressSink } from '../util/progress';
import type { SeededRandom } from '../util/random';
import { AdamOptimizer } from './adam';
import { positiveWeights } from './classWeightedLoss';
import { dropoutMask } from './initialisation';
import type { GraphInputs, ModelSettings, ModelWeights, TrainingSet } from './types';

export interface GraphTrainingResult {
  lossHistory: number[];
  logits: Float32Array;
  embeddings: Float32Array;
}

/** x · w whose backward pass uses explicit transposes (tfjs-wasm's transposed matMul is slow). */
function linear(x: tf.Tensor2D, w: tf.Tensor2D): tf.Tensor2D {
  const op = tf.customGrad((...args: (tf.Tensor | tf.GradSaveFunc)[]) => {
    const [input, kernel, save] = args as [tf.Tensor2D, tf.Tensor2D, tf.GradSaveFunc];
    save([input, kernel]);
    return {
      value: tf.matMul(input, kernel),
      gradFunc: (dy: tf.Tensor, saved: tf.Tensor[]) => {
        const [savedInput, savedKernel] = saved as tf.Tensor2D[];
        return [tf.matMul(dy, tf.transpose(savedKernel)), tf.matMul(tf.transpose(savedInput), dy)];
      },
    };
  });
  return op(x, w) as tf.Tensor2D;
}

/** The graph operators and loss constants of one training run, as tensors. */
export class GraphProblem {
  readonly features: tf.Tensor2D;
  readonly featuresTransposed: tf.Tensor2D;
  readonly oneMinusTargets: tf.Tensor2D;
  readonly logWeight: tf.Tensor2D;
  readonly scaledLogWeight: tf.Tensor2D;
  readonly scaledPositiveTarget: tf.Tensor2D;
  readonly lossScale: number;
  readonly propagation: CsrMatrix;
  readonly propagationTransposed: CsrMatrix | undefined;

  constructor(
    readonly kind: 'gcn' | 'sage',
    inputs: GraphInputs,
    train: TrainingSet,
  ) {
    const { nodeCount, featureDim } = inputs;
    const { classCount } = train;
    // gcn's Â is symmetric (its own transpose); sage's row-mean M is not.
    this.propagation = kind === 'gcn' ? symmetricNormalized(inputs.adjacency) : meanNormalized(inputs.adjacency, false);
    this.propagationTransposed = kind === 'gcn' ? undefined : transpose(this.propagation);
    this.features = tf.tensor2d(inputs.features, [nodeCount, featureDim]);
    this.featuresTransposed = tf.transpose(this.features);
    // The loss covers the labelled rows only: unlabelled rows get weight 0 everywhere.
    const posWeight = positiveWeights(train.classIndex, classCount);
    const rowCount = new Float32Array(nodeCount);
    const positives = new Float32Array(nodeCount * classCount);
    for (let r = 0; r < train.nodeIndex.length; r++) {
      rowCount[train.nodeIndex[r]]++;
      positives[train.nodeIndex[r] * classCount + train.classIndex[r]]++;
    }
    this.lossScale = 1 / (Math.max(train.nodeIndex.length, 1) * classCount);
    const negativeTerm = new Float32Array(nodeCount * classCount);
    const logWeight = new Float32Array(nodeCount * classCount);
    const positiveTarget = new Float32Array(nodeCount * classCount);
    for (let node = 0; node < nodeCount; node++) {
      for (let c = 0; c < classCount; c++) {
        const k = node * classCount + c;
        const positive = positives[k];
        const negative = rowCount[node] - positive;
        negativeTerm[k] = negative;
        logWeight[k] = negative + posWeight[c] * positive;
        positiveTarget[k] = posWeight[c] * positive * this.lossScale;
      }
    }
    this.oneMinusTargets = tf.tensor2d(negativeTerm, [nodeCount, classCount]);
    this.logWeight = tf.tensor2d(logWeight, [nodeCount, classCount]);
    this.scaledLogWeight = tf.tidy(() => tf.mul(this.logWeight, this.lossScale));
    this.scaledPositiveTarget = tf.tensor2d(positiveTarget, [nodeCount, classCount]);
  }

  /** X · w with the gradient for w only (X is constant), taken against Xᵀ kept from the start. */
  private inputLinear(w: tf.Tensor2D): tf.Tensor2D {
    const op = tf.customGrad((...args: (tf.Tensor | tf.GradSaveFunc)[]) => {
      const kernel = args[0] as tf.Tensor2D;
      return {
        value: tf.matMul(this.features, kernel),
        gradFunc: (dy: tf.Tensor) => tf.matMul(this.featuresTransposed, dy),
      };
    });
    return op(w) as tf.Tensor2D;
  }

  private propagate(h: tf.Tensor2D): tf.Tensor2D {
    return sparseMatMul(this.propagation, h, this.propagationTransposed);
  }

  /** Hidden activations (before dropout) and logits. */
  forward(params: tf.Tensor[], mask: tf.Tensor2D | null): { hidden: tf.Tensor2D; logits: tf.Tensor2D } {
    if (this.kind === 'gcn') {
      const [w1, b1, w2, b2] = params as [tf.Tensor2D, tf.Tensor1D, tf.Tensor2D, tf.Tensor1D];
      const hidden = tf.relu(tf.add(this.propagate(this.inputLinear(w1)), b1)) as tf.Tensor2D;
      const dropped: tf.Tensor2D = mask ? tf.mul(hidden, mask) : hidden;
      return { hidden, logits: tf.add(this.propagate(linear(dropped, w2)), b2) };
    }
    const [self1, neighbour1, b1, self2, neighbour2, b2] = params as [
      tf.Tensor2D,
      tf.Tensor2D,
      tf.Tensor1D,
      tf.Tensor2D,
      tf.Tensor2D,
      tf.Tensor1D,
    ];
    const hidden = tf.relu(tf.add(tf.add(this.inputLinear(self1), this.propagate(this.inputLinear(neighbour1))), b1)) as tf.Tensor2D;
    const dropped: tf.Tensor2D = mask ? tf.mul(hidden, mask) : hidden;
    return { hidden, logits: tf.add(tf.add(linear(dropped, self2), this.propagate(linear(dropped, neighbour2))), b2) };
  }

  /** Class-weighted BCE over the labelled rows, with its closed-form gradient. */
  loss(logits: tf.Tensor2D): tf.Scalar {
    const op = tf.customGrad((...args: (tf.Tensor | tf.GradSaveFunc)[]) => {
      const [z, save] = args as [tf.Tensor2D, tf.GradSaveFunc];
      save([z]);
      const terms = tf.add(tf.mul(this.oneMinusTargets, z), tf.mul(this.logWeight, tf.softplus(tf.neg(z))));
      return {
        value: tf.mul(tf.sum(terms), this.lossScale),
        gradFunc: (dy: tf.Tensor, saved: tf.Tensor[]) =>
          tf.mul(dy, tf.sub(tf.mul(tf.sigmoid(saved[0]), this.scaledLogWeight), this.scaledPositiveTarget)),
      };
    });
    return op(logits) as tf.Scalar;
  }

  dispose(): void {
    tf.dispose([
      this.features,
      this.featuresTransposed,
      this.oneMinusTargets,
      this.logWeight,
      this.scaledLogWeight,
      this.scaledPositiveTarget,
    ]);
  }
}

export async function trainGraphNetwork(
  kind: 'gcn' | 'sage',
  inputs: GraphInputs,
  train: TrainingSet,
  settings: ModelSettings,
  weights: ModelWeights,
  random: SeededRandom,
  timings: Record<string, number>,
  progress: ProgressSink,
  cancel: CancelSignal | undefined,
): Promise<GraphTrainingResult> {
  const started = performance.now();
  const { nodeCount } = inputs;
  const hiddenUnits = settings.hiddenUnits;
  const parameters = weights.tensors.map((t) => t.data);
  const shapes = weights.tensors.map((t) => t.shape);
  const optimiser = new AdamOptimizer(parameters, { learningRate: settings.learningRate, weightDecay: settings.weightDecay });
  const problem = new GraphProblem(kind, inputs, train);
  const lossHistory: number[] = [];
  const mask = settings.dropout > 0 ? new Float32Array(nodeCount * hiddenUnits) : null;
  const upload = () => parameters.map((data, i) => tf.tensor(data, shapes[i]));
  try {
    for (let epoch = 0; epoch < settings.epochs && train.nodeIndex.length > 0; epoch++) {
      throwIfCancelled(cancel);
      if (mask) dropoutMask(mask.length, settings.dropout, random, mask);
      const [loss, gradients] = tf.tidy(() => {
        const maskTensor = mask ? tf.tensor2d(mask, [nodeCount, hiddenUnits]) : null;
        const { value, grads } = tf.valueAndGrads((...params: tf.Tensor[]) => problem.loss(problem.forward(params, maskTensor).logits))(
          upload(),
        );
        return [value, grads] as const;
      });
      const gradientData = gradients.map((g) => g.dataSync() as Float32Array);
      lossHistory.push((loss.dataSync() as Float32Array)[0]);
      tf.dispose([loss, ...gradients]);
      optimiser.update(gradientData);
      progress.report('train', (epoch + 1) / settings.epochs);
      await yieldToEventLoop();
    }
    const trained = performance.now();
    timings.train = (timings.train ?? 0) + (trained - started) / 1000;
    throwIfCancelled(cancel);
    const [hidden, logits] = tf.tidy(() => {
      const out = problem.forward(upload(), null);
      return [out.hidden, out.logits];
    });
    const result = { lossHistory, logits: logits.dataSync() as Float32Array, embeddings: hidden.dataSync() as Float32Array };
    tf.dispose([hidden, logits]);
    timings.predict = (timings.predict ?? 0) + (performance.now() - trained) / 1000;
    return result;
  } finally {
    problem.dispose();
  }
}
