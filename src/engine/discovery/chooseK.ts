// Number of groups by the best mean silhouette over a range of k.
// Up to sampleThreshold points (default 5,000), k-means runs on all points for each k and the silhouette is
// measured on a seeded sample of at most silhouetteSampleSize of them (exact below that).
// Above sampleThreshold, k is chosen on a seeded sample alone; then every point is assigned to
// the nearest chosen centre and a few Lloyd steps refine the centres on all points.
import { SeededRandom } from '../util/random';
import { kmeans, type KMeansResult } from './kmeans';
import { meanOfValues, pairwiseDistances, silhouetteFromDistances } from './silhouette';
import { deriveSeed, gatherRows, sampleIndices } from './vectors';

export interface ChooseKOptions {
  /** Default 5,000: above it, choosing k on all points costs seconds for little gain. */
  sampleThreshold?: number;
  /** Points used to measure the silhouette (and to choose k above sampleThreshold). Default 2,000. */
  silhouetteSampleSize?: number;
  /** k-means runs per k, best inertia kept. Default 3 up to 1,000 clustered points, else 1. */
  restarts?: number;
  /** Lloyd steps on all points after choosing k on a sample. Default 5. */
  refineIterations?: number;
}

export interface KSelection {
  k: number;
  result: KMeansResult;
  silhouetteByK: { k: number; silhouette: number }[];
  /** The distance matrix used for the silhouettes, when it covers every point (reusable for per-point values). */
  allPointDistances: Float32Array | null;
}

function bestOfRestarts(points: Float32Array, dim: number, k: number, seed: number, restarts: number): KMeansResult {
  let best: KMeansResult | null = null;
  for (let r = 0; r < restarts; r++) {
    const run = kmeans(points, dim, k, { seed: deriveSeed(seed, k, r) });
    if (!best || run.inertia < best.inertia) best = run;
  }
  return best as KMeansResult;
}

export function chooseGroupCount(
  points: Float32Array,
  dim: number,
  kRange: [number, number],
  seed: number,
  options: ChooseKOptions = {},
): KSelection {
  const n = points.length / dim;
  const sampleThreshold = options.sampleThreshold ?? 5000;
  const silhouetteSampleSize = options.silhouetteSampleSize ?? 2000;
  const large = n > sampleThreshold;
  const clustered = large ? gatherRows(points, dim, sampleIndices(n, silhouetteSampleSize, new SeededRandom(deriveSeed(seed, 1)))) : points;
  const clusteredCount = clustered.length / dim;
  const kMin = kRange[0];
  const kMax = Math.min(kRange[1], clusteredCount - 1);
  if (kMax < kMin) throw new Error(`discovery: ${clusteredCount} points are too few to try k from ${kMin}`);
  const restarts = options.restarts ?? (clusteredCount <= 1000 ? 3 : 1);
  const evaluated = sampleIndices(clusteredCount, silhouetteSampleSize, new SeededRandom(deriveSeed(seed, 2)));
  const distances = pairwiseDistances(clustered, dim, evaluated);
  const evaluatedAssignment = new Int32Array(evaluated.length);
  const silhouetteByK: { k: number; silhouette: number }[] = [];
  let best: { k: number; result: KMeansResult; silhouette: number } | null = null;
  for (let k = kMin; k <= kMax; k++) {
    const result = bestOfRestarts(clustered, dim, k, seed, restarts);
    for (let s = 0; s < evaluated.length; s++) evaluatedAssignment[s] = result.assignment[evaluated[s]];
    const silhouette = meanOfValues(silhouetteFromDistances(distances, evaluated.length, evaluatedAssignment, k));
    silhouetteByK.push({ k, silhouette });
    // Strictly better only: on ties the smaller k wins.
    if (!best || silhouette > best.silhouette) best = { k, result, silhouette };
  }
  const chosen = best as { k: number; result: KMeansResult };
  if (!large) return { k: chosen.k, result: chosen.result, silhouetteByK, allPointDistances: evaluated.length === n ? distances : null };
  const refined = kmeans(points, dim, chosen.k, {
    seed,
    initialCentres: chosen.result.centres,
    maxIterations: options.refineIterations ?? 5,
  });
  return { k: chosen.k, result: refined, silhouetteByK, allPointDistances: null };
}
