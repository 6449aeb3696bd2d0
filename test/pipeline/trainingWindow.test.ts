import { strict as assert } from 'node:assert';
import { modelClassSet, selectTrainingNodes } from '../../src/engine/pipeline/trainingWindow';
import { prefixGraph } from '../../src/engine/pipeline/prefixGraph';
import { stratifiedFolds } from '../../src/engine/pipeline/crossFit';
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
});
