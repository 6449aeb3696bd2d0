// Adjusted Rand index between two partitions of the same items, from their contingency table:
//   index = Σ_ij C(n_ij, 2), rows = Σ_i C(a_i, 2), cols = Σ_j C(b_j, 2), total = C(n, 2)
//   expected = rows · cols / total, max = (rows + cols) / 2
//   ARI = (index − expected) / (max − expected)
// computed below in its equivalent pair-count form.
// Label values carry no meaning; only which items share one does.

function choose2(x: number): number {
  return (x * (x - 1)) / 2;
}

export function adjustedRandIndex(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) throw new Error(`adjustedRandIndex: the partitions have ${a.length} and ${b.length} items`);
  const n = a.length;
  const rowOf = new Map<number, number>();
  const colOf = new Map<number, number>();
  const cells = new Map<number, number>();
  const rowCounts: number[] = [];
  const colCounts: number[] = [];
  for (let i = 0; i < n; i++) {
    let r = rowOf.get(a[i]);
    if (r === undefined) {
      r = rowCounts.length;
      rowOf.set(a[i], r);
      rowCounts.push(0);
    }
    let c = colOf.get(b[i]);
    if (c === undefined) {
      c = colCounts.length;
      colOf.set(b[i], c);
      colCounts.push(0);
    }
    rowCounts[r]++;
    colCounts[c]++;
    const key = r * n + c;
    cells.set(key, (cells.get(key) ?? 0) + 1);
  }
  let index = 0;
  for (const count of cells.values()) index += choose2(count);
  let rows = 0;
  for (const count of rowCounts) rows += choose2(count);
  let cols = 0;
  for (const count of colCounts) cols += choose2(count);
  const total = choose2(n);
  // The same quantity in pair counts (together in both, split in one, apart in both): whole numbers
  // until the last division, so small cases come out exact (e.g. −0.5 rather than −0.49999…).
  const together = index;
  const onlyA = rows - index;
  const onlyB = cols - index;
  const apart = total - rows - cols + index;
  if (onlyA === 0 && onlyB === 0) return 1;
  return (2 * (together * apart - onlyA * onlyB)) / ((together + onlyA) * (onlyA + apart) + (together + onlyB) * (onlyB + apart));
}
