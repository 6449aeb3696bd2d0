// Compressed sparse row matrices over typed arrays: the one graph representation the engine
// computes with. Row i's entries are colIndex[rowPtr[i] .. rowPtr[i+1]).
import type { EdgeList } from '../dataset/types';

export interface CsrMatrix {
  rowCount: number;
  colCount: number;
  rowPtr: Int32Array; // length rowCount + 1
  colIndex: Int32Array; // length nnz, sorted within each row
  values: Float32Array; // length nnz
}

export function nonZeroCount(m: CsrMatrix): number {
  return m.rowPtr[m.rowCount];
}

/**
 * Adjacency matrix of a graph. With symmetric = true each edge (u, v) also yields (v, u),
 * as message passing on an undirected graph needs. Duplicate entries are summed; self-loops
 * given in the edge list are kept (normalisation adds its own).
 */
export function buildAdjacency(nodeCount: number, edges: EdgeList, symmetric: boolean): CsrMatrix {
  const { source, target, weight, count } = edges;
  const rowPtr = new Int32Array(nodeCount + 1);
  const colPtr = new Int32Array(nodeCount + 1);
  for (let e = 0; e < count; e++) {
    const u = source[e];
    const v = target[e];
    if (!(u >= 0 && u < nodeCount && v >= 0 && v < nodeCount)) {
      throw new Error(`buildAdjacency: edge ${e} joins node indices ${u} and ${v}, outside 0..${nodeCount - 1}`);
    }
    rowPtr[u + 1]++;
    colPtr[v + 1]++;
    if (symmetric && u !== v) {
      rowPtr[v + 1]++;
      colPtr[u + 1]++;
    }
  }
  for (let i = 0; i < nodeCount; i++) {
    rowPtr[i + 1] += rowPtr[i];
    colPtr[i + 1] += colPtr[i];
  }
  // The edges go straight into column buckets (the first of the two counting-sort passes of
  // sortByColumnAndMerge), which saves writing them out row by row first.
  const colCursor = colPtr.slice(0, nodeCount);
  const rowOfEntry = new Int32Array(rowPtr[nodeCount]);
  const valueByColumn = new Float32Array(rowPtr[nodeCount]);
  for (let e = 0; e < count; e++) {
    const w = weight ? weight[e] : 1;
    const u = source[e];
    const v = target[e];
    let slot = colCursor[v]++;
    rowOfEntry[slot] = u;
    valueByColumn[slot] = w;
    if (symmetric && u !== v) {
      slot = colCursor[u]++;
      rowOfEntry[slot] = v;
      valueByColumn[slot] = w;
    }
  }
  return dealToRowsAndMerge(nodeCount, nodeCount, rowPtr, colPtr, rowOfEntry, valueByColumn);
}

/** Sorts each row by column and sums duplicate columns; returns a compact matrix (inputs untouched). */
export function sortAndMergeRows(rowCount: number, colCount: number, rowPtr: Int32Array, cols: Int32Array, vals: Float32Array): CsrMatrix {
  if (rowsStrictlySorted(rowCount, rowPtr, cols)) {
    return {
      rowCount,
      colCount,
      rowPtr: rowPtr.slice(),
      colIndex: cols.slice(0, rowPtr[rowCount]),
      values: vals.slice(0, rowPtr[rowCount]),
    };
  }
  return sortByColumnAndMerge(rowCount, colCount, rowPtr, cols, vals);
}

function rowsStrictlySorted(rowCount: number, rowPtr: Int32Array, cols: Int32Array): boolean {
  for (let r = 0; r < rowCount; r++) {
    const end = rowPtr[r + 1];
    for (let k = rowPtr[r] + 1; k < end; k++) if (cols[k] <= cols[k - 1]) return false;
  }
  return true;
}

/**
 * Two counting-sort passes instead of a comparison sort per row: entries are first bucketed by
 * column, then dealt back to their rows in column order, so every row comes out sorted in
 * O(entries + rows + columns). Equal columns keep their input order, so sums are reproducible.
 */
function sortByColumnAndMerge(rowCount: number, colCount: number, rowPtr: Int32Array, cols: Int32Array, vals: Float32Array): CsrMatrix {
  const entryCount = rowPtr[rowCount];
  const colPtr = new Int32Array(colCount + 1);
  for (let k = 0; k < entryCount; k++) {
    const c = cols[k];
    if (!(c >= 0 && c < colCount)) throw new Error(`sortAndMergeRows: entry ${k} has column ${c}, outside 0..${colCount - 1}`);
    colPtr[c + 1]++;
  }
  for (let c = 0; c < colCount; c++) colPtr[c + 1] += colPtr[c];
  const colCursor = colPtr.slice(0, colCount);
  const rowOfEntry = new Int32Array(entryCount);
  const valueByColumn = new Float32Array(entryCount);
  for (let r = 0; r < rowCount; r++) {
    const end = rowPtr[r + 1];
    for (let k = rowPtr[r]; k < end; k++) {
      const slot = colCursor[cols[k]]++;
      rowOfEntry[slot] = r;
      valueByColumn[slot] = vals[k];
    }
  }
  return dealToRowsAndMerge(rowCount, colCount, rowPtr, colPtr, rowOfEntry, valueByColumn);
}

/** Second pass: entries bucketed by column are dealt to their rows in column order; then
 * repeated columns within a row are summed. */
function dealToRowsAndMerge(
  rowCount: number,
  colCount: number,
  rowPtr: Int32Array,
  colPtr: Int32Array,
  rowOfEntry: Int32Array,
  valueByColumn: Float32Array,
): CsrMatrix {
  const entryCount = rowPtr[rowCount];
  const rowCursor = rowPtr.slice(0, rowCount);
  const sortedCols = new Int32Array(entryCount);
  const sortedVals = new Float32Array(entryCount);
  for (let c = 0; c < colCount; c++) {
    const end = colPtr[c + 1];
    for (let slot = colPtr[c]; slot < end; slot++) {
      const position = rowCursor[rowOfEntry[slot]]++;
      sortedCols[position] = c;
      sortedVals[position] = valueByColumn[slot];
    }
  }
  // Sum repeated columns, compacting in place (the write position never passes the read one).
  const outPtr = new Int32Array(rowCount + 1);
  let write = 0;
  for (let r = 0; r < rowCount; r++) {
    const end = rowPtr[r + 1];
    outPtr[r] = write;
    let last = -1;
    for (let k = rowPtr[r]; k < end; k++) {
      const c = sortedCols[k];
      if (c === last) {
        sortedVals[write - 1] += sortedVals[k];
      } else {
        sortedCols[write] = c;
        sortedVals[write++] = sortedVals[k];
        last = c;
      }
    }
  }
  outPtr[rowCount] = write;
  return {
    rowCount,
    colCount,
    rowPtr: outPtr,
    colIndex: write === entryCount ? sortedCols : sortedCols.slice(0, write),
    values: write === entryCount ? sortedVals : sortedVals.slice(0, write),
  };
}

/** Transpose (needed for the gradient of a product with a non-symmetric matrix). */
export function transpose(m: CsrMatrix): CsrMatrix {
  const { rowPtr, colIndex, values } = m;
  const nnz = nonZeroCount(m);
  const ptr = new Int32Array(m.colCount + 1);
  for (let k = 0; k < nnz; k++) ptr[colIndex[k] + 1]++;
  for (let c = 0; c < m.colCount; c++) ptr[c + 1] += ptr[c];
  const cursor = ptr.slice(0, m.colCount);
  const cols = new Int32Array(nnz);
  const vals = new Float32Array(nnz);
  // Rows are visited in order, so each row of the transpose comes out sorted.
  for (let r = 0; r < m.rowCount; r++) {
    const end = rowPtr[r + 1];
    for (let k = rowPtr[r]; k < end; k++) {
      const slot = cursor[colIndex[k]]++;
      cols[slot] = r;
      vals[slot] = values[k];
    }
  }
  return { rowCount: m.colCount, colCount: m.rowCount, rowPtr: ptr, colIndex: cols, values: vals };
}

/** Number of neighbours of each node (row lengths). */
export function rowLengths(m: CsrMatrix): Int32Array {
  const out = new Int32Array(m.rowCount);
  for (let r = 0; r < m.rowCount; r++) out[r] = m.rowPtr[r + 1] - m.rowPtr[r];
  return out;
}
