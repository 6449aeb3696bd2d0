// Metrics of learning over a sequence of time slices, from an accuracy matrix R where
// R[i][j] = accuracy on slice j after training through slice i (0-based here; T slices).
// The usual GEM-style definitions (ACC, BWT, FWT), written 1-based:
//   ACC = (1/T) Σ_{i=1..T} R_{T,i}
//   BWT = 1/(T−1) Σ_{i=1..T−1} (R_{T,i} − R_{i,i})   (negative = forgetting of earlier slices)
//   FWT = 1/(T−1) Σ_{i=2..T} (R_{i−1,i} − b̄_i)       (b̄_i = accuracy on slice i of the untrained,
//                                                    randomly initialised model)
// Only the entries a metric reads must be present and finite; others (e.g. above the first
// superdiagonal) may be anything.

function entry(R: number[][], i: number, j: number, name: string): number {
  const row = R[i];
  const value = row === undefined ? undefined : row[j];
  if (typeof value !== 'number' || !Number.isFinite(value))
    throw new RangeError(`${name}: R[${i}][${j}] must be a finite number, got ${value}`);
  return value;
}

/** ACC: mean accuracy over all T slices after training through the last one. NaN for an empty matrix. */
export function averageAccuracy(R: number[][]): number {
  const T = R.length;
  if (T === 0) return NaN;
  let total = 0;
  for (let i = 0; i < T; i++) total += entry(R, T - 1, i, 'averageAccuracy');
  return total / T;
}

/** BWT: mean change of each earlier slice's accuracy from just after it was learned to the end. NaN when T < 2. */
export function backwardTransfer(R: number[][]): number {
  const T = R.length;
  if (T < 2) return NaN;
  let total = 0;
  for (let i = 0; i < T - 1; i++) total += entry(R, T - 1, i, 'backwardTransfer') - entry(R, i, i, 'backwardTransfer');
  return total / (T - 1);
}

/**
 * FWT: mean gain on each slice before training on it (after the previous slice) over the untrained
 * baseline; baseline[i] = b̄ for slice i (baseline[0] is not read but must be given). NaN when T < 2.
 */
export function forwardTransfer(R: number[][], baseline: number[]): number {
  const T = R.length;
  if (baseline.length !== T) throw new RangeError(`forwardTransfer: ${baseline.length} baseline accuracies for ${T} slices`);
  if (T < 2) return NaN;
  let total = 0;
  for (let i = 1; i < T; i++) {
    const b = baseline[i];
    if (!Number.isFinite(b)) throw new RangeError(`forwardTransfer: baseline[${i}] must be a finite number, got ${b}`);
    total += entry(R, i - 1, i, 'forwardTransfer') - b;
  }
  return total / (T - 1);
}

/**
 * The project's operational "forward transfer" per slice: accuracy on the slice when training
 * starts from the previous slice's model (warm) minus when it starts from a fresh initialisation
 * (cold), all else equal. Positive = carrying the model forward helps. Unlike GEM's FWT, both runs
 * are trained on the slice; this isolates the value of the warm start. NaN entries (a slice with
 * nothing to evaluate) propagate.
 */
export function warmMinusCold(warm: number[], cold: number[]): number[] {
  if (warm.length !== cold.length) throw new RangeError(`warmMinusCold: ${warm.length} warm accuracies for ${cold.length} cold ones`);
  return warm.map((w, i) => w - cold[i]);
}
