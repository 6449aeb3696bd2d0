// Dense and sparse products over row-major float32 matrices in linear memory, written with
// 128-bit SIMD (four float32 lanes). The JavaScript kernels in src/engine/dense/matmul.ts and
// src/engine/graph/spmm.ts are the reference: every function here sums its terms in the same
// order as its reference. The dense products round each product and partial sum to float32
// (the references keep some in float64), so they agree to float32 rounding; the sparse
// products reproduce their references bit for bit (see spmm).
//
// All pointers are byte offsets into memory chosen by the caller (src/engine/simd/kernels.ts);
// sizes are element counts. Nothing here allocates.

/** First byte after this module's own static data: the caller places matrices from here on. */
export function heapBase(): usize {
  return __heap_base;
}

// The products keep a block of 4 output rows × 8 output columns in eight vector registers,
// broadcasting one left entry per row and loading 8 right entries per inner step; with the x64
// register file (16 vector registers) that is the largest block that does not spill.

/** Blocks of 4 rows that matMul takes together: 32 rows, about 48 KiB of a for 384 columns. */
const BLOCKS_PER_CHUNK = 8;

/**
 * c[rows × cols] = a[rows × inner] · b[inner × cols] (overwritten). Rows go in chunks of 32:
 * for each 8-column panel of b, every 4-row block of the chunk runs over the panel while it is
 * in the first-level cache; the panels are first copied out of b into contiguous memory.
 * scratch: 8 × (inner + 1) int32, where each block of rows notes its non-zero inner positions
 * (so sparse left rows, TF-IDF or one-hot, skip their zeros as the reference does), then
 * inner × cols float32 for the panels (see matMulListBytes in src/engine/simd/kernels.ts).
 */
export function matMul(a: usize, b: usize, c: usize, rows: i32, inner: i32, cols: i32, list: usize): void {
  const aRow = (<usize>inner) << 2;
  const cRow = (<usize>cols) << 2;
  const listBytes = (<usize>(inner + 1)) << 2;
  const blockedRows = rows & ~3;
  const panels = (list + (((<usize>(BLOCKS_PER_CHUNK * (inner + 1))) << 2) + 15)) & ~15;
  const panelBytes = (<usize>inner) << 5;
  for (let j = 0; j + 8 <= cols; j += 8) {
    const panel = panels + <usize>(j >> 3) * panelBytes;
    const bColumn = b + ((<usize>j) << 2);
    for (let p = 0; p < inner; p++) {
      const from = bColumn + <usize>p * cRow;
      v128.store(panel + ((<usize>p) << 5), v128.load(from));
      v128.store(panel + ((<usize>p) << 5), v128.load(from, 16), 16);
    }
  }
  for (let i0 = 0; i0 < blockedRows; i0 += BLOCKS_PER_CHUNK * 4) {
    const blocks = min(BLOCKS_PER_CHUNK, (blockedRows - i0) >> 2);
    for (let block = 0; block < blocks; block++) {
      const a0 = a + <usize>(i0 + block * 4) * aRow;
      const a1 = a0 + aRow;
      const a2 = a1 + aRow;
      const a3 = a2 + aRow;
      const blockList = list + <usize>block * listBytes + 4;
      let count = 0;
      for (let p = 0; p < inner; p++) {
        const at = (<usize>p) << 2;
        // Shifting out the sign bit makes -0 count as zero too.
        const bits = (load<u32>(a0 + at) | load<u32>(a1 + at) | load<u32>(a2 + at) | load<u32>(a3 + at)) << 1;
        store<i32>(blockList + ((<usize>count) << 2), p);
        count += i32(bits != 0);
      }
      store<i32>(blockList - 4, count);
    }
    let j = 0;
    for (; j + 8 <= cols; j += 8) {
      for (let block = 0; block < blocks; block++) {
        const blockList = list + <usize>block * listBytes + 4;
        const row = <usize>(i0 + block * 4);
        matMulBlock8(
          a + row * aRow,
          aRow,
          panels + <usize>(j >> 3) * panelBytes,
          cRow,
          c + row * cRow + ((<usize>j) << 2),
          blockList,
          load<i32>(blockList - 4),
        );
      }
    }
    for (; j + 4 <= cols; j += 4) {
      for (let block = 0; block < blocks; block++) {
        const blockList = list + <usize>block * listBytes + 4;
        const row = <usize>(i0 + block * 4);
        matMulBlock4(
          a + row * aRow,
          aRow,
          b + ((<usize>j) << 2),
          cRow,
          c + row * cRow + ((<usize>j) << 2),
          blockList,
          load<i32>(blockList - 4),
        );
      }
    }
    for (; j < cols; j++) {
      for (let block = 0; block < blocks; block++) {
        const blockList = list + <usize>block * listBytes + 4;
        const row = <usize>(i0 + block * 4);
        matMulBlock1(
          a + row * aRow,
          aRow,
          b + ((<usize>j) << 2),
          cRow,
          c + row * cRow + ((<usize>j) << 2),
          blockList,
          load<i32>(blockList - 4),
        );
      }
    }
  }
  for (let i = blockedRows; i < rows; i++) matMulRow(a + <usize>i * aRow, b, c + <usize>i * cRow, inner, cols, list);
}

/** 4 rows × 8 columns of matMul: panel holds the 8 columns of b contiguously (inner × 8). */
function matMulBlock8(a0: usize, aRow: usize, panel: usize, cRow: usize, c0: usize, list: usize, count: i32): void {
  const a1 = a0 + aRow;
  const a2 = a1 + aRow;
  const a3 = a2 + aRow;
  let s00 = f32x4.splat(0);
  let s01 = f32x4.splat(0);
  let s10 = f32x4.splat(0);
  let s11 = f32x4.splat(0);
  let s20 = f32x4.splat(0);
  let s21 = f32x4.splat(0);
  let s30 = f32x4.splat(0);
  let s31 = f32x4.splat(0);
  for (let q = 0; q < count; q++) {
    const p = <usize>load<i32>(list + ((<usize>q) << 2));
    const at = p << 2;
    const bp = panel + (p << 5);
    const b0 = v128.load(bp);
    const b1 = v128.load(bp, 16);
    let x = v128.load32_splat(a0 + at);
    s00 = f32x4.add(s00, f32x4.mul(x, b0));
    s01 = f32x4.add(s01, f32x4.mul(x, b1));
    x = v128.load32_splat(a1 + at);
    s10 = f32x4.add(s10, f32x4.mul(x, b0));
    s11 = f32x4.add(s11, f32x4.mul(x, b1));
    x = v128.load32_splat(a2 + at);
    s20 = f32x4.add(s20, f32x4.mul(x, b0));
    s21 = f32x4.add(s21, f32x4.mul(x, b1));
    x = v128.load32_splat(a3 + at);
    s30 = f32x4.add(s30, f32x4.mul(x, b0));
    s31 = f32x4.add(s31, f32x4.mul(x, b1));
  }
  const c1 = c0 + cRow;
  const c2 = c1 + cRow;
  const c3 = c2 + cRow;
  v128.store(c0, s00);
  v128.store(c0, s01, 16);
  v128.store(c1, s10);
  v128.store(c1, s11, 16);
  v128.store(c2, s20);
  v128.store(c2, s21, 16);
  v128.store(c3, s30);
  v128.store(c3, s31, 16);
}

/** 4 rows × 4 columns of matMul. */
function matMulBlock4(a0: usize, aRow: usize, bColumn: usize, cRow: usize, c0: usize, list: usize, count: i32): void {
  const a1 = a0 + aRow;
  const a2 = a1 + aRow;
  const a3 = a2 + aRow;
  let s0 = f32x4.splat(0);
  let s1 = f32x4.splat(0);
  let s2 = f32x4.splat(0);
  let s3 = f32x4.splat(0);
  for (let q = 0; q < count; q++) {
    const p = <usize>load<i32>(list + ((<usize>q) << 2));
    const at = p << 2;
    const b0 = v128.load(bColumn + p * cRow);
    s0 = f32x4.add(s0, f32x4.mul(v128.load32_splat(a0 + at), b0));
    s1 = f32x4.add(s1, f32x4.mul(v128.load32_splat(a1 + at), b0));
    s2 = f32x4.add(s2, f32x4.mul(v128.load32_splat(a2 + at), b0));
    s3 = f32x4.add(s3, f32x4.mul(v128.load32_splat(a3 + at), b0));
  }
  v128.store(c0, s0);
  v128.store(c0 + cRow, s1);
  v128.store(c0 + 2 * cRow, s2);
  v128.store(c0 + 3 * cRow, s3);
}

/** 4 rows × 1 column of matMul. */
function matMulBlock1(a0: usize, aRow: usize, bColumn: usize, cRow: usize, c0: usize, list: usize, count: i32): void {
  const a1 = a0 + aRow;
  const a2 = a1 + aRow;
  const a3 = a2 + aRow;
  let s0: f32 = 0;
  let s1: f32 = 0;
  let s2: f32 = 0;
  let s3: f32 = 0;
  for (let q = 0; q < count; q++) {
    const p = <usize>load<i32>(list + ((<usize>q) << 2));
    const at = p << 2;
    const bv = load<f32>(bColumn + p * cRow);
    s0 += load<f32>(a0 + at) * bv;
    s1 += load<f32>(a1 + at) * bv;
    s2 += load<f32>(a2 + at) * bv;
    s3 += load<f32>(a3 + at) * bv;
  }
  store<f32>(c0, s0);
  store<f32>(c0 + cRow, s1);
  store<f32>(c0 + 2 * cRow, s2);
  store<f32>(c0 + 3 * cRow, s3);
}

/** One row of matMul (the rows left over after the blocks of four). */
function matMulRow(a0: usize, b: usize, c0: usize, inner: i32, cols: i32, list: usize): void {
  const cRow = (<usize>cols) << 2;
  let count = 0;
  for (let p = 0; p < inner; p++) {
    store<i32>(list + ((<usize>count) << 2), p);
    count += i32(load<u32>(a0 + ((<usize>p) << 2)) << 1 != 0);
  }
  let j = 0;
  for (; j + 8 <= cols; j += 8) {
    const bColumn = b + ((<usize>j) << 2);
    let s0 = f32x4.splat(0);
    let s1 = f32x4.splat(0);
    for (let q = 0; q < count; q++) {
      const p = <usize>load<i32>(list + ((<usize>q) << 2));
      const bp = bColumn + p * cRow;
      const x = v128.load32_splat(a0 + (p << 2));
      s0 = f32x4.add(s0, f32x4.mul(x, v128.load(bp)));
      s1 = f32x4.add(s1, f32x4.mul(x, v128.load(bp, 16)));
    }
    v128.store(c0 + ((<usize>j) << 2), s0);
    v128.store(c0 + ((<usize>j) << 2), s1, 16);
  }
  for (; j + 4 <= cols; j += 4) {
    const bColumn = b + ((<usize>j) << 2);
    let s0 = f32x4.splat(0);
    for (let q = 0; q < count; q++) {
      const p = <usize>load<i32>(list + ((<usize>q) << 2));
      s0 = f32x4.add(s0, f32x4.mul(v128.load32_splat(a0 + (p << 2)), v128.load(bColumn + p * cRow)));
    }
    v128.store(c0 + ((<usize>j) << 2), s0);
  }
  for (; j < cols; j++) {
    const bColumn = b + ((<usize>j) << 2);
    let s0: f32 = 0;
    for (let q = 0; q < count; q++) {
      const p = <usize>load<i32>(list + ((<usize>q) << 2));
      s0 += load<f32>(a0 + (p << 2)) * load<f32>(bColumn + p * cRow);
    }
    store<f32>(c0 + ((<usize>j) << 2), s0);
  }
}

/**
 * c[inner × cols] += a[rows × inner]ᵀ · g[rows × cols] (the weight gradient of a dense layer),
 * without forming aᵀ: a block of 4 × 8 entries of c sits in registers while the rows stream
 * past. Rows go in chunks small enough that a chunk of a stays in cache for every block of c.
 * Set `accumulate` to 0 to overwrite c instead.
 */
export function matMulTransposedA(a: usize, g: usize, c: usize, rows: i32, inner: i32, cols: i32, accumulate: i32): void {
  const aRow = (<usize>inner) << 2;
  const cRow = (<usize>cols) << 2;
  if (!accumulate) memory.fill(c, 0, <usize>inner * cRow);
  // About 128 KiB of a per chunk.
  const chunk = max(16, min(512, (1 << 17) / max(inner << 2, 1)));
  for (let r0 = 0; r0 < rows; r0 += chunk) {
    const r1 = min(rows, r0 + chunk);
    const aChunk = a + <usize>r0 * aRow;
    const gChunk = g + <usize>r0 * cRow;
    let p = 0;
    for (; p + 4 <= inner; p += 4) {
      const aColumn = aChunk + ((<usize>p) << 2);
      const c0 = c + <usize>p * cRow;
      const c1 = c0 + cRow;
      const c2 = c1 + cRow;
      const c3 = c2 + cRow;
      let j = 0;
      for (; j + 8 <= cols; j += 8) {
        const at = (<usize>j) << 2;
        let s00 = v128.load(c0 + at);
        let s01 = v128.load(c0 + at, 16);
        let s10 = v128.load(c1 + at);
        let s11 = v128.load(c1 + at, 16);
        let s20 = v128.load(c2 + at);
        let s21 = v128.load(c2 + at, 16);
        let s30 = v128.load(c3 + at);
        let s31 = v128.load(c3 + at, 16);
        let ap = aColumn;
        let gp = gChunk + at;
        for (let r = r0; r < r1; r++) {
          const g0 = v128.load(gp);
          const g1 = v128.load(gp, 16);
          let x = v128.load32_splat(ap);
          s00 = f32x4.add(s00, f32x4.mul(x, g0));
          s01 = f32x4.add(s01, f32x4.mul(x, g1));
          x = v128.load32_splat(ap, 4);
          s10 = f32x4.add(s10, f32x4.mul(x, g0));
          s11 = f32x4.add(s11, f32x4.mul(x, g1));
          x = v128.load32_splat(ap, 8);
          s20 = f32x4.add(s20, f32x4.mul(x, g0));
          s21 = f32x4.add(s21, f32x4.mul(x, g1));
          x = v128.load32_splat(ap, 12);
          s30 = f32x4.add(s30, f32x4.mul(x, g0));
          s31 = f32x4.add(s31, f32x4.mul(x, g1));
          ap += aRow;
          gp += cRow;
        }
        v128.store(c0 + at, s00);
        v128.store(c0 + at, s01, 16);
        v128.store(c1 + at, s10);
        v128.store(c1 + at, s11, 16);
        v128.store(c2 + at, s20);
        v128.store(c2 + at, s21, 16);
        v128.store(c3 + at, s30);
        v128.store(c3 + at, s31, 16);
      }
      for (; j + 4 <= cols; j += 4) {
        const at = (<usize>j) << 2;
        let s0 = v128.load(c0 + at);
        let s1 = v128.load(c1 + at);
        let s2 = v128.load(c2 + at);
        let s3 = v128.load(c3 + at);
        let ap = aColumn;
        let gp = gChunk + at;
        for (let r = r0; r < r1; r++) {
          const g0 = v128.load(gp);
          s0 = f32x4.add(s0, f32x4.mul(v128.load32_splat(ap), g0));
          s1 = f32x4.add(s1, f32x4.mul(v128.load32_splat(ap, 4), g0));
          s2 = f32x4.add(s2, f32x4.mul(v128.load32_splat(ap, 8), g0));
          s3 = f32x4.add(s3, f32x4.mul(v128.load32_splat(ap, 12), g0));
          ap += aRow;
          gp += cRow;
        }
        v128.store(c0 + at, s0);
        v128.store(c1 + at, s1);
        v128.store(c2 + at, s2);
        v128.store(c3 + at, s3);
      }
      for (; j < cols; j++) {
        const at = (<usize>j) << 2;
        let s0 = load<f32>(c0 + at);
        let s1 = load<f32>(c1 + at);
        let s2 = load<f32>(c2 + at);
        let s3 = load<f32>(c3 + at);
        let ap = aColumn;
        let gp = gChunk + at;
        for (let r = r0; r < r1; r++) {
          const gv = load<f32>(gp);
          s0 += load<f32>(ap) * gv;
          s1 += load<f32>(ap, 4) * gv;
          s2 += load<f32>(ap, 8) * gv;
          s3 += load<f32>(ap, 12) * gv;
          ap += aRow;
          gp += cRow;
        }
        store<f32>(c0 + at, s0);
        store<f32>(c1 + at, s1);
        store<f32>(c2 + at, s2);
        store<f32>(c3 + at, s3);
      }
    }
    for (; p < inner; p++) {
      const aColumn = aChunk + ((<usize>p) << 2);
      const c0 = c + <usize>p * cRow;
      let j = 0;
      for (; j + 4 <= cols; j += 4) {
        const at = (<usize>j) << 2;
        let s0 = v128.load(c0 + at);
        let ap = aColumn;
        let gp = gChunk + at;
        for (let r = r0; r < r1; r++) {
          s0 = f32x4.add(s0, f32x4.mul(v128.load32_splat(ap), v128.load(gp)));
          ap += aRow;
          gp += cRow;
        }
        v128.store(c0 + at, s0);
      }
      for (; j < cols; j++) {
        const at = (<usize>j) << 2;
        let s0 = load<f32>(c0 + at);
        let ap = aColumn;
        let gp = gChunk + at;
        for (let r = r0; r < r1; r++) {
          s0 += load<f32>(ap) * load<f32>(gp);
          ap += aRow;
          gp += cRow;
        }
        store<f32>(c0 + at, s0);
      }
    }
  }
}

/**
 * c[rows × inner] = g[rows × cols] · w[inner × cols]ᵀ (the gradient flowing back through a
 * dense layer). w is small (a weight matrix): it is transposed into `scratch` (cols × inner
 * floats) and the product runs as matMul. list: matMul's scratch, 8 × (cols + 1) int32.
 */
export function matMulTransposedB(g: usize, w: usize, c: usize, rows: i32, cols: i32, inner: i32, scratch: usize, list: usize): void {
  for (let p = 0; p < inner; p++) {
    for (let j = 0; j < cols; j++) {
      store<f32>(scratch + ((<usize>j * <usize>inner + <usize>p) << 2), load<f32>(w + ((<usize>p * <usize>cols + <usize>j) << 2)));
    }
  }
  matMul(g, scratch, c, rows, cols, inner, list);
}

// The sparse products reproduce their JavaScript references bit for bit (the worker pool runs
// the JavaScript kernel on some rows while this one may run on others): float32 products are
// exact in float64, sums are taken in float64 in the reference's order and rounded to float32
// once, as the reference's local (double) sums and Float32Array stores do.

/** Lanes 0-1 and 2-3 of a float32 vector as two float64 vectors. */
function lowHalf(v: v128): v128 {
  return f64x2.promote_low_f32x4(v);
}

function highHalf(v: v128): v128 {
  return f64x2.promote_low_f32x4(v128.shuffle<i64>(v, v, 1, 0));
}

/** Two float64 vectors rounded to one float32 vector. */
function rounded(low: v128, high: v128): v128 {
  return v128.shuffle<i64>(f32x4.demote_f64x2_zero(low), f32x4.demote_f64x2_zero(high), 0, 2);
}

/**
 * Rows [rowStart, rowEnd) of out = A · dense, A in CSR (int32 rowPtr and colIndex, float32
 * values), dense and out row-major with `cols` columns; the arithmetic of spmmRowRange in
 * src/engine/graph/spmm.ts (non-zeros taken in pairs over blocks of four columns, the last
 * cols % 4 columns one non-zero at a time). Eight columns are summed at once in registers.
 */
export function spmm(rowPtr: usize, colIndex: usize, values: usize, dense: usize, out: usize, rowStart: i32, rowEnd: i32, cols: i32): void {
  const rowBytes = (<usize>cols) << 2;
  const blocked = cols - (cols % 4);
  for (let row = rowStart; row < rowEnd; row++) {
    const start = load<i32>(rowPtr + ((<usize>row) << 2));
    const end = load<i32>(rowPtr + ((<usize>row) << 2), 4);
    const pairedEnd = start + ((end - start) & ~1);
    const outRow = out + <usize>row * rowBytes;
    let j = 0;
    for (; j + 8 <= blocked; j += 8) {
      const denseColumn = dense + ((<usize>j) << 2);
      let s0 = f64x2.splat(0);
      let s1 = f64x2.splat(0);
      let s2 = f64x2.splat(0);
      let s3 = f64x2.splat(0);
      let k = start;
      for (; k < pairedEnd; k += 2) {
        const at = (<usize>k) << 2;
        const weightA = f64x2.splat(<f64>load<f32>(values + at));
        const weightB = f64x2.splat(<f64>load<f32>(values + at, 4));
        const pa = denseColumn + <usize>load<i32>(colIndex + at) * rowBytes;
        const pb = denseColumn + <usize>load<i32>(colIndex + at, 4) * rowBytes;
        let va = v128.load(pa);
        let vb = v128.load(pb);
        s0 = f64x2.add(s0, f64x2.add(f64x2.mul(weightA, lowHalf(va)), f64x2.mul(weightB, lowHalf(vb))));
        s1 = f64x2.add(s1, f64x2.add(f64x2.mul(weightA, highHalf(va)), f64x2.mul(weightB, highHalf(vb))));
        va = v128.load(pa, 16);
        vb = v128.load(pb, 16);
        s2 = f64x2.add(s2, f64x2.add(f64x2.mul(weightA, lowHalf(va)), f64x2.mul(weightB, lowHalf(vb))));
        s3 = f64x2.add(s3, f64x2.add(f64x2.mul(weightA, highHalf(va)), f64x2.mul(weightB, highHalf(vb))));
      }
      if (k < end) {
        const at = (<usize>k) << 2;
        const weightA = f64x2.splat(<f64>load<f32>(values + at));
        const pa = denseColumn + <usize>load<i32>(colIndex + at) * rowBytes;
        let va = v128.load(pa);
        s0 = f64x2.add(s0, f64x2.mul(weightA, lowHalf(va)));
        s1 = f64x2.add(s1, f64x2.mul(weightA, highHalf(va)));
        va = v128.load(pa, 16);
        s2 = f64x2.add(s2, f64x2.mul(weightA, lowHalf(va)));
        s3 = f64x2.add(s3, f64x2.mul(weightA, highHalf(va)));
      }
      const at = outRow + ((<usize>j) << 2);
      v128.store(at, rounded(s0, s1));
      v128.store(at, rounded(s2, s3), 16);
    }
    for (; j < blocked; j += 4) {
      const denseColumn = dense + ((<usize>j) << 2);
      let s0 = f64x2.splat(0);
      let s1 = f64x2.splat(0);
      let k = start;
      for (; k < pairedEnd; k += 2) {
        const at = (<usize>k) << 2;
        const weightA = f64x2.splat(<f64>load<f32>(values + at));
        const weightB = f64x2.splat(<f64>load<f32>(values + at, 4));
        const va = v128.load(denseColumn + <usize>load<i32>(colIndex + at) * rowBytes);
        const vb = v128.load(denseColumn + <usize>load<i32>(colIndex + at, 4) * rowBytes);
        s0 = f64x2.add(s0, f64x2.add(f64x2.mul(weightA, lowHalf(va)), f64x2.mul(weightB, lowHalf(vb))));
        s1 = f64x2.add(s1, f64x2.add(f64x2.mul(weightA, highHalf(va)), f64x2.mul(weightB, highHalf(vb))));
      }
      if (k < end) {
        const at = (<usize>k) << 2;
        const weightA = f64x2.splat(<f64>load<f32>(values + at));
        const va = v128.load(denseColumn + <usize>load<i32>(colIndex + at) * rowBytes);
        s0 = f64x2.add(s0, f64x2.mul(weightA, lowHalf(va)));
        s1 = f64x2.add(s1, f64x2.mul(weightA, highHalf(va)));
      }
      v128.store(outRow + ((<usize>j) << 2), rounded(s0, s1));
    }
    for (; j < cols; j++) {
      const denseColumn = dense + ((<usize>j) << 2);
      let sum: f64 = 0;
      for (let k = start; k < end; k++) {
        const at = (<usize>k) << 2;
        sum += <f64>load<f32>(values + at) * <f64>load<f32>(denseColumn + <usize>load<i32>(colIndex + at) * rowBytes);
      }
      store<f32>(outRow + ((<usize>j) << 2), <f32>sum);
    }
  }
}

/**
 * out[colCount × cols] = Aᵀ · dense without forming Aᵀ: each row of A scatters its weighted row
 * of dense into the rows of out its column indices name (out is overwritten). As the reference
 * spmmTransposed, every addition is done in float64 and stored as float32.
 */
export function spmmTransposed(
  rowPtr: usize,
  colIndex: usize,
  values: usize,
  dense: usize,
  out: usize,
  rowCount: i32,
  colCount: i32,
  cols: i32,
): void {
  const rowBytes = (<usize>cols) << 2;
  memory.fill(out, 0, <usize>colCount * rowBytes);
  for (let row = 0; row < rowCount; row++) {
    const start = load<i32>(rowPtr + ((<usize>row) << 2));
    const end = load<i32>(rowPtr + ((<usize>row) << 2), 4);
    const denseRow = dense + <usize>row * rowBytes;
    for (let k = start; k < end; k++) {
      const at = (<usize>k) << 2;
      const weightValue = <f64>load<f32>(values + at);
      const weight = f64x2.splat(weightValue);
      const outRow = out + <usize>load<i32>(colIndex + at) * rowBytes;
      let j = 0;
      for (; j + 4 <= cols; j += 4) {
        const jAt = (<usize>j) << 2;
        const sum = v128.load(outRow + jAt);
        const term = v128.load(denseRow + jAt);
        const low = f64x2.add(lowHalf(sum), f64x2.mul(weight, lowHalf(term)));
        const high = f64x2.add(highHalf(sum), f64x2.mul(weight, highHalf(term)));
        v128.store(outRow + jAt, rounded(low, high));
      }
      for (; j < cols; j++) {
        const jAt = (<usize>j) << 2;
        store<f32>(outRow + jAt, <f32>(<f64>load<f32>(outRow + jAt) + weightValue * <f64>load<f32>(denseRow + jAt)));
      }
    }
  }
}

/**
 * The hidden layer's forward tail, in place on h (rows × cols): h = max(h + bias, 0), then
 * times the inverted-dropout mask when `mask` is not 0.
 */
export function biasReluMask(h: usize, bias: usize, mask: usize, rows: i32, cols: i32): void {
  const rowBytes = (<usize>cols) << 2;
  const zero = f32x4.splat(0);
  for (let r = 0; r < rows; r++) {
    const hRow = h + <usize>r * rowBytes;
    const maskRow = mask + <usize>r * rowBytes;
    let j = 0;
    for (; j + 4 <= cols; j += 4) {
      const at = (<usize>j) << 2;
      let v = f32x4.max(f32x4.add(v128.load(hRow + at), v128.load(bias + at)), zero);
      if (mask) v = f32x4.mul(v, v128.load(maskRow + at));
      v128.store(hRow + at, v);
    }
    for (; j < cols; j++) {
      const at = (<usize>j) << 2;
      let v = max<f32>(load<f32>(hRow + at) + load<f32>(bias + at), 0);
      if (mask) v *= load<f32>(maskRow + at);
      store<f32>(hRow + at, v);
    }
  }
}

/** z (rows × cols) += bias in every row. */
export function addBias(z: usize, bias: usize, rows: i32, cols: i32): void {
  const rowBytes = (<usize>cols) << 2;
  for (let r = 0; r < rows; r++) {
    const zRow = z + <usize>r * rowBytes;
    let j = 0;
    for (; j + 4 <= cols; j += 4) {
      const at = (<usize>j) << 2;
      v128.store(zRow + at, f32x4.add(v128.load(zRow + at), v128.load(bias + at)));
    }
    for (; j < cols; j++) {
      const at = (<usize>j) << 2;
      store<f32>(zRow + at, load<f32>(zRow + at) + load<f32>(bias + at));
    }
  }
}

/**
 * The hidden layer's backward tail, in place on the gradient d (n values): where the forward
 * output `activation` (after ReLU and mask) is 0 the gradient is 0; elsewhere it is multiplied
 * by the mask (when `mask` is not 0), which restores the mask's 1 / (1 - rate) factor.
 */
export function reluMaskBackward(d: usize, activation: usize, mask: usize, n: i32): void {
  const zero = f32x4.splat(0);
  let k = 0;
  for (; k + 4 <= n; k += 4) {
    const at = (<usize>k) << 2;
    const keep = f32x4.gt(v128.load(activation + at), zero);
    let v = v128.and(v128.load(d + at), keep);
    if (mask) v = f32x4.mul(v, v128.load(mask + at));
    v128.store(d + at, v);
  }
  for (; k < n; k++) {
    const at = (<usize>k) << 2;
    let v: f32 = load<f32>(activation + at) > 0 ? load<f32>(d + at) : 0;
    if (mask) v *= load<f32>(mask + at);
    store<f32>(d + at, v);
  }
}

/** out[cols] = the sum of g's rows (rows × cols): a bias gradient. */
export function columnSums(g: usize, out: usize, rows: i32, cols: i32): void {
  const rowBytes = (<usize>cols) << 2;
  memory.fill(out, 0, rowBytes);
  for (let r = 0; r < rows; r++) {
    const gRow = g + <usize>r * rowBytes;
    let j = 0;
    for (; j + 4 <= cols; j += 4) {
      const at = (<usize>j) << 2;
      v128.store(out + at, f32x4.add(v128.load(out + at), v128.load(gRow + at)));
    }
    for (; j < cols; j++) {
      const at = (<usize>j) << 2;
      store<f32>(out + at, load<f32>(out + at) + load<f32>(gRow + at));
    }
  }
}
