// Zachary's karate club (W. W. Zachary, "An Information Flow Model for Conflict and Fission in
// Small Groups", Journal of Anthropological Research 33, 1977), as shipped by the npm package
// graphology-generators (social/karate-club): 34 members, 78 ties, and the faction each member
// joined after the split in the node attribute `club` ("Mr. Hi" or "Officer").
import assert from 'node:assert/strict';
import { UndirectedGraph } from 'graphology';
import karateClub from 'graphology-generators/social/karate-club';
import { loadDataset } from '../../src/engine/dataset/load';
import { summarizeDataset } from '../../src/engine/dataset/summary';
import { encodeNpy } from '../../src/engine/io/npy';
import { formatLabelsCsv } from '../../src/engine/dataset/labelsFile';
import { makeTempDir, removeDir, writeFolder } from './fixtures';

describe('karate club dataset (graphology-generators)', () => {
  it("round-trips through a dataset folder with 34 nodes, 78 edges and the package's two factions", async () => {
    const graph = karateClub(UndirectedGraph);
    const factionSizes = new Map<string, number>();
    graph.forEachNode((_, attributes) =>
      factionSizes.set(attributes.club as string, (factionSizes.get(attributes.club as string) ?? 0) + 1),
    );
    // The package's own data: 17 members with Mr. Hi, 17 with the Officer.
    assert.deepEqual(Object.fromEntries(factionSizes), { 'Mr. Hi': 17, Officer: 17 });

    const dir = await makeTempDir();
    try {
      const nodes = ['id,time', ...graph.nodes().map((id) => `${id},0`)].join('\n') + '\n';
      const edges = ['source,target', ...graph.mapEdges((_, __, source, target) => `${source},${target}`)].join('\n') + '\n';
      const labels = formatLabelsCsv(graph.mapNodes((id, attributes) => [id, attributes.club as string] as const));
      // Identity features (one-hot node index), the usual choice for a graph without attributes.
      const identity = new Float32Array(34 * 34);
      for (let i = 0; i < 34; i++) identity[i * 34 + i] = 1;
      await writeFolder(dir, {
        'dataset.json': JSON.stringify({ name: 'karate', time: { granularity: 'step' }, features: { source: 'npy' } }),
        'nodes.csv': nodes,
        'edges.csv': edges,
        'labels.csv': labels,
        'features.npy': encodeNpy(identity, [34, 34]),
      });
      const ds = await loadDataset(dir);
      assert.equal(ds.nodeIds.length, 34);
      assert.equal(ds.edges.count, 78);
      assert.deepEqual(ds.slices, [{ key: '0', index: 0, nodeCount: 34 }]);
      const summary = summarizeDataset(ds);
      assert.deepEqual(Object.fromEntries(summary.classes.map((c) => [c.name, c.labelled])), { 'Mr. Hi': 17, Officer: 17 });
      assert.equal(summary.unlabelledShare, 0);
      // Every tie of the package's graph is an edge of the dataset, between the same members.
      for (let e = 0; e < ds.edges.count; e++) assert.ok(graph.hasEdge(ds.nodeIds[ds.edges.source[e]], ds.nodeIds[ds.edges.target[e]]));
      // Member 0 (the instructor, Mr. Hi) and member 33 (the officer) lead the two factions.
      assert.equal(ds.classNames[ds.labels[ds.indexOfId.get('0')!]], 'Mr. Hi');
      assert.equal(ds.classNames[ds.labels[ds.indexOfId.get('33')!]], 'Officer');
    } finally {
      await removeDir(dir);
    }
  });
});
