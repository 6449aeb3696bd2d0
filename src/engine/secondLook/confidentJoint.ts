// Confident learning on out-of-fold outputs: per-class thresholds are the average self-confidence
// (the mean output for class c over the nodes labelled c), and a node counts towards
// joint[given][j] when its output for j reaches j's threshold and j has the highest output among
// the classes that reach theirs. Nodes counted off the diagonal are label-issue candidates: the
// model, judged by the standard each class sets on its own members, is confident the node belongs
// elsewhere. Rows whose outputs reach no threshold are not counted at all.

export interface ConfidentJoint {
  /** Average self-confidence of each class; NaN for a class no node is labelled with. */
  thresholds: Float64Array;
  /** counts[given][confident]: nodes labelled `given` whose confident class is `confident`. */
  counts: number[][];
  /** Confident class of each row, or -1 when no output reaches its class's threshold. */
  confidentClass: Int32Array;
}

/** Rows scaled to sum to 1 (rows of zeros stay zero), so one-vs-rest outputs compare as shares. */
export function normaliseRows(outputs: Float32Array, classCount: number): Float32Array {
  const shares = new Float32Array(outputs.length);
  for (let start = 0; start < outputs.length; start += classCount) {
    let total = 0;
    for (let c = 0; c < classCount; c++) total += outputs[start + c];
    if (total > 0) for (let c = 0; c < classCount; c++) shares[start + c] = outputs[start + c] / total;
  }
  return shares;
}

export function averageSelfConfidence(outputs: Float32Array, classCount: number, givenClass: Int32Array): Float64Array {
  const sum = new Float64Array(classCount);
  const count = new Float64Array(classCount);
  givenClass.forEach((c, row) => {
    sum[c] += outputs[row * classCount + c];
    count[c]++;
  });
  return sum.map((s, c) => (count[c] > 0 ? s / count[c] : NaN));
}

export function confidentJoint(outputs: Float32Array, classCount: number, givenClass: Int32Array): ConfidentJoint {
  const thresholds = averageSelfConfidence(outputs, classCount, givenClass);
  const counts = Array.from({ length: classCount }, () => new Array<number>(classCount).fill(0));
  const confidentClass = new Int32Array(givenClass.length).fill(-1);
  givenClass.forEach((given, row) => {
    let best = -1;
    for (let c = 0; c < classCount; c++) {
      const output = outputs[row * classCount + c];
      // A class no node is labelled with has no threshold and cannot be confident.
      if (!(output >= thresholds[c])) continue;
      if (best < 0 || output > outputs[row * classCount + best]) best = c;
    }
    confidentClass[row] = best;
    if (best >= 0) counts[given][best]++;
  });
  return { thresholds, counts, confidentClass };
}

/** Rows counted off the diagonal of the confident joint. */
export function offDiagonalRows(joint: ConfidentJoint, givenClass: Int32Array): Uint8Array {
  return Uint8Array.from(givenClass, (given, row) => (joint.confidentClass[row] >= 0 && joint.confidentClass[row] !== given ? 1 : 0));
}
