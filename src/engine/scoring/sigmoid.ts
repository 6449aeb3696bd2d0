// Turning model outputs (logits) into probabilities without overflow: exp of a large positive
// logit is Infinity in float arithmetic, so each formula only ever exponentiates non-positive numbers.
import { rowCountOf } from './rowShape';

/** Logistic function of one logit, exact for large |z| (no Infinity/NaN). */
export function sigmoidOf(z: number): number {
  if (z >= 0) return 1 / (1 + Math.exp(-z));
  const e = Math.exp(z);
  return e / (1 + e);
}

/** Element-wise sigmoid: one independent probability per class (one-vs-rest outputs). */
export function sigmoid(logits: Float32Array): Float32Array {
  const out = new Float32Array(logits.length);
  for (let i = 0; i < logits.length; i++) out[i] = sigmoidOf(logits[i]);
  return out;
}

/** Row-wise softmax of a row-major nodes × classes matrix (max subtracted before exponentiating). */
export function softmaxRows(logits: Float32Array, classCount: number): Float32Array {
  const rows = rowCountOf(logits, classCount, 'softmaxRows');
  const out = new Float32Array(logits.length);
  for (let r = 0; r < rows; r++) {
    const base = r * classCount;
    let max = -Infinity;
    for (let c = 0; c < classCount; c++) if (logits[base + c] > max) max = logits[base + c];
    let total = 0;
    for (let c = 0; c < classCount; c++) {
      const e = Math.exp(logits[base + c] - max);
      out[base + c] = e;
      total += e;
    }
    // Float32 storage of e loses < 1 ulp, well inside float32 output precision.
    const inverse = 1 / total;
    for (let c = 0; c < classCount; c++) out[base + c] *= inverse;
  }
  return out;
}

/** Column of the largest value in each row (the first one on ties). */
export function rowArgmax(values: Float32Array, classCount: number): Int32Array {
  const rows = rowCountOf(values, classCount, 'rowArgmax');
  const out = new Int32Array(rows);
  for (let r = 0; r < rows; r++) {
    const base = r * classCount;
    let best = 0;
    let bestValue = values[base];
    for (let c = 1; c < classCount; c++) {
      if (values[base + c] > bestValue) {
        bestValue = values[base + c];
        best = c;
      }
    }
    out[r] = best;
  }
  return out;
}
