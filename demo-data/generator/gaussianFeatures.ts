// Class-conditional Gaussian features for benchmarks: each failure mode has a random centroid,
// each report is its mode's centroid plus unit noise. The drifting mode's centroid travels to a
// new place over the years; novel modes sit between their look-alikes and a centroid of their
// own, so they overlap the known modes without coinciding with them.
import { SeededRandom } from '../../src/engine/util/random';
import { DRIFTING_MODE, FAILURE_MODES, driftProgress } from './scenario';
import type { ReportTimeline } from './timeline';

/** Expected distance between two independent centroids, in units of the per-dimension noise. */
const CENTROID_SEPARATION = 3.2;
/** Weights of a novel centroid: primary look-alike, secondary look-alike, its own random point. */
const NOVEL_MIX = [0.4, 0.2, 0.4];

function randomCentroid(dimensions: number, random: SeededRandom): Float64Array {
  // Two such points are CENTROID_SEPARATION apart on average, whatever the width.
  const scale = CENTROID_SEPARATION / Math.sqrt(2 * dimensions);
  const centroid = new Float64Array(dimensions);
  for (let d = 0; d < dimensions; d++) centroid[d] = scale * random.normal();
  return centroid;
}

/** Row-major nodes × dimensions float32 matrix, rows in report order. */
export function buildGaussianFeatures(timeline: ReportTimeline, dimensions: number, seed: number): Float32Array {
  const random = new SeededRandom(seed ^ 0xfea7);
  const ownCentroid = FAILURE_MODES.map(() => randomCentroid(dimensions, random));
  const driftTarget = randomCentroid(dimensions, random);
  const modeIndex = new Map(FAILURE_MODES.map((mode, m) => [mode.name, m]));
  const driftingMode = modeIndex.get(DRIFTING_MODE)!;

  const baseCentroid = FAILURE_MODES.map((mode, m) => {
    if (!mode.novel || !mode.resembles) return ownCentroid[m];
    const primary = ownCentroid[modeIndex.get(mode.resembles.primary)!];
    const secondary = ownCentroid[modeIndex.get(mode.resembles.secondary)!];
    const mixed = new Float64Array(dimensions);
    for (let d = 0; d < dimensions; d++)
      mixed[d] = NOVEL_MIX[0] * primary[d] + NOVEL_MIX[1] * secondary[d] + NOVEL_MIX[2] * ownCentroid[m][d];
    return mixed;
  });

  const features = new Float32Array(timeline.count * dimensions);
  for (let i = 0; i < timeline.count; i++) {
    const m = timeline.mode[i];
    const centroid = baseCentroid[m];
    const drift = m === driftingMode ? driftProgress(timeline.slice[i]) : 0;
    const row = i * dimensions;
    for (let d = 0; d < dimensions; d++) {
      const mean = drift > 0 ? (1 - drift) * centroid[d] + drift * driftTarget[d] : centroid[d];
      features[row + d] = mean + random.normal();
    }
  }
  return features;
}
