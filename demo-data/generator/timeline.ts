// Who reports what, where and when: the number of reports per quarter, the failure mode of
// each report, its date and its turbine. Reports are numbered in date order, so the id order,
// the nodes.csv order and the time order are one and the same.
import { SeededRandom } from '../../src/engine/util/random';
import { FAILURE_MODES, FIRST_YEAR, KNOWN_MODE_WEIGHTS, SITES, SLICE_COUNT, novelShare } from './scenario';

export interface ReportTimeline {
  count: number;
  /** Quarter index (0 = 2019-Q1) of each report. */
  slice: Int32Array;
  /** ISO date (YYYY-MM-DD) of each report. */
  date: string[];
  /** True failure mode of each report, an index into FAILURE_MODES. */
  mode: Int32Array;
  turbine: Int32Array;
  turbineCount: number;
  /** Site index (into SITES) of each turbine. */
  turbineSite: Int32Array;
}

/** Splits total into integer parts proportional to weights (largest remainder), summing to total. */
export function apportion(total: number, weights: number[]): number[] {
  const sum = weights.reduce((a, b) => a + b, 0);
  const exact = weights.map((w) => (total * w) / sum);
  const parts = exact.map(Math.floor);
  let missing = total - parts.reduce((a, b) => a + b, 0);
  const byRemainder = exact.map((x, i) => ({ i, r: x - Math.floor(x) })).sort((a, b) => b.r - a.r || a.i - b.i);
  for (let k = 0; missing > 0; k = (k + 1) % byRemainder.length, missing--) parts[byRemainder[k].i]++;
  return parts;
}

/** Mode counts of one quarter: novel modes take their share, known modes split the rest. */
function modeCounts(slice: number, reports: number): number[] {
  const weights = new Array<number>(FAILURE_MODES.length).fill(0);
  let novelTotal = 0;
  FAILURE_MODES.forEach((mode, m) => {
    if (mode.novel) {
      weights[m] = novelShare(mode, slice);
      novelTotal += weights[m];
    }
  });
  let known = 0;
  FAILURE_MODES.forEach((mode, m) => {
    if (!mode.novel) weights[m] = (1 - novelTotal) * KNOWN_MODE_WEIGHTS[known++];
  });
  const counts = apportion(reports, weights);
  // A novel mode must really start in its first quarter, however small the graph.
  FAILURE_MODES.forEach((mode, m) => {
    if (mode.novel && slice === mode.firstSlice && counts[m] === 0) {
      const donor = counts.indexOf(Math.max(...counts));
      counts[donor]--;
      counts[m]++;
    }
  });
  return counts;
}

function quarterBounds(slice: number): { start: number; days: number } {
  const year = FIRST_YEAR + Math.floor(slice / 4);
  const month = (slice % 4) * 3;
  const start = Date.UTC(year, month, 1);
  const end = Date.UTC(year, month + 3, 1);
  return { start, days: Math.round((end - start) / 86_400_000) };
}

export function buildTimeline(nodes: number, seed: number): ReportTimeline {
  const random = new SeededRandom(seed ^ 0x7131);
  // The fleet grows: the newest quarter has a bit more than twice the reports of the first.
  const perSlice = apportion(
    nodes,
    Array.from({ length: SLICE_COUNT }, (_, s) => 1 + 0.05 * s),
  );

  const turbineCount = Math.max(12, Math.round(nodes / 40));
  const turbineSite = new Int32Array(turbineCount);
  for (let t = 0; t < turbineCount; t++) turbineSite[t] = t < SITES.length ? t : random.int(SITES.length);
  const exposedTurbines: number[] = [];
  for (let t = 0; t < turbineCount; t++) if (SITES[turbineSite[t]].exposed) exposedTurbines.push(t);
  // Main shaft cracks concern one older turbine series: a fixed fifth of the fleet.
  const crackProneTurbines = random
    .shuffle(Array.from({ length: turbineCount }, (_, t) => t))
    .slice(0, Math.max(2, Math.round(turbineCount / 5)));

  const slice = new Int32Array(nodes);
  const mode = new Int32Array(nodes);
  const turbine = new Int32Array(nodes);
  const date: string[] = new Array<string>(nodes);
  const turbinesSeenByMode: number[][] = FAILURE_MODES.map(() => []);

  let next = 0;
  for (let s = 0; s < SLICE_COUNT; s++) {
    const reports = perSlice[s];
    const modes: number[] = [];
    modeCounts(s, reports).forEach((count, m) => {
      for (let k = 0; k < count; k++) modes.push(m);
    });
    random.shuffle(modes);
    const { start, days } = quarterBounds(s);
    const dayOffsets = Array.from({ length: reports }, () => random.int(days)).sort((a, b) => a - b);
    for (let k = 0; k < reports; k++, next++) {
      const m = modes[k];
      slice[next] = s;
      mode[next] = m;
      date[next] = new Date(start + dayOffsets[k] * 86_400_000).toISOString().slice(0, 10);
      const seen = turbinesSeenByMode[m];
      let t: number;
      if (FAILURE_MODES[m].name === 'lightning-receptor-damage') t = exposedTurbines[random.int(exposedTurbines.length)];
      else if (FAILURE_MODES[m].name === 'main-shaft-cracking') t = crackProneTurbines[random.int(crackProneTurbines.length)];
      // A fault often comes back on the turbine that had it before.
      else if (seen.length > 0 && random.next() < 0.3) t = seen[seen.length - 1 - Math.floor(seen.length * random.next() ** 2)];
      else t = random.int(turbineCount);
      turbine[next] = t;
      seen.push(t);
    }
  }
  return { count: nodes, slice, date, mode, turbine, turbineCount, turbineSite };
}
