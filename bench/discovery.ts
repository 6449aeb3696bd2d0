// Discovery timings: 2,000 and 20,000 rejected nodes × 64 dimensions, plus 4,000 known nodes.
// Prints figures only; run alone with `npx tsx bench/discovery.ts`.
import { discoverCandidates } from '../src/engine/discovery/candidates';
import { chooseGroupCount } from '../src/engine/discovery/chooseK';
import { kmeans } from '../src/engine/discovery/kmeans';
import { silhouetteValuesAgainstReference, silhouetteValues } from '../src/engine/discovery/silhouette';
import { gatherRows, sampleIndices } from '../src/engine/discovery/vectors';
import { buildAdjacency } from '../src/engine/graph/csr';
import { SeededRandom } from '../src/engine/util/random';

const dim = 64;
const knownCount = 4000;
const knownClasses = 4;
const novelBlobs = 8;
const linksPerNode = 5;

function syntheticInput(rejectedCount: number, seed: number) {
  const random = new SeededRandom(seed);
  const nodeCount = knownCount + rejectedCount;
  const groupCount = knownClasses + novelBlobs;
  const means = Array.from({ length: groupCount }, () => Array.from({ length: dim }, () => random.normal() * 0.6));
  const group = new Int32Array(nodeCount);
  const embeddings = new Float32Array(nodeCount * dim);
  const membersOf: number[][] = Array.from({ length: groupCount }, () => []);
  for (let node = 0; node < nodeCount; node++) {
    const g = node < knownCount ? node % knownClasses : knownClasses + random.int(novelBlobs);
    group[node] = g;
    membersOf[g].push(node);
    for (let d = 0; d < dim; d++) embeddings[node * dim + d] = means[g][d] + random.normal();
  }
  const source: number[] = [];
  const target: number[] = [];
  for (let node = 0; node < nodeCount; node++) {
    for (let l = 0; l < linksPerNode; l++) {
      const sameGroup = random.next() < 0.9;
      const pool = sameGroup ? membersOf[group[node]] : membersOf[random.int(groupCount)];
      const other = pool[random.int(pool.length)];
      if (other !== node) {
        source.push(node);
        target.push(other);
      }
    }
  }
  const adjacency = buildAdjacency(
    nodeCount,
    { source: Int32Array.from(source), target: Int32Array.from(target), weight: null, count: source.length },
    true,
  );
  const labels = new Int32Array(nodeCount).fill(-1);
  const predictedClass = new Int32Array(nodeCount).fill(-1);
  for (let node = 0; node < knownCount; node++) {
    predictedClass[node] = group[node];
    if (node % 2 === 0) labels[node] = group[node];
  }
  const words = ['blade', 'icing', 'yaw', 'pitch', 'gearbox', 'bearing', 'vibration', 'grid', 'storm', 'sensor', 'oil', 'heat'];
  const nodeText = Array.from(
    group,
    (g) => `${words[g % words.length]} ${words[(g * 5 + 1) % words.length]} ${words[random.int(words.length)]}`,
  );
  const rejectedNodes = Int32Array.from({ length: rejectedCount }, (_, i) => knownCount + i);
  return {
    rejectedNodes,
    embeddings,
    embeddingDim: dim,
    adjacency,
    nodeText,
    nodeSlice: Int32Array.from({ length: nodeCount }, (_, i) => Math.floor((i / nodeCount) * 8)),
    sliceKeys: Array.from({ length: 8 }, (_, s) => `step-${s}`),
    labels,
    predictedClass,
    classNames: Array.from({ length: knownClasses }, (_, c) => `class-${c}`),
    noveltyScore: new Float32Array(nodeCount).fill(0.5),
    seed,
  };
}

interface Timing {
  wallMs: number;
  cpuMs: number;
}

/** Wall and CPU time: on a shared machine the CPU time is the steadier figure. */
function time<T>(work: () => T): [T, Timing] {
  const cpuStart = process.cpuUsage();
  const start = process.hrtime.bigint();
  const result = work();
  const cpu = process.cpuUsage(cpuStart);
  return [result, { wallMs: Number(process.hrtime.bigint() - start) / 1e6, cpuMs: (cpu.user + cpu.system) / 1000 }];
}

function show(t: Timing): string {
  return `${t.wallMs.toFixed(0)} ms (cpu ${t.cpuMs.toFixed(0)})`;
}

export function runDiscoveryBenchmarks(print: (line: string) => void): void {
  print(`discovery: ${dim} dims, ${knownCount} known nodes, ${novelBlobs} planted novel blobs, ~${linksPerNode * 2} links per node`);
  for (const rejectedCount of [2000, 20000]) {
    const input = syntheticInput(rejectedCount, 17);
    const points = gatherRows(input.embeddings, dim, input.rejectedNodes);
    const [, oneKmeans] = time(() => kmeans(points, dim, 8, { seed: 1 }));
    const [selection, chooseMs] = time(() => chooseGroupCount(points, dim, [2, 10], 1));
    const [, silhouetteMs] = time(() =>
      rejectedCount <= 3000
        ? silhouetteValues(points, dim, selection.result.assignment, selection.k)
        : silhouetteValuesAgainstReference(
            points,
            dim,
            selection.result.assignment,
            selection.k,
            sampleIndices(rejectedCount, 500, new SeededRandom(3)),
          ),
    );
    const [result, totalMs] = time(() => discoverCandidates(input));
    print(
      `  ${rejectedCount} rejected: k-means k=8 ${show(oneKmeans)}; choose k (2..10) ${show(chooseMs)}; ` +
        `per-node silhouette ${show(silhouetteMs)}; whole discovery ${show(totalMs)} ` +
        `(k=${result.chosenK}, ${result.candidates.length} candidates, ${result.scattered.length} scattered)`,
    );
  }
}

if (process.argv[1] && /bench[\\/]discovery\.ts$/.test(process.argv[1])) runDiscoveryBenchmarks((line) => console.log(line));
