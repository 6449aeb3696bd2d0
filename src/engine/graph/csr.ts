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
  const degree = new Int32Array(nodeCount + 1);
  for (let e = 0; e < count; e++) {
    degree[source[e] + 1]++;
    if (symmetric && source[e] !== target[e]) degree[target[e] + 1]++;
  }
  for (let i = 0; i < nodeCount; i++) degree[i + 1] += degree[i];
  const totalEntries = degree[nodeCount];
  const cursor = degree.slice(0, nodeCount);
  const cols = new Int32Array(totalEntries);
  const vals = new Float32Array(totalEntries);
  for (let e = 0; e < count; e++) {
    const w = weight ? weight[e] : 1;
    const u = source[e];
    const v = target[e];
    cols[cursor[u]] = v;
    vals[cursor[u]++] = w;
    if (symmetric && u !== v) {
      cols[cursor[v]] = u;
      vals[cursor[v]++] = w;
    }
  }
  return sortAndMergeRows(nodeCount, nodeCount, degree, cols, vals);
}

/** Sorts each row by column and sums duplicate columns; returns a compact matrix. */
export function sortAndMergeRows(rowCount: number, colCount: number, rowPtr: Int32Array, cols: Int32Array, vals: Float32Array): CsrMatrix {
  const outPtr = new Int32Array(rowCount + 1);
  const outCols = new Int32Array(cols.length);
  const outVals = new Float32Array(cols.length);
  let write = 0;
  let order: number[] = [];
  for (let r = 0; r < rowCount; r++) {
    const start = rowPtr[r];
    const end = rowPtr[r + 1];
    outPtr[r] = write;
    let sorted = true;
    for (let k = start + 1; k < end; k++) {
      if (cols[k] <= cols[k - 1]) {
        sorted = false;
        break;
      }
    }
    if (sorted) {
      for (let k = start; k < end; k++) {
        outCols[write] = cols[k];
        outVals[write++] = vals[k];
      }
      continue;
    }
    order = [];
    for (let k = start; k < end; k++) order.push(k);
    order.sort((a, b) => cols[a] - cols[b]);
    let last = -1;
    for (const k of order) {
      if (cols[k] === last) {
        outVals[write - 1] += vals[k];
      } else {
        outCols[write] = cols[k];
        outVals[write++] = vals[k];
        last = cols[k];
      }
    }
  }
  outPtr[rowCount] = write;
  return {
    rowCount,
    colCount,
    rowPtr: outPtr,
    colIndex: write === cols.length ? outCols : outCols.slice(0, write),
    values: write === cols.length ? outVals : outVals.slice(0, write),
  };
}

/** Transpose (needed for the gradient of a product with a non-symmetric matrix). */
export function transpose(m: CsrMatrix): CsrMatrix {
  const nnz = nonZeroCount(m);
  const ptr = new Int32Array(m.colCount + 1);
  for (let k = 0; k < nnz; k++) ptr[m.colIndex[k] + 1]++;
  for (let c = 0; c < m.colCount; c++) ptr[c + 1] += ptr[c];
  const cursor = ptr.slice(0, m.colCount);
  const cols = new Int32Array(nnz);
  const vals = new Float32Array(nnz);
  for (let r = 0; r < m.rowCount; r++) {
    for (let k = m.rowPtr[r]; k < m.rowPtr[r + 1]; k++) {
      const c = m.colIndex[k];
      cols[cursor[c]] = r;
      vals[cursor[c]++] = m.values[k];
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
