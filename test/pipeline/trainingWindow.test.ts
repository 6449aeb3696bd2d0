import { strict as assert } from 'node:assert';
import { modelClassSet, selectTrainingNodes } from '../../src/engine/pipeline/trainingWindow';
import { prefixGraph } from '../../src/engine/pipeline/prefixGraph';
import { ENOUGH_HELD_OUT_ROWS, foldModelsFor, outOfFoldProbabilities, stratifiedFolds } from '../../src/engine/pipeline/crossFit';
import { buildAdjacency } from '../../src/engine/graph/csr';
import { defaultModelSettings } from '../../src/engine/models/types';
import { initTensorflow } from '../../src/engine/tf/backend';
import { SeededRandom } from '../../src/engine/util/random';
import { loadSmall } from './pipelineFixture';

describe('training window and graph prefix', () => {
  it('takes the labels of slices t − H through t, or through t − 1 when the slice is the test set', async () => {
    const dataset = await loadSmall();
    const slice = 10;
    const withCurrent = selectTrainingNodes(dataset, dataset.labels, {
      slice,
      historyWindow: 3,
      includeCurrentSlice: true,
      labelRate: 1,
      seed: 1,
    });
    const without = selectTrainingNodes(dataset, dataset.labels, {
      slice,
      historyWindow: 3,
      includeCurrentSlice: false,
      labelRate: 1,
      seed: 1,
    });
    let expectedWith = 0;
    let expectedWithout = 0;
    dataset.labels.forEach((label, node) => {
      const s = dataset.nodeSlice[node];
      if (label < 0) return;
      if (s >= 7 && s <= 10) expectedWith++;
      if (s >= 7 && s <= 9) expectedWithout++;
    });
    assert.equal(withCurrent.nodes.length, expectedWith);
    assert.equal(without.nodes.length, expectedWithout);
    for (const node of without.nodes) assert.ok(dataset.nodeSlice[node] < slice);
    withCurrent.nodes.forEach((node, i) => assert.equal(withCurrent.globalClasses[i], dataset.labels[node]));
  });

  it('thins the window to the label rate with a seeded choice', async () => {
    const dataset = await loadSmall();
    const request = { slice: 20, historyWindow: 'all' as const, includeCurrentSlice: true, labelRate: 0.3, seed: 5 };
    const all = selectTrainingNodes(dataset, dataset.labels, { ...request, labelRate: 1 });
    const a = selectTrainingNodes(dataset, dataset.labels, request);
    const b = selectTrainingNodes(dataset, dataset.labels, request);
    const c = selectTrainingNodes(dataset, dataset.labels, { ...request, seed: 6 });
    assert.equal(a.nodes.length, Math.round(all.nodes.length * 0.3));
    assert.deepEqual(a.nodes, b.nodes);
    assert.notDeepEqual(a.nodes, c.nodes);
  });

  it('grows a warm-started class set by appending new classes after the old rows', () => {
    const selection = { nodes: Int32Array.from([0, 1, 2]), globalClasses: Int32Array.from([4, 1, 1]) };
    assert.deepEqual(Array.from(modelClassSet(selection, null)), [1, 4]);
    assert.deepEqual(Array.from(modelClassSet(selection, Int32Array.from([3, 1]))), [3, 1, 4]);
  });

  it('builds the graph as it stood at the end of a slice: no later node or edge', async () => {
    const dataset = await loadSmall();
    const slice = 5;
    const prefix = prefixGraph(dataset, slice);
    const expectedNodes = Array.from(dataset.nodeSlice).filter((s) => s <= slice).length;
    assert.equal(prefix.inputs.nodeCount, expectedNodes);
    let expectedEntries = 0;
    for (let e = 0; e < dataset.edges.count; e++) {
      const u = dataset.edges.source[e];
      const v = dataset.edges.target[e];
      if (dataset.nodeSlice[u] <= slice && dataset.nodeSlice[v] <= slice) expectedEntries += u === v ? 1 : 2;
    }
    // The generator never repeats an edge, so every kept edge is two CSR entries.
    assert.equal(prefix.inputs.adjacency.rowPtr[prefix.inputs.nodeCount], expectedEntries);
    prefix.globalIndex.forEach((g, local) => {
      assert.equal(prefix.localIndex[g], local);
      assert.ok(dataset.nodeSlice[g] <= slice);
      assert.deepEqual(
        prefix.inputs.features.subarray(local * dataset.featureDim, (local + 1) * dataset.featureDim),
        dataset.features.subarray(g * dataset.featureDim, (g + 1) * dataset.featureDim),
      );
    });
  });

  it('splits training nodes into stratified, seeded folds', () => {
    const classes = Int32Array.from([0, 0, 0, 0, 0, 0, 1, 1, 1, 2, 2, 2, 2, 2, 2, 2, 2, 2]);
    const folds = stratifiedFolds(classes, 3, 9);
    assert.deepEqual(folds, stratifiedFolds(classes, 3, 9));
    for (const c of [0, 1, 2]) {
      const counts = [0, 0, 0];
      classes.forEach((k, i) => k === c && counts[folds[i]]++);
      assert.ok(Math.max(...counts) - Math.min(...counts) <= 1, `class ${c} spread over folds as ${counts.join('/')}`);
    }
  });

  it('trains only as many fold models as it takes to hold out enough rows', () => {
    assert.equal(foldModelsFor(109, 3), 3);
    assert.equal(foldModelsFor(3 * ENOUGH_HELD_OUT_ROWS, 3), 1);
    assert.equal(foldModelsFor(5000, 3), 2);
    assert.equal(foldModelsFor(37_354, 3), 1);
    assert.equal(foldModelsFor(100, 5), 5);
  });

  it('leaves the rows of untrained folds unscored and scores the rest with models that never saw them', async () => {
    await initTensorflow();
    const random = new SeededRandom(3);
    const [nodes, dims, classes] = [60, 4, 2];
    const features = Float32Array.from({ length: nodes * dims }, (_, i) => (Math.floor(i / dims) % 2) * 2 + random.normal() * 0.3);
    const noEdges = buildAdjacency(nodes, { source: new Int32Array(0), target: new Int32Array(0), weight: null, count: 0 }, true);
    const trainLocal = Int32Array.from({ length: nodes }, (_, i) => i);
    const trainClass = Int32Array.from(trainLocal, (i) => i % 2);
    const seen: { rows: Int32Array; trained: Int32Array }[] = [];
    const outputs = await outOfFoldProbabilities({
      inputs: { nodeCount: nodes, features, featureDim: dims, adjacency: noEdges },
      trainLocal,
      trainClass,
      classCount: classes,
      settings: { ...defaultModelSettings, kind: 'mlp', epochs: 30, hiddenUnits: 8 },
      folds: 3,
      foldModels: 1,
      observeFold: (f) => seen.push({ rows: f.heldOutRows, trained: f.training.nodeIndex }),
    });
    assert.equal(seen.length, 1);
    const fold = stratifiedFolds(trainClass, 3, defaultModelSettings.seed);
    for (let row = 0; row < nodes; row++) {
      const scored = !Number.isNaN(outputs[row * classes]);
      assert.equal(scored, fold[row] === 0, `row ${row} (fold ${fold[row]})`);
    }
    const trainedOn = new Set(seen[0].trained);
    for (const row of seen[0].rows) assert.ok(!trainedOn.has(trainLocal[row]), `row ${row} was scored by a model trained on it`);
  });
});
