// The SIMD kernels behind the signatures of dense/matmul.ts and graph/spmm.ts: operands are
// copied into a workspace, the kernel runs, the result is copied out. The copies are linear
// but not free: on a 20,000 × 128 · 128 × 64 product they add about a third to the kernel's
// time (still some 20 times less than the JS loop), so code that multiplies the same matrices
// many times (training) keeps them resident instead, see simdShard.ts.
import type { CsrMatrix } from '../graph/csr';
import { matMulListBytes, withWorkspace, type KernelWorkspace } from './kernels';

/** Copies rows [rowStart, rowEnd) of `matrix` (picked through rowIndex when given) into the workspace. */
function placeRows(
  workspace: KernelWorkspace,
  matrix: Float32Array,
  rowIndex: Int32Array | null,
  width: number,
  rowStart: number,
  rowEnd: number,
): number {
  const rows = rowEnd - rowStart;
  const pointer = workspace.allocate(rows * width * 4);
  const view = workspace.floats(pointer, rows * width);
  if (!rowIndex) view.set(matrix.subarray(rowStart * width, rowEnd * width));
  else
    for (let r = 0; r < rows; r++)
      view.set(matrix.subarray(rowIndex[rowStart + r] * width, (rowIndex[rowStart + r] + 1) * width), r * width);
  return pointer;
}

function place(workspace: KernelWorkspace, array: Float32Array | Int32Array, length: number): number {
  const pointer = workspace.allocate(length * 4);
  const view = array instanceof Int32Array ? workspace.ints(pointer, length) : workspace.floats(pointer, length);
  view.set(array.subarray(0, length));
  return pointer;
}

/** out rows [rowStart, rowEnd) = a[rowIndex[r]] · b (a's rows taken in order when rowIndex is null). */
export function simdMatMulRows(
  a: Float32Array,
  rowIndex: Int32Array | null,
  b: Float32Array,
  inner: number,
  columns: number,
  out: Float32Array,
  rowStart: number,
  rowEnd: number,
): void {
  const rows = rowEnd - rowStart;
  if (rows <= 0) return;
  withWorkspace((workspace) => {
    const aAt = placeRows(workspace, a, rowIndex, inner, rowStart, rowEnd);
    const bAt = place(workspace, b, inner * columns);
    const cAt = workspace.allocate(rows * columns * 4);
    const listAt = workspace.allocate(matMulListBytes(inner, columns));
    workspace.kernels.matMul(aAt, bAt, cAt, rows, inner, columns, listAt);
    out.set(workspace.floats(cAt, rows * columns), rowStart * columns);
  });
}

/** out[inner × columns] += Σ over rows [rowStart, rowEnd) of a[row]ᵀ · g[row] (a's rows through rowIndex when given). */
export function simdAddTransposedProduct(
  a: Float32Array,
  rowIndex: Int32Array | null,
  g: Float32Array,
  inner: number,
  columns: number,
  out: Float32Array,
  rowStart: number,
  rowEnd: number,
): void {
  const rows = rowEnd - rowStart;
  if (rows <= 0) return;
  withWorkspace((workspace) => {
    const aAt = placeRows(workspace, a, rowIndex, inner, rowStart, rowEnd);
    const gAt = placeRows(workspace, g, null, columns, rowStart, rowEnd);
    const cAt = place(workspace, out, inner * columns);
    workspace.kernels.matMulTransposedA(aAt, gAt, cAt, rows, inner, columns, 1);
    out.set(workspace.floats(cAt, inner * columns));
  });
}

/** out rows [rowStart, rowEnd) = g[row] · wᵀ, w being inner × columns. */
export function simdMatMulTransposedRight(
  g: Float32Array,
  w: Float32Array,
  columns: number,
  inner: number,
  out: Float32Array,
  rowStart: number,
  rowEnd: number,
): void {
  const rows = rowEnd - rowStart;
  if (rows <= 0) return;
  withWorkspace((workspace) => {
    const gAt = placeRows(workspace, g, null, columns, rowStart, rowEnd);
    const wAt = place(workspace, w, inner * columns);
    const cAt = workspace.allocate(rows * inner * 4);
    const scratchAt = workspace.allocate(inner * columns * 4);
    const listAt = workspace.allocate(matMulListBytes(columns, inner));
    workspace.kernels.matMulTransposedB(gAt, wAt, cAt, rows, columns, inner, scratchAt, listAt);
    out.set(workspace.floats(cAt, rows * inner), rowStart * inner);
  });
}

function placeCsr(workspace: KernelWorkspace, a: CsrMatrix): [rowPtr: number, colIndex: number, values: number] {
  const nnz = a.rowPtr[a.rowCount];
  return [place(workspace, a.rowPtr, a.rowCount + 1), place(workspace, a.colIndex, nnz), place(workspace, a.values, nnz)];
}

/** out[a.rowCount × columns] = A · dense. */
export function simdSpmm(a: CsrMatrix, dense: Float32Array, columns: number, out: Float32Array): void {
  if (a.rowCount === 0 || columns === 0) return;
  withWorkspace((workspace) => {
    const [rowPtrAt, colIndexAt, valuesAt] = placeCsr(workspace, a);
    const denseAt = place(workspace, dense, a.colCount * columns);
    const outAt = workspace.allocate(a.rowCount * columns * 4);
    workspace.kernels.spmm(rowPtrAt, colIndexAt, valuesAt, denseAt, outAt, 0, a.rowCount, columns);
    out.set(workspace.floats(outAt, a.rowCount * columns));
  });
}

/** out[a.colCount × columns] = Aᵀ · dense. */
export function simdSpmmTransposed(a: CsrMatrix, dense: Float32Array, columns: number, out: Float32Array): void {
  if (a.colCount === 0 || columns === 0) return;
  withWorkspace((workspace) => {
    const [rowPtrAt, colIndexAt, valuesAt] = placeCsr(workspace, a);
    const denseAt = place(workspace, dense, a.rowCount * columns);
    const outAt = workspace.allocate(a.colCount * columns * 4);
    workspace.kernels.spmmTransposed(rowPtrAt, colIndexAt, valuesAt, denseAt, outAt, a.rowCount, a.colCount, columns);
    out.set(workspace.floats(outAt, a.colCount * columns));
  });
}
