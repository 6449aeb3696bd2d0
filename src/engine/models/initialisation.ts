// Weight initialisation from the project's seeded generator, so that a run is reproducible
// for a given seed whatever backend computes it.
import type { SeededRandom } from '../util/random';

/** Glorot-uniform: U(-b, b) with b = sqrt(6 / (fanIn + fanOut)), for a fanIn × fanOut matrix. */
export function glorotUniform(fanIn: number, fanOut: number, random: SeededRandom): Float32Array {
  const bound = Math.sqrt(6 / (fanIn + fanOut));
  const out = new Float32Array(fanIn * fanOut);
  for (let i = 0; i < out.length; i++) out[i] = (2 * random.next() - 1) * bound;
  return out;
}

/**
 * Inverted dropout mask: each entry is 0 with probability rate, else 1 / (1 - rate), so the
 * expected activation is unchanged and prediction needs no rescaling. Each 32-bit draw gives
 * two 16-bit decisions (rate resolution 1/65536), which halves the cost on large layers.
 */
export function dropoutMask(count: number, rate: number, random: SeededRandom, out: Float32Array = new Float32Array(count)): Float32Array {
  if (rate <= 0) return out.fill(1, 0, count);
  const keepValue = 1 / (1 - rate);
  const dropBelow = Math.round(rate * 65536);
  let i = 0;
  for (; i + 1 < count; i += 2) {
    const bits = Math.floor(random.next() * 4294967296);
    out[i] = (bits & 0xffff) < dropBelow ? 0 : keepValue;
    out[i + 1] = bits >>> 16 < dropBelow ? 0 : keepValue;
  }
  if (i < count) out[i] = Math.floor(random.next() * 65536) < dropBelow ? 0 : keepValue;
  return out;
}
