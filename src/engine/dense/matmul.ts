// Dense matrix products over row-major Float32Arrays, written for the shapes a small network
// meets: many rows (nodes), a few hundred input columns, tens of output columns. The loops run
// i-k-j so that the innermost loop streams one row of the right-hand matrix and one row of the
// output, both contiguous; the right-hand matrix (inputDim × hidden) stays in cache. Zero
// entries of the left operand are skipped, which makes sparse inputs (one-hot, TF-IDF) cheap.
// Every function accepts a row range so that callers can split the work across threads.
//
// Above a small size each function hands its work to the WebAssembly SIMD kernels
// (src/engine/simd/, about 30 times faster); the loops below are their reference and the
// fallback where WebAssembly SIMD is missing. The SIMD kernels sum in the same order but round
// each product to float32, so results agree to float32 rounding, not bit for bit.
import { simdAvailable } from '../simd/kernels';
import { simdAddTransposedProduct, simdMatMulRows, simdMatMulTransposedRight } from '../simd/products';

/** Multiply-adds from which a product goes to the SIMD kernels: below it, copying in and out costs more. */
export const SIMD_MIN_MULTIPLY_ADDS = 1 << 13;

function useSimd(rows: number, inner: number, columns: number): boolean {
  return rows * inner * columns >= SIMD_MIN_MULTIPLY_ADDS && simdAvailable();
}

/** out[rows × n] = a[rows × k] · b[k × n] for rows [rowStart, rowEnd); out rows are overwritten. */
export function matMul(
  a: Float32Array,
  b: Float32Array,
  rowCount: number,
  inner: number,
  columns: number,
  out: Float32Array = new Float32Array(rowCount * columns),
  rowStart = 0,
  rowEnd = rowCount,
): Float32Array {
  if (useSimd(rowEnd - rowStart, inner, columns)) {
    simdMatMulRows(a, null, b, inner, columns, out, rowStart, rowEnd);
    return out;
  }
  for (let i = rowStart; i < rowEnd; i++) {
    const outBase = i * columns;
    out.fill(0, outBase, outBase + columns);
    const aBase = i * inner;
    for (let p = 0; p < inner; p++) {
      const av = a[aBase + p];
      if (av === 0) continue;
      const bBase = p * columns;
      let j = 0;
      for (; j + 3 < columns; j += 4) {
        out[outBase + j] += av * b[bBase + j];
        out[outBase + j + 1] += av * b[bBase + j + 1];
        out[outBase + j + 2] += av * b[bBase + j + 2];
        out[outBase + j + 3] += av * b[bBase + j + 3];
      }
      for (; j < columns; j++) out[outBase + j] += av * b[bBase + j];
    }
  }
  return out;
}

/**
 * Like matMul, but the left rows are picked through rowIndex: out[r] = a[rowIndex[r]] · b.
 * Lets training read the labelled rows of the full feature matrix without copying them.
 */
export function gatherMatMul(
  a: Float32Array,
  rowIndex: Int32Array,
  b: Float32Array,
  inner: number,
  columns: number,
  out: Float32Array = new Float32Array(rowIndex.length * columns),
  rowStart = 0,
  rowEnd = rowIndex.length,
): Float32Array {
  if (useSimd(rowEnd - rowStart, inner, columns)) {
    simdMatMulRows(a, rowIndex, b, inner, columns, out, rowStart, rowEnd);
    return out;
  }
  for (let r = rowStart; r < rowEnd; r++) {
    const outBase = r * columns;
    out.fill(0, outBase, outBase + columns);
    const aBase = rowIndex[r] * inner;
    for (let p = 0; p < inner; p++) {
      const av = a[aBase + p];
      if (av === 0) continue;
      const bBase = p * columns;
      let j = 0;
      for (; j + 3 < columns; j += 4) {
        out[outBase + j] += av * b[bBase + j];
        out[outBase + j + 1] += av * b[bBase + j + 1];
        out[outBase + j + 2] += av * b[bBase + j + 2];
        out[outBase + j + 3] += av * b[bBase + j + 3];
      }
      for (; j < columns; j++) out[outBase + j] += av * b[bBase + j];
    }
  }
  return out;
}

/**
 * out[k × n] += a[rows × k]ᵀ · g[rows × n] over rows [rowStart, rowEnd) (rows picked through
 * rowIndex when given). Accumulates, so the caller zeroes out first; this is the weight
 * gradient of a dense layer, summed over a block of rows.
 */
export function addTransposedProduct(
  a: Float32Array,
  rowIndex: Int32Array | null,
  g: Float32Array,
  inner: number,
  columns: number,
  out: Float32Array,
  rowStart: number,
  rowEnd: number,
): Float32Array {
  if (useSimd(rowEnd - rowStart, inner, columns)) {
    simdAddTransposedProduct(a, rowIndex, g, inner, columns, out, rowStart, rowEnd);
    return out;
  }
  for (let r = rowStart; r < rowEnd; r++) {
    const aBase = (rowIndex ? rowIndex[r] : r) * inner;
    const gBase = r * columns;
    let allZero = true;
    for (let j = 0; j < columns; j++) {
      if (g[gBase + j] !== 0) {
        allZero = false;
        break;
      }
    }
    if (allZero) continue;
    for (let p = 0; p < inner; p++) {
      const av = a[aBase + p];
      if (av === 0) continue;
      const oBase = p * columns;
      let j = 0;
      for (; j + 3 < columns; j += 4) {
        out[oBase + j] += av * g[gBase + j];
        out[oBase + j + 1] += av * g[gBase + j + 1];
        out[oBase + j + 2] += av * g[gBase + j + 2];
        out[oBase + j + 3] += av * g[gBase + j + 3];
      }
      for (; j < columns; j++) out[oBase + j] += av * g[gBase + j];
    }
  }
  return out;
}

/** out[rows × k] = g[rows × n] · w[k × n]ᵀ: the gradient flowing back through a dense layer. */
export function matMulTransposedRight(
  g: Float32Array,
  w: Float32Array,
  rowCount: number,
  columns: number,
  inner: number,
  out: Float32Array = new Float32Array(rowCount * inner),
  rowStart = 0,
  rowEnd = rowCount,
): Float32Array {
  if (useSimd(rowEnd - rowStart, inner, columns)) {
    simdMatMulTransposedRight(g, w, columns, inner, out, rowStart, rowEnd);
    return out;
  }
  for (let i = rowStart; i < rowEnd; i++) {
    const gBase = i * columns;
    const oBase = i * inner;
    for (let p = 0; p < inner; p++) {
      const wBase = p * columns;
      let sum = 0;
      for (let j = 0; j < columns; j++) sum += g[gBase + j] * w[wBase + j];
      out[oBase + p] = sum;
    }
  }
  return out;
}
