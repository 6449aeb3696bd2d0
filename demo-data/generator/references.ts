// Each report refers to a few earlier reports: mostly earlier reports of the same failure mode
// (often on the same turbine), some of the same turbine whatever the mode (follow-up visits),
// and a few unrelated ones. Links point back in time only, so the graph grows as time passes.
import { SeededRandom } from '../../src/engine/util/random';
import { FAILURE_MODES } from './scenario';
import type { ReportTimeline } from './timeline';

export interface ReferenceList {
  /** The later report. */
  source: Int32Array;
  /** The earlier report it refers to (smaller index, so not later in time). */
  target: Int32Array;
  count: number;
}

interface LinkMix {
  sameMode: number;
  sameTurbine: number;
  anyEarlier: number;
  /** Within same-mode links: chance of preferring the same turbine. */
  sameModeSameTurbine: number;
}

const KNOWN_LINKS: LinkMix = { sameMode: 0.72, sameTurbine: 0.14, anyEarlier: 0.14, sameModeSameTurbine: 0.4 };
// Novel-mode reports cite each other and their turbine's history: nobody has a name for them yet.
const NOVEL_LINKS: LinkMix = { sameMode: 0.62, sameTurbine: 0.3, anyEarlier: 0.08, sameModeSameTurbine: 0.5 };

/** Picks from a list of earlier reports, favouring recent ones. */
function recentFrom(list: number[], random: SeededRandom): number {
  return list[list.length - 1 - Math.floor(list.length * random.next() ** 2)];
}

/** Reference count range with mean edgesPerNode: [lo, 2·mean − lo]. */
export function referenceRange(edgesPerNode: number): { lo: number; hi: number } {
  const lo = Math.max(1, Math.floor(edgesPerNode / 2));
  return { lo, hi: 2 * edgesPerNode - lo };
}

export function buildReferences(timeline: ReportTimeline, edgesPerNode: number, seed: number): ReferenceList {
  const random = new SeededRandom(seed ^ 0x5eed_e0);
  const { lo, hi } = referenceRange(edgesPerNode);
  const capacity = timeline.count * hi;
  const source = new Int32Array(capacity);
  const target = new Int32Array(capacity);
  let count = 0;

  const byMode: number[][] = FAILURE_MODES.map(() => []);
  const byTurbine: number[][] = Array.from({ length: timeline.turbineCount }, () => []);
  const byModeTurbine = new Map<number, number[]>();
  const chosen: number[] = [];

  for (let i = 0; i < timeline.count; i++) {
    const m = timeline.mode[i];
    const t = timeline.turbine[i];
    const modeTurbineKey = t * FAILURE_MODES.length + m;
    const mix = FAILURE_MODES[m].novel ? NOVEL_LINKS : KNOWN_LINKS;
    const wanted = Math.min(i, lo + random.int(hi - lo + 1));
    chosen.length = 0;
    for (let attempt = 0; chosen.length < wanted && attempt < 4 * wanted; attempt++) {
      const r = random.next();
      let pool: number[] | undefined;
      if (r < mix.sameMode) {
        const sameBoth = byModeTurbine.get(modeTurbineKey);
        pool = sameBoth && sameBoth.length > 0 && random.next() < mix.sameModeSameTurbine ? sameBoth : byMode[m];
      } else if (r < mix.sameMode + mix.sameTurbine) {
        pool = byTurbine[t];
      }
      const j = pool && pool.length > 0 ? recentFrom(pool, random) : i - 1 - Math.floor(i * random.next() ** 2);
      if (!chosen.includes(j)) chosen.push(j);
    }
    for (const j of chosen) {
      source[count] = i;
      target[count] = j;
      count++;
    }
    byMode[m].push(i);
    byTurbine[t].push(i);
    const list = byModeTurbine.get(modeTurbineKey);
    if (list) list.push(i);
    else byModeTurbine.set(modeTurbineKey, [i]);
  }
  return { source: source.subarray(0, count), target: target.subarray(0, count), count };
}
