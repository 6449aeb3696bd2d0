import assert from 'node:assert/strict';
import { buildAdjacency } from '../../src/engine/graph/csr';
import { oneHotTargets, positiveWeights } from '../../src/engine/models/classWeightedLoss';
import { flattenParameters, splitGradients } from '../../src/engine/models/denseStep';
import { glorotUniform } from '../../src/engine/models/initialisation';
import { batchPlan, batchRange, batchSchedule, laidOut } from '../../src/engine/models/miniBatches';
import { trainAndPredict } from '../../src/engine/models/train';
import { defaultModelSettings, type GraphInputs } from '../../src/engine/models/types';
import { SimdDenseTrainingStep } from '../../src/engine/simd/denseTrainingStep';
import { ParallelSimdTraining } from '../../src/engine/simd/parallelSimdTraining';
import { initTensorflow } from '../../src/engine/tf/backend';
import { SeededRandom } from '../../src/engine/util/random';

function maxRelativeGap(actual: Float32Array, expected: Float32Array): number {
  let largest = 0;
  let gap = 0;
  for (let i = 0; i < expected.length; i++) {
    largest = Math.max(largest, Math.abs(expected[i]));
    gap = Math.max(gap, Math.abs(actual[i] - expected[i]));
  }
  return gap / largest;
}

/** Gaussian blobs, one per class, in `dims` dimensions: a problem any of our models should fit. */
function blobs(rows: number, dims: number, classes: number, seed: number) {
  const random = new SeededRandom(seed);
  const centres = Array.from({ length: classes }, () => Array.from({ length: dims }, () => 2 * random.normal()));
  const classIndex = Int32Array.from({ length: rows }, () => random.int(classes));
  const features = new Float32Array(rows * dims);
  classIndex.forEach((c, r) => {
    for (let d = 0; d < dims; d++) features[r * dims + d] = centres[c][d] + random.normal();
  });
  return { features, classIndex };
}

/** Blobs with their one-hot targets, class weights and seeded starting parameters, for one training step. */
function stepProblem(rows: number, inputDim: number, hidden: number, classes: number, seed: number) {
  const random = new SeededRandom(seed);
  const { features, classIndex } = blobs(rows, inputDim, classes, seed + 1);
  const parameters = {
    hiddenKernel: glorotUniform(inputDim, hidden, random),
    hiddenBias: new Float32Array(hidden).fill(0.05),
    outputKernel: glorotUniform(hidden, classes, random),
    outputBias: new Float32Array(classes).fill(-0.1),
  };
  return { features, targets: oneHotTargets(classIndex, classes), posWeight: positiveWeights(classIndex, classes), parameters };
}

describe('models/miniBatches', () => {
  before(async () => {
    await initTensorflow('wasm');
  });

  it('cuts the rows into contiguous, nearly equal batches that cover every row once', () => {
    for (const [rows, count] of [
      [10, 3],
      [8193, 2],
      [50_000, 7],
    ]) {
      let next = 0;
      for (let b = 0; b < count; b++) {
        const [from, to] = batchRange(rows, b, count);
        assert.equal(from, next);
        assert.ok(Math.abs(to - from - rows / count) <= 1, `batch ${b} of ${count} over ${rows} rows has ${to - from} rows`);
        next = to;
      }
      assert.equal(next, rows);
    }
  });

  it('visits every batch once per pass, in a seeded order that changes between passes', () => {
    const schedule = batchSchedule(5, 23, new SeededRandom(1));
    for (let pass = 0; pass < 4; pass++) {
      assert.deepEqual(Array.from(schedule.subarray(pass * 5, pass * 5 + 5)).sort(), [0, 1, 2, 3, 4], `pass ${pass}`);
    }
    const passes = new Set([0, 1, 2, 3].map((p) => schedule.subarray(p * 5, p * 5 + 5).join()));
    assert.ok(passes.size > 1, 'every pass visited the batches in the same order');
    assert.deepEqual(batchSchedule(5, 23, new SeededRandom(1)), schedule);
  });

  it('keeps training full batch when the rows fit in one batch or batchRows is 0', () => {
    assert.equal(batchPlan(8192, 8192, new SeededRandom(1)), null);
    assert.equal(batchPlan(100_000, 0, new SeededRandom(1)), null);
    const plan = batchPlan(20_000, 8192, new SeededRandom(1));
    assert.equal(plan?.batchCount, 3);
    assert.deepEqual(
      Array.from(plan.order).sort((a, b) => a - b),
      Array.from({ length: 20_000 }, (_, i) => i),
    );
    assert.deepEqual(Array.from(laidOut(Int32Array.from([10, 11, 12]), Int32Array.from([2, 0, 1]))), [12, 10, 11]);
    assert.throws(() => batchPlan(10, -1, new SeededRandom(1)), /batchRows/);
  });

  it("a row range's rescaled gradient is the full-batch gradient of a model trained on those rows alone", () => {
    // Single thread and the two-thread shards: both must give the mean over the batch's rows.
    const [rows, inputDim, hidden, classes] = [90, 11, 7, 3];
    const { features, targets, posWeight, parameters } = stepProblem(rows, inputDim, hidden, classes, 5);
    const all = new SimdDenseTrainingStep(features, rows, inputDim, targets, posWeight, hidden, 1 / (rows * classes));
    const [from, to] = [30, 61];
    const ranged = all.run(parameters, null, from, to);
    const factor = rows / (to - from);
    const alone = new SimdDenseTrainingStep(
      features.slice(from * inputDim, to * inputDim),
      to - from,
      inputDim,
      targets.slice(from * classes, to * classes),
      posWeight,
      hidden,
      1 / ((to - from) * classes),
    ).run(parameters, null);
    assert.ok(Math.abs(ranged.loss * factor - alone.loss) < 1e-5, `loss ${ranged.loss * factor} vs ${alone.loss}`);
    const scaled = Float32Array.from(ranged.gradients.hiddenKernel, (g) => g * factor);
    assert.ok(maxRelativeGap(scaled, alone.gradients.hiddenKernel) < 1e-5);
    assert.throws(() => all.run(parameters, null, 50, 91), /outside the shard/);
  });

  it('two worker shards given a batch compute the gradient of exactly the rows batchRange names in each shard', async () => {
    const [rows, inputDim, hidden, classes] = [101, 9, 6, 4];
    const { features, targets, posWeight, parameters } = stepProblem(rows, inputDim, hidden, classes, 8);
    const shared = new Float32Array(new SharedArrayBuffer(features.length * 4));
    shared.set(features);
    const parallel = await ParallelSimdTraining.start(shared, rows, inputDim, targets, posWeight, hidden, 2, false);
    try {
      flattenParameters(parameters, parallel.parameters);
      const got = splitGradients(await parallel.run(null, { index: 1, count: 3 }), inputDim, hidden, classes);
      // Shards hold rows [0, 51) and [51, 101) (splitRows); batch 1 of 3 in each.
      const picked: number[] = [];
      for (const [start, end] of [
        [0, 51],
        [51, 101],
      ]) {
        const [from, to] = batchRange(end - start, 1, 3);
        for (let r = start + from; r < start + to; r++) picked.push(r);
      }
      const single = new SimdDenseTrainingStep(features, rows, inputDim, targets, posWeight, hidden, 1 / (rows * classes));
      const expected = { loss: 0, gradient: new Float32Array(inputDim * hidden) };
      for (const r of picked) {
        const one = single.run(parameters, null, r, r + 1);
        expected.loss += one.loss;
        one.gradients.hiddenKernel.forEach((g, i) => (expected.gradient[i] += g));
      }
      assert.ok(Math.abs(got.loss - expected.loss) < 1e-5, `loss ${got.loss} vs ${expected.loss}`);
      assert.ok(maxRelativeGap(got.gradients.hiddenKernel, expected.gradient) < 1e-4);
    } finally {
      await parallel.dispose();
    }
  });

  for (const parallel of [false, true]) {
    it(`trains in mini-batches${parallel ? ' over two threads' : ''}: seeded, and as accurate as full batch on separable blobs`, async () => {
      const [rows, dims, classes] = [3000, 16, 4];
      const { features, classIndex } = blobs(rows, dims, classes, 12);
      const noEdges = buildAdjacency(rows, { source: new Int32Array(0), target: new Int32Array(0), weight: null, count: 0 }, true);
      const inputs: GraphInputs = { nodeCount: rows, features, featureDim: dims, adjacency: noEdges };
      const half = Int32Array.from({ length: rows / 2 }, (_, i) => 2 * i);
      const train = { nodeIndex: half, classIndex: Int32Array.from(half, (n) => classIndex[n]), classCount: classes };
      const settings = { ...defaultModelSettings, kind: 'mlp' as const, epochs: 60, hiddenUnits: 16, seed: 2 };
      const accuracy = (logits: Float32Array) => {
        let right = 0;
        for (let n = 1; n < rows; n += 2) {
          let best = 0;
          for (let c = 1; c < classes; c++) if (logits[n * classes + c] > logits[n * classes + best]) best = c;
          if (best === classIndex[n]) right++;
        }
        return right / (rows / 2);
      };
      const batched = await trainAndPredict(inputs, train, { ...settings, batchRows: 256 }, { parallel });
      const again = await trainAndPredict(inputs, train, { ...settings, batchRows: 256 }, { parallel });
      const full = await trainAndPredict(inputs, train, { ...settings, batchRows: 0 }, { parallel });
      assert.deepEqual(again.logits, batched.logits);
      assert.notDeepEqual(full.logits, batched.logits);
      const [batchedAccuracy, fullAccuracy] = [accuracy(batched.logits), accuracy(full.logits)];
      assert.ok(batchedAccuracy >= fullAccuracy - 0.02, `mini-batch accuracy ${batchedAccuracy} vs full batch ${fullAccuracy}`);
      assert.ok(batchedAccuracy > 0.9, `mini-batch accuracy ${batchedAccuracy}`);
    });
  }
});
