// Mini-batches of mlp/sign training. The training rows are laid out once in a seeded random
// order and cut into nearly equal contiguous batches, so every shard keeps its rows resident
// (simdShard.ts) and a step only names a row range; each pass over the data visits the batches
// in a fresh seeded order. Below one batch's worth of rows training stays full batch, exactly as
// before, so small datasets train the same way whatever the batch size.
import type { SeededRandom } from '../util/random';

export interface BatchPlan {
  /** Training row (index into the training set) laid out at each position. */
  order: Int32Array;
  /** Batches one pass over the rows is cut into. */
  batchCount: number;
}

/** The plan for rowCount training rows, or null when they fit in one batch (or batchRows is 0). */
export function batchPlan(rowCount: number, batchRows: number, random: SeededRandom): BatchPlan | null {
  if (!Number.isInteger(batchRows) || batchRows < 0) throw new RangeError(`batchRows must be a whole number ≥ 0, got ${batchRows}`);
  if (batchRows === 0 || rowCount <= batchRows) return null;
  const order = random.shuffle(Int32Array.from({ length: rowCount }, (_, i) => i));
  return { order, batchCount: Math.ceil(rowCount / batchRows) };
}

/** The batch each of `steps` steps uses: every pass visits each batch once, in a fresh seeded order. */
export function batchSchedule(batchCount: number, steps: number, random: SeededRandom): Int32Array {
  const schedule = new Int32Array(steps);
  const pass = Int32Array.from({ length: batchCount }, (_, i) => i);
  for (let start = 0; start < steps; start += batchCount) {
    random.shuffle(pass);
    schedule.set(pass.subarray(0, Math.min(batchCount, steps - start)), start);
  }
  return schedule;
}

/**
 * Rows [from, to) of batch `batch` within a block of `rows` rows cut into batchCount parts. The
 * shard workers repeat this formula inline (their code is shipped as text).
 */
export function batchRange(rows: number, batch: number, batchCount: number): [number, number] {
  return [Math.round((rows * batch) / batchCount), Math.round((rows * (batch + 1)) / batchCount)];
}

/** Reorders the training rows into the plan's layout. */
export function laidOut<T extends Int32Array>(values: T, order: Int32Array): T {
  const out = values.slice() as T;
  for (let i = 0; i < order.length; i++) out[i] = values[order[i]];
  return out;
}
