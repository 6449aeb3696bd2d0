import assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { loadDataset } from '../../src/engine/dataset/load';
import { summarizeDataset, formatSummaryText } from '../../src/engine/dataset/summary';
import { DatasetError } from '../../src/engine/dataset/types';
import { encodeNpy } from '../../src/engine/io/npy';
import { CancelFlag, CancelledError } from '../../src/engine/util/progress';
import { makeTempDir, removeDir, VALID_FILES, writeValidDataset } from './fixtures';

describe('loadDataset', () => {
  let dir: string;
  beforeEach(async () => {
    dir = await makeTempDir();
  });
  afterEach(async () => {
    await removeDir(dir);
  });

  it('builds dense indices, typed edges, slices, labels and column features', async () => {
    await writeValidDataset(dir);
    const ds = await loadDataset(dir);
    assert.equal(ds.folder, path.resolve(dir));
    assert.deepEqual(ds.nodeIds, ['n1', 'n2', 'n3', 'n4', 'n5']);
    assert.equal(ds.indexOfId.get('n4'), 3);
    assert.deepEqual(ds.slices, [
      { key: '2021-Q1', index: 0, nodeCount: 2 },
      { key: '2021-Q2', index: 1, nodeCount: 1 },
      { key: '2021-Q3', index: 2, nodeCount: 2 },
    ]);
    assert.deepEqual([...ds.nodeSlice], [0, 0, 1, 2, 2]);
    assert.ok(ds.edges.source instanceof Int32Array && ds.edges.target instanceof Int32Array);
    assert.deepEqual([...ds.edges.source], [0, 1, 2, 3]);
    assert.deepEqual([...ds.edges.target], [1, 2, 3, 4]);
    assert.equal(ds.edges.weight, null);
    assert.equal(ds.edges.edgeSlice, undefined);
    // classes.json order first (gearbox, blade), then unregistered labels.
    assert.deepEqual(ds.classNames, ['gearbox', 'blade']);
    assert.deepEqual([...ds.labels], [1, 0, -1, -1, 0]);
    assert.equal(ds.featureDim, 2);
    assert.deepEqual(ds.featureNames, ['x', 'y']);
    assert.deepEqual([...ds.features], [1, 0, 0, 1, 1, 1, 0.5, 2, -1, 3.5]);
    assert.deepEqual(ds.nodeText, ['blade crack', 'gearbox oil', 'blade erosion', 'tower bolt', 'gearbox noise']);
    for (const name of ['dataset.json', 'nodes.csv', 'edges.csv', 'labels.csv', 'classes.json']) {
      assert.equal(ds.contentHashes[name], createHash('sha256').update(VALID_FILES[name]).digest('hex'), name);
    }
  });

  it('orders unregistered labels by first appearance and reads weights and edge times', async () => {
    const manifest = { ...(JSON.parse(VALID_FILES['dataset.json']) as object), edgeColumns: { weight: 'weight' } };
    await writeValidDataset(dir, {
      'dataset.json': JSON.stringify(manifest),
      'classes.json': null,
      'labels.csv': 'id,label\nn4,zeta\nn1,alpha\nn3,zeta\n',
      'edges.csv': 'source,target,weight,time\nn1,n2,0.5,2021-09-30\nn4,n5,2,2021-01-01\n',
    });
    const ds = await loadDataset(dir);
    assert.deepEqual(ds.classNames, ['zeta', 'alpha']);
    assert.deepEqual([...ds.labels], [1, -1, 0, 0, -1]);
    assert.deepEqual([...ds.edges.weight!], [0.5, 2]);
    assert.deepEqual([...ds.edges.edgeSlice!], [2, 0]);
    const summary = summarizeDataset(ds);
    assert.deepEqual(
      summary.slices.map((s) => s.edges),
      [1, 0, 1],
    );
    assert.equal(ds.contentHashes['classes.json'], undefined);
  });

  it('reads npy features and makes TF-IDF features from text', async () => {
    const values = Float32Array.from({ length: 15 }, (_, k) => k / 2);
    await writeValidDataset(dir, {
      'dataset.json': JSON.stringify({ name: 'n', features: { source: 'npy' }, time: { granularity: 'month' } }),
      'features.npy': encodeNpy(values, [5, 3]),
    });
    const npy = await loadDataset(dir);
    assert.deepEqual([...npy.features], [...values]);
    assert.deepEqual(npy.featureNames, ['f0', 'f1', 'f2']);
    assert.equal(
      npy.contentHashes['features.npy'],
      createHash('sha256')
        .update(encodeNpy(values, [5, 3]))
        .digest('hex'),
    );
    await writeValidDataset(dir, { 'dataset.json': JSON.stringify({ name: 'n', nodeColumns: { text: ['title'] } }) });
    const text = await loadDataset(dir);
    assert.deepEqual(text.featureNames, ['blade', 'bolt', 'crack', 'erosion', 'gearbox', 'noise', 'oil', 'tower']);
    assert.equal(text.features.length, 5 * 8);
  });

  it("summarises nodes and edges per slice (edge in its later endpoint's slice) and labels per class", async () => {
    await writeValidDataset(dir);
    const summary = summarizeDataset(await loadDataset(dir));
    assert.deepEqual(summary.slices, [
      { key: '2021-Q1', nodes: 2, edges: 1, labelled: 2 },
      { key: '2021-Q2', nodes: 1, edges: 1, labelled: 0 },
      { key: '2021-Q3', nodes: 2, edges: 2, labelled: 1 },
    ]);
    assert.deepEqual(summary.classes, [
      { name: 'gearbox', status: 'active', labelled: 2 },
      { name: 'blade', status: 'active', labelled: 1 },
    ]);
    assert.equal(summary.unlabelledShare, 2 / 5);
    const text = formatSummaryText(summary);
    assert.match(text, /5 nodes, 4 undirected edges, 3 slices by quarter/);
    assert.match(text, /2021-Q3\s+2\s+2\s+1/);
    assert.match(text, /unlabelled: 2 \(40\.0%\)/);
  });

  it('throws a DatasetError listing every problem', async () => {
    await writeValidDataset(dir, { 'edges.csv': 'source,target\nn1,x1\nx2,n1\n' });
    await assert.rejects(loadDataset(dir), (error: unknown) => {
      assert.ok(error instanceof DatasetError);
      assert.equal(error.problems.length, 2);
      return true;
    });
  });

  it('stops when cancelled', async () => {
    await writeValidDataset(dir);
    const cancel = new CancelFlag();
    cancel.cancel();
    await assert.rejects(loadDataset(dir, { cancel }), CancelledError);
  });

  it('reports progress from 0 to 1', async () => {
    await writeValidDataset(dir);
    const fractions: number[] = [];
    await loadDataset(dir, { progress: { report: (stage, f) => (assert.equal(stage, 'load'), fractions.push(f)) } });
    assert.ok(fractions.length >= 3);
    assert.ok(fractions.every((f, k) => f >= 0 && f <= 1 && (k === 0 || f >= fractions[k - 1])));
    assert.equal(fractions[fractions.length - 1], 1);
  });

  it('loads 100,000 edges without trouble and keeps them in typed arrays', async () => {
    const nodeCount = 2000;
    let nodes = 'id,time,title\n';
    for (let i = 0; i < nodeCount; i++) nodes += `v${i},${i % 10},word${i % 7}\n`;
    let edges = 'source,target\n';
    for (let e = 0; e < 100_000; e++) edges += `v${(e * 7919) % nodeCount},v${(e * 104729 + 1) % nodeCount}\n`;
    await fs.writeFile(path.join(dir, 'nodes.csv'), nodes);
    await fs.writeFile(path.join(dir, 'edges.csv'), edges);
    await fs.writeFile(
      path.join(dir, 'dataset.json'),
      JSON.stringify({ name: 'big', time: { granularity: 'step' }, nodeColumns: { text: ['title'] } }),
    );
    const ds = await loadDataset(dir);
    assert.equal(ds.edges.count, 100_000);
    assert.equal(ds.edges.source.length, 100_000);
    assert.equal(ds.edges.target[99_999], (99_999 * 104729 + 1) % nodeCount);
    assert.deepEqual(
      ds.slices.map((s) => s.key),
      ['0', '1', '2', '3', '4', '5', '6', '7', '8', '9'],
    );
  });
});
