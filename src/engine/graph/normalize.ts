// Normalised adjacency matrices for message passing: the symmetric GCN form and the row-mean
// (GraphSAGE mean aggregator) form. Both return new matrices; the input is left untouched.
import type { CsrMatrix } from './csr';

/**
 * Â = D^-1/2 (A + I) D^-1/2 with D the row sums of A + I (GCN). A self-loop already present in A
 * has the added 1 summed into it. An isolated node keeps only its self-loop, with weight 1.
 * For a directed (non-symmetric) A the degree is the weighted out-degree of each row.
 */
export function symmetricNormalized(adjacency: CsrMatrix): CsrMatrix {
  requireSquare(adjacency, 'symmetricNormalized');
  const looped = addSelfLoops(adjacency);
  const inverseRootDegree = new Float64Array(looped.rowCount);
  const sums = rowSums(looped);
  for (let row = 0; row < looped.rowCount; row++) {
    // A degree ≤ 0 can only come from negative weights; its node then receives and sends nothing.
    inverseRootDegree[row] = sums[row] > 0 ? 1 / Math.sqrt(sums[row]) : 0;
  }
  const { rowPtr, colIndex, values } = looped;
  for (let row = 0; row < looped.rowCount; row++) {
    const rowScale = inverseRootDegree[row];
    for (let k = rowPtr[row]; k < rowPtr[row + 1]; k++) {
      values[k] = rowScale * values[k] * inverseRootDegree[colIndex[k]];
    }
  }
  return looped;
}

/**
 * Each row divided by its sum, so that A·H averages neighbours (GraphSAGE mean). With
 * withSelfLoops the node itself counts as one more neighbour. Rows with no entries stay empty
 * (an isolated node aggregates to zeros); a row whose weights sum to zero becomes all zeros.
 */
export function meanNormalized(adjacency: CsrMatrix, withSelfLoops: boolean): CsrMatrix {
  const result = withSelfLoops ? addSelfLoops(adjacency) : copyMatrix(adjacency);
  const sums = rowSums(result);
  const { rowPtr, values } = result;
  for (let row = 0; row < result.rowCount; row++) {
    const scale = sums[row] !== 0 ? 1 / sums[row] : 0;
    for (let k = rowPtr[row]; k < rowPtr[row + 1]; k++) values[k] *= scale;
  }
  return result;
}

/** A + I as a new matrix, keeping columns sorted: the diagonal entry is inserted in place, or
 * incremented by 1 when A already has it. */
export function addSelfLoops(adjacency: CsrMatrix): CsrMatrix {
  requireSquare(adjacency, 'addSelfLoops');
  const { rowCount, rowPtr, colIndex, values } = adjacency;
  let missingDiagonal = 0;
  for (let row = 0; row < rowCount; row++) {
    if (findColumn(colIndex, rowPtr[row], rowPtr[row + 1], row) < 0) missingDiagonal++;
  }
  const nnz = rowPtr[rowCount] + missingDiagonal;
  const outPtr = new Int32Array(rowCount + 1);
  const outCols = new Int32Array(nnz);
  const outVals = new Float32Array(nnz);
  let write = 0;
  for (let row = 0; row < rowCount; row++) {
    outPtr[row] = write;
    let placed = false;
    for (let k = rowPtr[row]; k < rowPtr[row + 1]; k++) {
      const col = colIndex[k];
      if (!placed && col >= row) {
        placed = true;
        if (col === row) {
          outCols[write] = col;
          outVals[write++] = values[k] + 1;
          continue;
        }
        outCols[write] = row;
        outVals[write++] = 1;
      }
      outCols[write] = col;
      outVals[write++] = values[k];
    }
    if (!placed) {
      outCols[write] = row;
      outVals[write++] = 1;
    }
  }
  outPtr[rowCount] = write;
  return { rowCount, colCount: adjacency.colCount, rowPtr: outPtr, colIndex: outCols, values: outVals };
}

/** Position of column `col` within the sorted row slice [start, end), or -1. */
function findColumn(colIndex: Int32Array, start: number, end: number, col: number): number {
  let low = start;
  let high = end - 1;
  while (low <= high) {
    const mid = (low + high) >>> 1;
    const found = colIndex[mid];
    if (found === col) return mid;
    if (found < col) low = mid + 1;
    else high = mid - 1;
  }
  return -1;
}

function rowSums(m: CsrMatrix): Float64Array {
  const sums = new Float64Array(m.rowCount);
  for (let row = 0; row < m.rowCount; row++) {
    let sum = 0;
    for (let k = m.rowPtr[row]; k < m.rowPtr[row + 1]; k++) sum += m.values[k];
    sums[row] = sum;
  }
  return sums;
}

function copyMatrix(m: CsrMatrix): CsrMatrix {
  return { rowCount: m.rowCount, colCount: m.colCount, rowPtr: m.rowPtr.slice(), colIndex: m.colIndex.slice(), values: m.values.slice() };
}

function requireSquare(m: CsrMatrix, operation: string): void {
  if (m.rowCount !== m.colCount) {
    throw new Error(`${operation}: an adjacency matrix must be square, got ${m.rowCount} × ${m.colCount}`);
  }
}
