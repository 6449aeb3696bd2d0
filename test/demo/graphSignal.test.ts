// The scenario promises that the graph carries signal the features lack: with Gaussian features,
// averaging a report with the reports it links to must classify better than the report alone,
// and novel failure modes must look like known ones when seen through the features only.
import { strict as assert } from 'node:assert';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import type { DatasetManifest } from '../../src/engine/dataset/types';
import { generateInTemp, readCsv, readJson, removeTemporaryFolders } from './demoFixture';

const NODES = 1500;
const WIDTH = 16;

function nearest(row: Float64Array, means: Float64Array[]): number {
  let best = 0;
  let bestDistance = Infinity;
  means.forEach((mean, c) => {
    let d = 0;
    for (let k = 0; k < row.length; k++) d += (row[k] - mean[k]) ** 2;
    if (d < bestDistance) {
      bestDistance = d;
      best = c;
    }
  });
  return best;
}

describe('demo generator: Gaussian features and graph signal', () => {
  after(removeTemporaryFolders);

  it('writes features.npy in the NumPy format and points the manifest at it', async () => {
    const generated = await generateInTemp({ nodes: NODES, features: WIDTH, seed: 5 });
    const manifest = await readJson<DatasetManifest>(path.join(generated.folder, 'dataset.json'));
    assert.equal(manifest.features.source, 'npy');
    assert.equal(manifest.files.features, 'features.npy');

    const npy = await fs.readFile(path.join(generated.folder, 'features.npy'));
    // NumPy's format description (numpy.lib.format): magic "\x93NUMPY", version bytes, a
    // little-endian uint16 header length (version 1.0), and magic + 2 + 2 + header length
    // divisible by 64 for alignment.
    assert.deepEqual([...npy.subarray(0, 6)], [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]);
    assert.equal(npy[6], 1);
    const headerLength = npy.readUInt16LE(8);
    assert.equal((10 + headerLength) % 64, 0);
    const header = npy.subarray(10, 10 + headerLength).toString('latin1');
    assert.match(header, /'descr': '<f4'/);
    assert.match(header, new RegExp(`'shape': \\(${NODES}, ${WIDTH}\\)`));
    assert.equal(npy.length, 10 + headerLength + NODES * WIDTH * 4);

    const values = new Float32Array(npy.buffer.slice(npy.byteOffset + 10 + headerLength, npy.byteOffset + npy.length));
    const nodes = await readCsv(path.join(generated.folder, 'nodes.csv'));
    const edges = await readCsv(path.join(generated.folder, 'edges.csv'));
    const labels = await readCsv(path.join(generated.folder, 'labels.csv'));
    const truth = new Map((await readCsv(generated.truthFile)).map((r) => [r.id, r.label]));
    const index = new Map(nodes.map((n, i) => [n.id, i]));
    const row = (i: number) => Float64Array.from(values.subarray(i * WIDTH, (i + 1) * WIDTH));

    const classNames = [...new Set(labels.map((l) => l.label))].sort();
    const means = classNames.map(() => new Float64Array(WIDTH));
    const counts = new Array<number>(classNames.length).fill(0);
    for (const l of labels) {
      const c = classNames.indexOf(l.label);
      const x = row(index.get(l.id)!);
      for (let k = 0; k < WIDTH; k++) means[c][k] += x[k];
      counts[c]++;
    }
    means.forEach((m, c) => m.forEach((_, k) => (m[k] /= counts[c])));

    const neighbours: number[][] = nodes.map(() => []);
    for (const e of edges) {
      const a = index.get(e.source)!;
      const b = index.get(e.target)!;
      neighbours[a].push(b);
      neighbours[b].push(a);
    }
    const smoothed = (i: number) => {
      const x = row(i);
      if (neighbours[i].length === 0) return x;
      const out = x.map((v) => v / 2);
      for (const j of neighbours[i]) {
        const y = row(j);
        for (let k = 0; k < WIDTH; k++) out[k] += y[k] / (2 * neighbours[i].length);
      }
      return out;
    };

    const labelled = new Set(labels.map((l) => l.id));
    let alone = 0;
    let withNeighbours = 0;
    let tested = 0;
    for (let i = 0; i < nodes.length; i++) {
      const c = classNames.indexOf(truth.get(nodes[i].id)!);
      if (labelled.has(nodes[i].id) || c < 0) continue;
      tested++;
      if (nearest(row(i), means) === c) alone++;
      if (nearest(smoothed(i), means) === c) withNeighbours++;
    }
    const aloneAccuracy = alone / tested;
    const graphAccuracy = withNeighbours / tested;
    assert.ok(aloneAccuracy > 0.4 && aloneAccuracy < 0.92, `feature-only accuracy ${aloneAccuracy}`);
    assert.ok(graphAccuracy > aloneAccuracy + 0.08, `graph ${graphAccuracy} vs features ${aloneAccuracy}`);

    // Novel modes sit nearest their main look-alike, so features alone mistake them for it.
    const lookAlike: Record<string, string> = {
      'lightning-receptor-damage': 'blade-surface-erosion',
      'main-shaft-cracking': 'gearbox-bearing-wear',
    };
    for (const [novel, known] of Object.entries(lookAlike)) {
      const votes = new Array<number>(classNames.length).fill(0);
      nodes.forEach((n, i) => {
        if (truth.get(n.id) === novel) votes[nearest(row(i), means)]++;
      });
      const total = votes.reduce((a, b) => a + b, 0);
      const target = classNames.indexOf(known);
      assert.ok(
        votes[target] / total > 0.35 && votes[target] === Math.max(...votes),
        `${novel}: ${JSON.stringify(votes)} over ${classNames.join(', ')}`,
      );
    }
  });
});
