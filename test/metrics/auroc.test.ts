import { strict as assert } from 'node:assert';
import { auroc } from '../../src/engine/metrics/auroc';
import { SeededRandom } from '../../src/engine/util/random';

describe('AUROC', () => {
  it("scikit-learn's roc_auc_score documentation example", () => {
    // Source: scikit-learn API docs, sklearn.metrics.roc_auc_score (and auc_score in 0.13), Examples:
    // y_true = [0, 0, 1, 1], y_scores = [0.1, 0.4, 0.35, 0.8] → 0.75.
    assert.equal(auroc([0.1, 0.4, 0.35, 0.8], [0, 0, 1, 1]), 0.75);
  });

  it("Fawcett's 20-instance example (Fig. 3 data)", () => {
    // Data: Fawcett 2006, "An introduction to ROC analysis", Pattern Recognition Letters 27, Fig. 3:
    // scores .9 .8 .7 .6 .55 .54 .53 .52 .51 .505 .4 .39 .38 .37 .36 .35 .34 .33 .30 .1 with classes
    // p p n p p p n n p n p n p n n n p n p n (verified against two independent transcriptions in
    // public ROC test suites). The AUC is not quoted from the paper; it is counted here by hand:
    // negatives ranked below each positive, in order: 10 + 10 + 9 + 9 + 9 + 7 + 6 + 5 + 2 + 1 = 68
    // of 10 × 10 pairs → 0.68.
    const scores = [0.9, 0.8, 0.7, 0.6, 0.55, 0.54, 0.53, 0.52, 0.51, 0.505, 0.4, 0.39, 0.38, 0.37, 0.36, 0.35, 0.34, 0.33, 0.3, 0.1];
    const classes = 'ppnpppnnpnpnpnnnpnpn'.split('').map((c) => c === 'p');
    assert.ok(Math.abs(auroc(scores, classes) - 0.68) < 1e-12);
  });

  it('Hanley & McNeil 1982 rating example (ties throughout)', () => {
    // Counts: Hanley & McNeil 1982, Radiology 143:29–36, Table 1 (5-point ratings of 109 CT images,
    // 58 normal, 51 abnormal), as transcribed in a public ROC toolbox's example:
    //   rating        1   2   3   4   5
    //   normal       33   6   6  11   2
    //   abnormal      3   2   2  11  33
    // Area 0.893 (from memory; the paper's Wilcoxon area). By hand, U = Σ abnormal × (normals below +
    // ½ normals tied): 3·16.5 + 2·36 + 2·42 + 11·50.5 + 33·57 = 2642, over 58 × 51 = 2958 → 0.89317.
    const normal = [33, 6, 6, 11, 2];
    const abnormal = [3, 2, 2, 11, 33];
    const scores: number[] = [];
    const positives: boolean[] = [];
    for (let r = 0; r < 5; r++) {
      for (let k = 0; k < normal[r] + abnormal[r]; k++) {
        scores.push(r + 1);
        positives.push(k >= normal[r]);
      }
    }
    assert.equal(scores.length, 109);
    const area = auroc(scores, positives);
    assert.ok(Math.abs(area - 2642 / 2958) < 1e-12);
    assert.equal(area.toFixed(3), '0.893');
  });

  it('equals Mann–Whitney U / (n1·n0) by brute-force pair count, with ties', () => {
    const random = new SeededRandom(3);
    for (let trial = 0; trial < 5; trial++) {
      const n = 150 + trial * 37;
      const scores = Float32Array.from({ length: n }, () => Math.round(random.next() * 10) / 10); // many ties
      const positives = Uint8Array.from({ length: n }, () => (random.next() < 0.4 ? 1 : 0));
      let u = 0;
      let n1 = 0;
      let n0 = 0;
      for (let i = 0; i < n; i++) {
        if (positives[i]) n1++;
        else n0++;
        if (!positives[i]) continue;
        for (let j = 0; j < n; j++) {
          if (positives[j]) continue;
          if (scores[i] > scores[j]) u += 1;
          else if (scores[i] === scores[j]) u += 0.5;
        }
      }
      assert.ok(Math.abs(auroc(scores, positives) - u / (n1 * n0)) < 1e-12, `trial ${trial}`);
    }
  });

  it('edge cases: perfect, reversed, all tied, an empty class', () => {
    assert.equal(auroc([1, 2, 3, 4], [0, 0, 1, 1]), 1);
    assert.equal(auroc([4, 3, 2, 1], [0, 0, 1, 1]), 0);
    assert.equal(auroc([5, 5, 5, 5], [0, 1, 0, 1]), 0.5);
    assert.ok(Number.isNaN(auroc([1, 2], [1, 1])));
    assert.ok(Number.isNaN(auroc([1, 2], [false, false])));
    assert.throws(() => auroc([1, 2], [1]), /2 scores for 1 labels/);
    assert.throws(() => auroc([1, NaN], [1, 0]), /score 1 is NaN/);
  });
});
