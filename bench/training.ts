// Training speed: one full-batch step of the two-layer network (input → 64 ReLU → classes,
// one sigmoid per class, class-weighted BCE, Adam) three ways, then the whole sign model on a
// large invented graph. Prints figures; never passes or fails on time.
//   npx tsx bench/training.ts            (the large case runs 10 epochs and extrapolates)
//   npx tsx bench/training.ts --full     (the large case runs all 200 epochs)
// Reference (FIELD-NOTES.md, PyTorch 1.13, 2 threads): 112 ms per step for 20,000 × 128 → 64 → 10;
// 18.4 s for 200 epochs of sign on 100,000 nodes × 128 features (1.8 s to propagate).
import * as tf from '@tensorflow/tfjs';
import { availableParallelism, loadavg } from 'node:os';
import { addTransposedProduct, gatherMatMul, matMul, matMulTransposedRight } from '../src/engine/dense/matmul';
import { buildAdjacency } from '../src/engine/graph/csr';
import { AdamOptimizer } from '../src/engine/models/adam';
import { classWeightedBce, oneHotTargets, positiveWeights } from '../src/engine/models/classWeightedLoss';
import { DenseTrainingStep, flattenParameters, splitGradients, type DenseParameters } from '../src/engine/models/denseStep';
import { ParallelDenseTraining, sharedFloats } from '../src/engine/models/parallelDenseStep';
import { dropoutMask, glorotUniform } from '../src/engine/models/initialisation';
import { propagateForTraining } from '../src/engine/models/propagation';
import { precomputePropagation, trainAndPredict } from '../src/engine/models/train';
import { defaultModelSettings, type GraphInputs } from '../src/engine/models/types';
import { SimdDenseTrainingStep } from '../src/engine/simd/denseTrainingStep';
import { setSimdEnabled, simdAvailable } from '../src/engine/simd/kernels';
import { ParallelSimdTraining } from '../src/engine/simd/parallelSimdTraining';
import { initTensorflow } from '../src/engine/tf/backend';
import { SeededRandom } from '../src/engine/util/random';

interface StepProblem {
  rows: number;
  inputDim: number;
  hidden: number;
  classes: number;
  features: Float32Array;
  classIndex: Int32Array;
}

function invented(rows: number, inputDim: number, classes: number, seed: number): StepProblem {
  const random = new SeededRandom(seed);
  const features = new Float32Array(rows * inputDim);
  for (let i = 0; i < features.length; i++) features[i] = random.normal();
  const classIndex = new Int32Array(rows);
  for (let i = 0; i < rows; i++) classIndex[i] = random.int(classes);
  return { rows, inputDim, hidden: 64, classes, features, classIndex };
}

function freshParameters(p: StepProblem, random: SeededRandom): DenseParameters {
  return {
    hiddenKernel: glorotUniform(p.inputDim, p.hidden, random),
    hiddenBias: new Float32Array(p.hidden),
    outputKernel: glorotUniform(p.hidden, p.classes, random),
    outputBias: new Float32Array(p.classes),
  };
}

function median(values: number[]): number {
  const sorted = values.slice().sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)];
}

/** Median wall and CPU milliseconds (CPU: the whole process, all threads, user + system). */
interface StepTiming {
  wall: number;
  cpu: number;
}

function formatTiming(timing: StepTiming): string {
  return `${timing.wall.toFixed(0)} ms (cpu ${timing.cpu.toFixed(0)} ms)`;
}

/** Runs `step` warmup + repeats times; returns the median milliseconds of the timed runs. */
function timeSteps(step: () => void, repeats: number, warmup = 2): StepTiming {
  for (let i = 0; i < warmup; i++) step();
  const times: number[] = [];
  const cpuTimes: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const startCpu = process.cpuUsage();
    const started = performance.now();
    step();
    times.push(performance.now() - started);
    const used = process.cpuUsage(startCpu);
    cpuTimes.push((used.user + used.system) / 1000);
  }
  return { wall: median(times), cpu: median(cpuTimes) };
}

/** Runs with the SIMD kernels switched off, so that the JavaScript loops are timed. */
function jsOnly<T>(run: () => T): T {
  const previous = setSimdEnabled(false);
  try {
    return run();
  } finally {
    setSimdEnabled(previous);
  }
}

/** The dense products of a training step, JS loops against the SIMD kernels (operands copied in and out). */
function denseProducts(print: (line: string) => void): void {
  const random = new SeededRandom(3);
  const [rows, inner, columns] = [20_000, 128, 64];
  const a = Float32Array.from({ length: rows * inner }, () => random.normal());
  const b = Float32Array.from({ length: inner * columns }, () => random.normal());
  const g = Float32Array.from({ length: rows * columns }, () => random.normal());
  const product = new Float32Array(rows * columns);
  const weightGradient = new Float32Array(inner * columns);
  const back = new Float32Array(rows * inner);
  const runs: Array<[string, () => void]> = [
    ['A·B (matMul)', () => matMul(a, b, rows, inner, columns, product)],
    ['Aᵀ·G (addTransposedProduct)', () => addTransposedProduct(a, null, g, inner, columns, weightGradient, 0, rows)],
    ['G·Bᵀ (matMulTransposedRight)', () => matMulTransposedRight(g, b, rows, columns, inner, back)],
  ];
  const flops = 2 * rows * inner * columns;
  for (const [name, run] of runs) {
    const js = jsOnly(() => timeSteps(run, 3, 1));
    const simd = timeSteps(run, 7, 2);
    print(
      `${name}: JS ${formatTiming(js)}; SIMD ${formatTiming(simd)} = ${(flops / simd.cpu / 1e6).toFixed(1)} GFLOPS of CPU time, ${(js.cpu / simd.cpu).toFixed(0)}× less CPU`,
    );
  }
}

/** (a) tfjs autograd with tfjs's own Adam (L2 added to the loss, as weight_decay does). */
function autogradStep(p: StepProblem, repeats: number): StepTiming {
  const random = new SeededRandom(1);
  const params = freshParameters(p, random);
  const x = tf.tensor2d(p.features, [p.rows, p.inputDim]);
  const y = tf.tensor2d(oneHotTargets(p.classIndex, p.classes), [p.rows, p.classes]);
  const posWeight = tf.tensor1d(positiveWeights(p.classIndex, p.classes));
  const logWeight = tf.tidy(() => tf.add(1, tf.mul(tf.sub(posWeight, 1), y)));
  const w1 = tf.variable(tf.tensor2d(params.hiddenKernel, [p.inputDim, p.hidden]));
  const b1 = tf.variable(tf.tensor1d(params.hiddenBias));
  const w2 = tf.variable(tf.tensor2d(params.outputKernel, [p.hidden, p.classes]));
  const b2 = tf.variable(tf.tensor1d(params.outputBias));
  const optimiser = tf.train.adam(0.01);
  const mask = new Float32Array(p.rows * p.hidden);
  const ms = timeSteps(() => {
    dropoutMask(mask.length, 0.5, random, mask);
    const maskTensor = tf.tensor2d(mask, [p.rows, p.hidden]);
    const loss = optimiser.minimize(
      () => {
        const hidden = tf.mul(tf.relu(tf.add(tf.matMul(x, w1), b1)), maskTensor);
        const z = tf.add(tf.matMul(hidden, w2), b2);
        const bce = tf.mean(tf.add(tf.mul(tf.sub(1, y), z), tf.mul(logWeight, tf.softplus(tf.neg(z)))));
        const l2 = tf.mul(2.5e-4, tf.addN([tf.sum(tf.square(w1)), tf.sum(tf.square(b1)), tf.sum(tf.square(w2)), tf.sum(tf.square(b2))]));
        return tf.add<tf.Scalar>(bce, l2);
      },
      true,
      [w1, b1, w2, b2],
    );
    loss?.dataSync();
    tf.dispose([loss!, maskTensor]);
  }, repeats);
  optimiser.dispose();
  tf.dispose([x, y, posWeight, logWeight, w1, b1, w2, b2]);
  return ms;
}

/**
 * (b) tfjs matMul with the hand-written backward pass (the engine's mlp/sign path without SIMD);
 * (d) the same step on the SIMD kernels, rows resident in the kernels' memory.
 */
function handWrittenTfStep(
  p: StepProblem,
  repeats: number,
  Step: typeof DenseTrainingStep | typeof SimdDenseTrainingStep = DenseTrainingStep,
): StepTiming {
  const random = new SeededRandom(1);
  const params = freshParameters(p, random);
  const optimiser = new AdamOptimizer([params.hiddenKernel, params.hiddenBias, params.outputKernel, params.outputBias], {
    learningRate: 0.01,
    weightDecay: 5e-4,
  });
  const step = new Step(
    p.features,
    p.rows,
    p.inputDim,
    oneHotTargets(p.classIndex, p.classes),
    positiveWeights(p.classIndex, p.classes),
    p.hidden,
    1 / (p.rows * p.classes),
  );
  const mask = new Float32Array(p.rows * p.hidden);
  const ms = timeSteps(() => {
    dropoutMask(mask.length, 0.5, random, mask);
    const { gradients } = step.run(params, mask);
    optimiser.update([gradients.hiddenKernel, gradients.hiddenBias, gradients.outputKernel, gradients.outputBias]);
  }, repeats);
  step.dispose();
  return ms;
}

/** (b2) As (b), the rows split over two worker threads, each with its own tfjs-wasm; (d2) the same with SIMD shards. */
async function parallelTfStep(
  p: StepProblem,
  repeats: number,
  Training: typeof ParallelDenseTraining | typeof ParallelSimdTraining = ParallelDenseTraining,
): Promise<StepTiming> {
  const random = new SeededRandom(1);
  const params = freshParameters(p, random);
  const optimiser = new AdamOptimizer([params.hiddenKernel, params.hiddenBias, params.outputKernel, params.outputBias], {
    learningRate: 0.01,
    weightDecay: 5e-4,
  });
  const inputs = sharedFloats(p.features.length);
  inputs.set(p.features);
  const training = await Training.start(
    inputs,
    p.rows,
    p.inputDim,
    oneHotTargets(p.classIndex, p.classes),
    positiveWeights(p.classIndex, p.classes),
    p.hidden,
    2,
    true,
  );
  const times: number[] = [];
  const cpuTimes: number[] = [];
  try {
    for (let i = 0; i < repeats + 2; i++) {
      const startCpu = process.cpuUsage();
      const started = performance.now();
      dropoutMask(training.masks[0].length, 0.5, random, training.masks[0]);
      flattenParameters(params, training.parameters);
      const { gradients } = splitGradients(await training.run(0), p.inputDim, p.hidden, p.classes);
      optimiser.update([gradients.hiddenKernel, gradients.hiddenBias, gradients.outputKernel, gradients.outputBias]);
      const used = process.cpuUsage(startCpu);
      if (i >= 2) {
        times.push(performance.now() - started);
        cpuTimes.push((used.user + used.system) / 1000);
      }
    }
  } finally {
    await training.dispose();
  }
  return { wall: median(times), cpu: median(cpuTimes) };
}

/** (c) Our typed-array kernels (one thread), same maths as (b); they route to the SIMD kernels unless switched off. */
function typedArrayStep(p: StepProblem, repeats: number): StepTiming {
  const random = new SeededRandom(1);
  const params = freshParameters(p, random);
  const { rows, inputDim, hidden, classes } = p;
  const optimiser = new AdamOptimizer([params.hiddenKernel, params.hiddenBias, params.outputKernel, params.outputBias], {
    learningRate: 0.01,
    weightDecay: 5e-4,
  });
  const targets = oneHotTargets(p.classIndex, classes);
  const posWeight = positiveWeights(p.classIndex, classes);
  const allRows = Int32Array.from({ length: rows }, (_, i) => i);
  const mask = new Float32Array(rows * hidden);
  const hiddenOut = new Float32Array(rows * hidden);
  const logits = new Float32Array(rows * classes);
  const logitsGradient = new Float32Array(rows * classes);
  const hiddenGradient = new Float32Array(rows * hidden);
  const grads = {
    hiddenKernel: new Float32Array(inputDim * hidden),
    hiddenBias: new Float32Array(hidden),
    outputKernel: new Float32Array(hidden * classes),
    outputBias: new Float32Array(classes),
  };
  return timeSteps(
    () => {
      dropoutMask(mask.length, 0.5, random, mask);
      gatherMatMul(p.features, allRows, params.hiddenKernel, inputDim, hidden, hiddenOut);
      for (let k = 0; k < hiddenOut.length; k++) {
        const v = hiddenOut[k] + params.hiddenBias[k % hidden];
        hiddenOut[k] = v > 0 ? v * mask[k] : 0;
      }
      gatherMatMul(hiddenOut, allRows, params.outputKernel, hidden, classes, logits);
      for (let k = 0; k < logits.length; k++) logits[k] += params.outputBias[k % classes];
      classWeightedBce(logits, targets, posWeight, logitsGradient);
      grads.outputKernel.fill(0);
      addTransposedProduct(hiddenOut, null, logitsGradient, hidden, classes, grads.outputKernel, 0, rows);
      grads.outputBias.fill(0);
      for (let k = 0; k < logitsGradient.length; k++) grads.outputBias[k % classes] += logitsGradient[k];
      matMulTransposedRight(logitsGradient, params.outputKernel, rows, classes, hidden, hiddenGradient);
      for (let k = 0; k < hiddenGradient.length; k++) if (hiddenOut[k] <= 0) hiddenGradient[k] = 0;
      for (let k = 0; k < hiddenGradient.length; k++) hiddenGradient[k] *= mask[k] > 0 ? mask[k] : 0;
      grads.hiddenKernel.fill(0);
      addTransposedProduct(p.features, null, hiddenGradient, inputDim, hidden, grads.hiddenKernel, 0, rows);
      grads.hiddenBias.fill(0);
      for (let k = 0; k < hiddenGradient.length; k++) grads.hiddenBias[k % hidden] += hiddenGradient[k];
      optimiser.update([grads.hiddenKernel, grads.hiddenBias, grads.outputKernel, grads.outputBias]);
    },
    repeats,
    1,
  );
}

/** An invented graph: each node links to `degree / 2` random others (about `degree` per node both ways). */
function inventedGraph(nodeCount: number, featureDim: number, degree: number, seed: number): GraphInputs {
  const random = new SeededRandom(seed);
  const edgeCount = (nodeCount * degree) / 2;
  const source = new Int32Array(edgeCount);
  const target = new Int32Array(edgeCount);
  for (let e = 0; e < edgeCount; e++) {
    source[e] = random.int(nodeCount);
    target[e] = random.int(nodeCount);
  }
  const features = new Float32Array(nodeCount * featureDim);
  for (let i = 0; i < features.length; i++) features[i] = random.normal();
  return {
    nodeCount,
    features,
    featureDim,
    adjacency: buildAdjacency(nodeCount, { source, target, weight: null, count: edgeCount }, true),
  };
}

export async function runTrainingBenchmarks(print: (line: string) => void, options: { full?: boolean } = {}): Promise<void> {
  const problem = invented(20_000, 128, 10, 7);
  // Other work on the machine inflates every figure; the cpu-autograd line doubles as a gauge
  // (FIELD-NOTES: 2,744 ms on an idle machine).
  print(
    `load average ${loadavg()
      .map((l) => l.toFixed(1))
      .join(' ')} on ${availableParallelism()} cores`,
  );
  print('# one training step, 20,000 × 128 → 64 → 10, sigmoid BCE + Adam (median ms; PyTorch 2 threads: 112)');
  await initTensorflow('cpu');
  print(`(a) tfjs-cpu autograd: ${formatTiming(autogradStep(problem, 3))}`);
  await initTensorflow('wasm');
  print(`(a) tfjs-wasm autograd: ${formatTiming(autogradStep(problem, 5))}`);
  print(`(b) tfjs-wasm matMul, hand-written backward: ${formatTiming(handWrittenTfStep(problem, 9))}`);
  print(`(b2) as (b), rows split over 2 worker threads: ${formatTiming(await parallelTfStep(problem, 9))}`);
  print(`(c) typed-array kernels, JS loops, one thread: ${formatTiming(jsOnly(() => typedArrayStep(problem, 3)))}`);
  if (simdAvailable()) {
    print(`(c2) as (c), products on the SIMD kernels (operands copied in and out): ${formatTiming(typedArrayStep(problem, 9))}`);
    print(
      `(d) SIMD kernels, rows resident in wasm memory, one thread: ${formatTiming(handWrittenTfStep(problem, 9, SimdDenseTrainingStep))}`,
    );
    print(`(d2) as (d), rows split over 2 worker threads: ${formatTiming(await parallelTfStep(problem, 9, ParallelSimdTraining))}`);
    print('# dense products 20,000 × 128 · 128 × 64 and its transposes (median, one thread)');
    denseProducts(print);
  } else {
    print('(WebAssembly SIMD is not available here: the SIMD rows are skipped)');
  }

  print('# gcn and sage, full graph: 20,000 nodes × 128 features, ~200,000 edges, 50% labelled, 10 classes, 10 epochs');
  const smaller = inventedGraph(20_000, 128, 20, 13);
  const smallerRandom = new SeededRandom(14);
  const smallerLabelled = Int32Array.from({ length: 20_000 }, (_, i) => i).filter(() => smallerRandom.next() < 0.5);
  const smallerTrain = { nodeIndex: smallerLabelled, classIndex: smallerLabelled.map(() => smallerRandom.int(10)), classCount: 10 };
  for (const kind of ['gcn', 'sage'] as const) {
    const out = await trainAndPredict(smaller, smallerTrain, { ...defaultModelSettings, kind, epochs: 10 });
    print(`${kind}: ${((out.timings.train / 10) * 1000).toFixed(0)} ms per epoch, predict ${out.timings.predict.toFixed(2)} s`);
  }

  const nodeCount = 100_000;
  const epochs = options.full ? 200 : 10;
  print(
    `# sign on an invented graph: ${nodeCount.toLocaleString('en')} nodes × 128 features, ~1,000,000 edges, 50% labelled, 10 classes, ${epochs} epochs`,
  );
  const graph = inventedGraph(nodeCount, 128, 20, 11);
  const random = new SeededRandom(12);
  const labelledNodes = Int32Array.from({ length: nodeCount }, (_, i) => i).filter(() => random.next() < 0.5);
  const train = { nodeIndex: labelledNodes, classIndex: labelledNodes.map(() => random.int(10)), classCount: 10 };
  let started = performance.now();
  precomputePropagation(graph, 2);
  const propagateSeconds = (performance.now() - started) / 1000;
  started = performance.now();
  const propagated = await propagateForTraining(graph, 2);
  const propagateParallelSeconds = (performance.now() - started) / 1000;
  print(
    `propagate [X, ÂX, Â²X]: ${propagateSeconds.toFixed(2)} s on one thread, ${propagateParallelSeconds.toFixed(2)} s on two (PyTorch: 1.8 s)`,
  );
  // Full batch is the reference's recipe (PyTorch: 18.4 s for 200 full-batch epochs); the default
  // trains the same number of steps on mini-batches of batchRows rows.
  for (const batchRows of [0, defaultModelSettings.batchRows]) {
    started = performance.now();
    const out = await trainAndPredict(
      graph,
      train,
      { ...defaultModelSettings, kind: 'sign', epochs, batchRows },
      { precomputed: propagated },
    );
    const total = (performance.now() - started) / 1000;
    const perStep = out.timings.train / epochs;
    const shape = batchRows === 0 ? `full batch of ${labelledNodes.length} rows` : `mini-batches of about ${batchRows} rows`;
    print(
      `train, ${shape} × 384: ${out.timings.train.toFixed(2)} s for ${epochs} steps = ${(perStep * 1000).toFixed(0)} ms per step → 200 steps ≈ ${(perStep * 200).toFixed(1)} s (PyTorch, 200 full-batch epochs: 18.4 s)`,
    );
    print(`  predict all nodes: ${out.timings.predict.toFixed(2)} s; trainAndPredict total ${total.toFixed(2)} s`);
  }
}

if (process.argv[1] && /training\.ts$/.test(process.argv[1])) {
  runTrainingBenchmarks((line) => console.log(line), { full: process.argv.includes('--full') }).catch((error: unknown) => {
    console.error(error);
    process.exitCode = 1;
  });
}
