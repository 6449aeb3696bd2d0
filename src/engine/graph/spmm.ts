// Sparse (CSR) × dense products over typed arrays, the inner loop of every propagation and of
// message passing during training. Dense matrices are row-major Float32Arrays.
//
// spmm and spmmTransposed hand products above a small size to the WebAssembly SIMD kernels
// (src/engine/simd/), which reproduce the loops below bit for bit; the loops stay as their
// reference, as the worker pool's kernel and as the fallback where WebAssembly SIMD is missing.
import { simdAvailable } from '../simd/kernels';
import { simdSpmm, simdSpmmTransposed } from '../simd/products';
import type { CsrMatrix } from './csr';

/** Non-zeros × columns from which a product goes to the SIMD kernels. */
export const SIMD_MIN_SPARSE_WORK = 1 << 13;

function useSimd(a: CsrMatrix, columns: number): boolean {
  return (a.rowPtr[a.rowCount] + a.rowCount) * columns >= SIMD_MIN_SPARSE_WORK && simdAvailable();
}

/**
 * Writes rows [rowStart, rowEnd) of A·H into out. The single kernel behind spmm and the worker
 * pool: the pool ships this function's source text to its workers, so it must stay
 * self-contained (no closures, no imports, no helpers, plain loops only).
 *
 * Columns are taken four at a time with the four sums held in local (double) variables across
 * the whole row: V8 keeps them in registers, so out is written once per entry instead of once
 * per non-zero, and the sums are exact in float64 before the single float32 rounding.
 */
export function spmmRowRange(
  rowPtr: Int32Array,
  colIndex: Int32Array,
  values: Float32Array,
  dense: Float32Array,
  columns: number,
  out: Float32Array,
  rowStart: number,
  rowEnd: number,
): void {
  const blocked = columns - (columns % 4);
  for (let row = rowStart; row < rowEnd; row++) {
    const start = rowPtr[row];
    const end = rowPtr[row + 1];
    const outBase = row * columns;
    // Two non-zeros per iteration: halves the loop overhead and lets the two loads overlap.
    const pairedEnd = start + ((end - start) & ~1);
    for (let col = 0; col < blocked; col += 4) {
      let sum0 = 0;
      let sum1 = 0;
      let sum2 = 0;
      let sum3 = 0;
      let k = start;
      for (; k < pairedEnd; k += 2) {
        const weightA = values[k];
        const baseA = colIndex[k] * columns + col;
        const weightB = values[k + 1];
        const baseB = colIndex[k + 1] * columns + col;
        sum0 += weightA * dense[baseA] + weightB * dense[baseB];
        sum1 += weightA * dense[baseA + 1] + weightB * dense[baseB + 1];
        sum2 += weightA * dense[baseA + 2] + weightB * dense[baseB + 2];
        sum3 += weightA * dense[baseA + 3] + weightB * dense[baseB + 3];
      }
      if (k < end) {
        const weightA = values[k];
        const baseA = colIndex[k] * columns + col;
        sum0 += weightA * dense[baseA];
        sum1 += weightA * dense[baseA + 1];
        sum2 += weightA * dense[baseA + 2];
        sum3 += weightA * dense[baseA + 3];
      }
      out[outBase + col] = sum0;
      out[outBase + col + 1] = sum1;
      out[outBase + col + 2] = sum2;
      out[outBase + col + 3] = sum3;
    }
    for (let col = blocked; col < columns; col++) {
      let sum = 0;
      for (let k = start; k < end; k++) sum += values[k] * dense[colIndex[k] * columns + col];
      out[outBase + col] = sum;
    }
  }
}

/** A·H. dense holds a.colCount rows of `columns` values; the result has a.rowCount rows. */
export function spmm(a: CsrMatrix, dense: Float32Array, columns: number, out?: Float32Array): Float32Array {
  checkProductShapes('spmm', a.colCount, a.rowCount, dense, columns, out);
  const result = out ?? new Float32Array(a.rowCount * columns);
  if (useSimd(a, columns)) {
    simdSpmm(a, dense, columns, result);
    return result;
  }
  spmmRowRange(a.rowPtr, a.colIndex, a.values, dense, columns, result, 0, a.rowCount);
  return result;
}

/**
 * Aᵀ·H without building Aᵀ: each row of A scatters its weighted row of H into the rows of the
 * result named by its column indices. dense holds a.rowCount rows; the result has a.colCount rows.
 * Scattered sums accumulate in float32; when Aᵀ is needed repeatedly, transpose once and use spmm.
 */
export function spmmTransposed(a: CsrMatrix, dense: Float32Array, columns: number, out?: Float32Array): Float32Array {
  checkProductShapes('spmmTransposed', a.rowCount, a.colCount, dense, columns, out);
  const result = out ?? new Float32Array(a.colCount * columns);
  if (useSimd(a, columns)) {
    simdSpmmTransposed(a, dense, columns, result);
    return result;
  }
  if (out) result.fill(0, 0, a.colCount * columns);
  const { rowPtr, colIndex, values } = a;
  const blocked = columns - (columns % 4);
  for (let row = 0; row < a.rowCount; row++) {
    const denseBase = row * columns;
    const end = rowPtr[row + 1];
    for (let k = rowPtr[row]; k < end; k++) {
      const weight = values[k];
      const outBase = colIndex[k] * columns;
      let col = 0;
      for (; col < blocked; col += 4) {
        result[outBase + col] += weight * dense[denseBase + col];
        result[outBase + col + 1] += weight * dense[denseBase + col + 1];
        result[outBase + col + 2] += weight * dense[denseBase + col + 2];
        result[outBase + col + 3] += weight * dense[denseBase + col + 3];
      }
      for (; col < columns; col++) result[outBase + col] += weight * dense[denseBase + col];
    }
  }
  return result;
}

/** Throws a message naming the operation when dense or out is too small for the product. */
export function checkProductShapes(
  operation: string,
  denseRows: number,
  outRows: number,
  dense: Float32Array,
  columns: number,
  out: Float32Array | undefined,
): void {
  if (!Number.isInteger(columns) || columns < 0) throw new Error(`${operation}: columns must be a non-negative integer, got ${columns}`);
  if (dense.length < denseRows * columns) {
    throw new Error(
      `${operation}: dense input has ${dense.length} values, needs ${denseRows} rows × ${columns} columns = ${denseRows * columns}`,
    );
  }
  if (out && out.length < outRows * columns) {
    throw new Error(`${operation}: output has ${out.length} values, needs ${outRows} rows × ${columns} columns = ${outRows * columns}`);
  }
}
