import { strict as assert } from 'node:assert';
import { docNovelty, docRejected, docThresholds } from '../../src/engine/scoring/docThresholds';
import { SeededRandom } from '../../src/engine/util/random';

/** The reference pipeline's formulas, transcribed literally (shared/reference/torch_pipeline.py):
 *  sd = std(cat([p, 2 − p]), unbiased=False) if len(p) else 0.5;  thr = max(0.5, 1 − 3·sd);
 *  novelty = 1 − clamp(max_c(P / thr), max=1);  rejected = all_c(P < thr). */
function referenceThresholds(P: Float32Array, C: number, nodes: Int32Array, classes: Int32Array, alpha: number): number[] {
  const thr: number[] = [];
  for (let c = 0; c < C; c++) {
    const p: number[] = [];
    for (let k = 0; k < nodes.length; k++) if (classes[k] === c) p.push(P[nodes[k] * C + c]);
    let sd = 0.5;
    if (p.length) {
      const both = [...p, ...p.map((v) => 2 - v)];
      const mean = both.reduce((a, b) => a + b, 0) / both.length;
      sd = Math.sqrt(both.reduce((a, b) => a + (b - mean) ** 2, 0) / both.length);
    }
    thr.push(Math.max(0.5, 1 - alpha * sd));
  }
  return thr;
}

describe('DOC thresholds', () => {
  // 5 nodes × 3 classes, row-major; nodes 0–2 train class 0, nodes 3–4 train class 1, class 2 has none.
  const P = new Float32Array([
    0.9,
    0.1,
    0.2, //
    0.8,
    0.3,
    0.1, //
    1.0,
    0.0,
    0.0, //
    0.2,
    0.6,
    0.1, //
    0.1,
    0.9,
    0.3, //
  ]);
  const trainNodes = new Int32Array([0, 1, 2, 3, 4]);
  const trainClasses = new Int32Array([0, 0, 0, 1, 1]);

  it('matches a case computed by hand', () => {
    const thr = docThresholds(P, 3, trainNodes, trainClasses);
    // Class 0: p = {0.9, 0.8, 1.0}; mirrored set {0.9, 0.8, 1.0, 1.1, 1.2, 1.0} has mean 1,
    //   squared deviations 0.01 + 0.04 + 0 + 0.01 + 0.04 + 0 = 0.10, σ² = 0.10 / 6 = 0.016667,
    //   σ = 0.129099, threshold = max(0.5, 1 − 3 × 0.129099) = 1 − 0.387298 = 0.612702.
    assert.ok(Math.abs(thr[0] - 0.612702) < 1e-6, `class 0 threshold ${thr[0]}`);
    // Class 1: p = {0.6, 0.9}; σ² = (0.16 + 0.01 + 0.16 + 0.01) / 4 = 0.085, σ = 0.291548,
    //   1 − 3σ = 0.125357 < 0.5, so the floor 0.5 applies.
    assert.equal(thr[1], 0.5);
    // Class 2: no training nodes → 0.5.
    assert.equal(thr[2], 0.5);
    // alpha = 1 for class 0: 1 − 0.129099 = 0.870901.
    assert.ok(Math.abs(docThresholds(P, 3, trainNodes, trainClasses, 1)[0] - 0.870901) < 1e-6);
  });

  it('novelty and rejection on the hand case', () => {
    const thr = new Float32Array([0.612702, 0.5, 0.5]);
    const novelty = docNovelty(P, 3, thr);
    // Node 3: ratios 0.2/0.612702 = 0.3264, 0.6/0.5 = 1.2, 0.1/0.5 = 0.2 → max 1.2 → novelty 0.
    assert.equal(novelty[3], 0);
    const extra = new Float32Array([0.3, 0.4, 0.2]); // every p below its threshold
    const n2 = docNovelty(extra, 3, thr);
    // max(0.3/0.612702 = 0.489634, 0.4/0.5 = 0.8, 0.2/0.5 = 0.4) = 0.8 → novelty 0.2.
    assert.ok(Math.abs(n2[0] - 0.2) < 1e-6);
    assert.deepEqual(Array.from(docRejected(extra, 3, thr)), [1]);
    assert.deepEqual(Array.from(docRejected(P, 3, thr)), [0, 0, 0, 0, 0]);
  });

  it('equals the reference formulas on random data; rejected ⇔ novelty > 0', () => {
    const random = new SeededRandom(7);
    const nodeCount = 2000;
    const C = 6;
    const probs = new Float32Array(nodeCount * C);
    for (let i = 0; i < probs.length; i++) probs[i] = random.next() ** 2;
    const trainCount = 400;
    const nodes = new Int32Array(trainCount);
    const classes = new Int32Array(trainCount);
    for (let k = 0; k < trainCount; k++) {
      nodes[k] = random.int(nodeCount);
      classes[k] = random.int(C - 1); // the last class has no training nodes
      probs[nodes[k] * C + classes[k]] = 0.75 + 0.25 * random.next(); // members score high, as after training
    }
    for (const alpha of [3, 1.5]) {
      const thr = docThresholds(probs, C, nodes, classes, alpha);
      const expected = referenceThresholds(probs, C, nodes, classes, alpha);
      for (let c = 0; c < C; c++)
        assert.ok(Math.abs(thr[c] - expected[c]) < 1e-6, `alpha ${alpha}, class ${c}: ${thr[c]} vs ${expected[c]}`);
      assert.ok(
        thr.some((t) => t > 0.5),
        'some class should be above the floor, or the check is weak',
      );
      const novelty = docNovelty(probs, C, thr);
      const rejected = docRejected(probs, C, thr);
      let rejectedCount = 0;
      for (let i = 0; i < nodeCount; i++) {
        let ratio = -Infinity;
        let allBelow = true;
        for (let c = 0; c < C; c++) {
          ratio = Math.max(ratio, probs[i * C + c] / thr[c]);
          if (!(probs[i * C + c] < thr[c])) allBelow = false;
        }
        assert.ok(Math.abs(novelty[i] - (1 - Math.min(1, ratio))) < 1e-6);
        assert.equal(rejected[i], allBelow ? 1 : 0);
        assert.equal(novelty[i] > 0, allBelow, `node ${i}`);
        rejectedCount += rejected[i];
      }
      assert.ok(rejectedCount > 0 && rejectedCount < nodeCount, `rejected ${rejectedCount}`);
    }
  });

  it('rejects bad input with a clear message', () => {
    assert.throws(() => docThresholds(P, 4, trainNodes, trainClasses), /multiple of classCount/);
    assert.throws(() => docThresholds(P, 3, trainNodes, new Int32Array([0, 0, 0, 1, 3])), /training class 3 \(entry 4\)/);
    assert.throws(() => docThresholds(P, 3, new Int32Array([9]), new Int32Array([0])), /training node 9/);
    assert.throws(() => docNovelty(P, 3, new Float32Array([0.5, 0.5])), /2 thresholds for 3 classes/);
    assert.throws(() => docNovelty(P, 3, new Float32Array([0.5, 0, 0.5])), /threshold of class 1/);
  });
});
