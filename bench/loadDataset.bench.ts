// Time and memory to load a generated dataset of 100,000 nodes and 1,000,000 edges (numeric
// feature columns, quarterly slices, 30% labelled). Prints figures; never passes or fails.
// Run: node --expose-gc --import tsx bench/loadDataset.bench.ts
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { loadDataset } from '../src/engine/dataset/load';
import { SeededRandom } from '../src/engine/util/random';

async function main(): Promise<void> {
  const nodeCount = 100_000;
  const edgeCount = 1_000_000;
  const dir = await fs.mkdtemp(path.join(os.tmpdir(), 'load-bench-'));
  const random = new SeededRandom(3);
  const nodes: string[] = ['id,time,a,b,c,d\n'];
  const labels: string[] = ['id,label\n'];
  for (let i = 0; i < nodeCount; i++) {
    nodes.push(
      `node-${i},${2015 + (i % 8)}-${String(1 + (i % 12)).padStart(2, '0')}-01,${random.next().toFixed(4)},${random.next().toFixed(4)},${random.normal().toFixed(4)},${i % 5}\n`,
    );
    if (random.next() < 0.3) labels.push(`node-${i},class-${i % 6}\n`);
  }
  const edges: string[] = ['source,target\n'];
  for (let e = 0; e < edgeCount; e++) edges.push(`node-${random.int(nodeCount)},node-${random.int(nodeCount)}\n`);
  await fs.writeFile(path.join(dir, 'nodes.csv'), nodes.join(''));
  await fs.writeFile(path.join(dir, 'edges.csv'), edges.join(''));
  await fs.writeFile(path.join(dir, 'labels.csv'), labels.join(''));
  await fs.writeFile(
    path.join(dir, 'dataset.json'),
    JSON.stringify({ name: 'bench', nodeColumns: { features: ['a', 'b', 'c', 'd'] }, features: { source: 'columns' } }),
  );
  (globalThis as { gc?: () => void }).gc?.();
  const heapBefore = process.memoryUsage().heapUsed;
  for (let round = 0; round < 2; round++) {
    const start = performance.now();
    const ds = await loadDataset(dir);
    const seconds = (performance.now() - start) / 1000;
    const heap = (process.memoryUsage().heapUsed - heapBefore) / 2 ** 20;
    console.log(
      `load ${ds.nodeIds.length.toLocaleString('en')} nodes, ${ds.edges.count.toLocaleString('en')} edges, ${ds.slices.length} slices: ${seconds.toFixed(2)} s, heap +${heap.toFixed(0)} MiB, rss ${(process.memoryUsage().rss / 2 ** 20).toFixed(0)} MiB`,
    );
  }
  await fs.rm(dir, { recursive: true, force: true });
}

void main();
