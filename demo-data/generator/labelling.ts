// Which reports carry a curated label: a fixed share of each quarter, chosen at random among
// its known-mode reports (novel modes have no name yet, so nobody labelled them).
import { SeededRandom } from '../../src/engine/util/random';
import { FAILURE_MODES, SLICE_COUNT, labelledShare } from './scenario';
import type { ReportTimeline } from './timeline';

/** true for each report that has a curated label (its true mode). */
export function chooseLabelled(timeline: ReportTimeline, seed: number): Uint8Array {
  const random = new SeededRandom(seed ^ 0x1abe1);
  const labelled = new Uint8Array(timeline.count);
  const knownBySlice: number[][] = Array.from({ length: SLICE_COUNT }, () => []);
  const sliceSize = new Int32Array(SLICE_COUNT);
  for (let i = 0; i < timeline.count; i++) {
    sliceSize[timeline.slice[i]]++;
    if (!FAILURE_MODES[timeline.mode[i]].novel) knownBySlice[timeline.slice[i]].push(i);
  }
  for (let s = 0; s < SLICE_COUNT; s++) {
    const candidates = random.shuffle(knownBySlice[s]);
    const quota = Math.min(candidates.length, Math.round(labelledShare(s) * sliceSize[s]));
    for (let k = 0; k < quota; k++) labelled[candidates[k]] = 1;
  }
  return labelled;
}
