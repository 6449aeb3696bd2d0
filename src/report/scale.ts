// Linear scales and "nice" axis ticks for the report's charts, written to the same rules as
// d3-array's ticks/tickIncrement (steps of 1, 2 or 5 times a power of ten) so axes read the same
// way as the charts people are used to; swapping in d3-scale later changes no axis.

const e10 = Math.sqrt(50);
const e5 = Math.sqrt(10);
const e2 = Math.sqrt(2);

/** Tick step for about `count` ticks over [start, stop]; negative −k means a step of 1/k (exact in floating point). */
export function tickIncrement(start: number, stop: number, count: number): number {
  const step = (stop - start) / Math.max(0, count);
  const power = Math.floor(Math.log10(step));
  const error = step / Math.pow(10, power);
  const factor = error >= e10 ? 10 : error >= e5 ? 5 : error >= e2 ? 2 : 1;
  return power >= 0 ? factor * Math.pow(10, power) : -Math.pow(10, -power) / factor;
}

/** About count + 1 round values within [start, stop] (inclusive), in increasing order. */
export function ticks(start: number, stop: number, count: number): number[] {
  if (!(count > 0) || !Number.isFinite(start) || !Number.isFinite(stop)) return [];
  if (start === stop) return [start];
  const reverse = stop < start;
  const [lo, hi] = reverse ? [stop, start] : [start, stop];
  const increment = tickIncrement(lo, hi, count);
  if (increment === 0 || !Number.isFinite(increment)) return [];
  const out: number[] = [];
  if (increment > 0) {
    const first = Math.ceil(lo / increment);
    const last = Math.floor(hi / increment);
    for (let k = first; k <= last; k++) out.push(k * increment);
  } else {
    const inverse = -increment;
    const first = Math.ceil(lo * inverse);
    const last = Math.floor(hi * inverse);
    for (let k = first; k <= last; k++) out.push(k / inverse);
  }
  return reverse ? out.reverse() : out;
}

/** [start, stop] widened outwards to whole tick steps. */
export function niceDomain(start: number, stop: number, count: number): [number, number] {
  let previous: number | undefined;
  for (let round = 0; round < 10; round++) {
    const step = tickIncrement(start, stop, count);
    if (step === previous || step === 0 || !Number.isFinite(step)) break;
    if (step > 0) {
      start = Math.floor(start / step) * step;
      stop = Math.ceil(stop / step) * step;
    } else {
      start = Math.ceil(start * step) / step;
      stop = Math.floor(stop * step) / step;
    }
    previous = step;
  }
  return [start, stop];
}

export interface LinearScale {
  (value: number): number;
  domain: [number, number];
  range: [number, number];
  ticks(count: number): number[];
}

export function linearScale(domain: [number, number], range: [number, number]): LinearScale {
  const [d0, d1] = domain;
  const [r0, r1] = range;
  const span = d1 - d0;
  const scale = ((value: number) => (span === 0 ? (r0 + r1) / 2 : r0 + ((value - d0) / span) * (r1 - r0))) as LinearScale;
  scale.domain = domain;
  scale.range = range;
  scale.ticks = (count: number) => ticks(d0, d1, count);
  return scale;
}
