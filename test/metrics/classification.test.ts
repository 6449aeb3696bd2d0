import { strict as assert } from 'node:assert';
import {
  accuracy,
  confusionMatrix,
  macroF1,
  openSetConfusionMatrix,
  openSetLabels,
  openSetMacroF1,
  perClassScores,
} from '../../src/engine/metrics/classification';
import { REJECTED } from '../../src/engine/scoring/openSetPrediction';

const i32 = (values: number[]) => Int32Array.from(values);

describe('classification metrics', () => {
  // scikit-learn's f1_score documentation example: y_true = [0, 1, 2, 0, 1, 2],
  // y_pred = [0, 2, 1, 0, 0, 1] → macro 0.26666666666666666, micro 0.3333333333333333,
  // per class (average=None) [0.8, 0, 0]. Source: scikit-learn API docs, sklearn.metrics.f1_score,
  // Examples (values as printed by scikit-learn in public notes reproducing that example).
  const truth = i32([0, 1, 2, 0, 1, 2]);
  const predicted = i32([0, 2, 1, 0, 0, 1]);

  it("macro-F1 and per-class F1 match scikit-learn's f1_score example", () => {
    assert.ok(Math.abs(macroF1(predicted, truth, 3) - 0.26666666666666666) < 1e-15);
    const { f1 } = perClassScores(predicted, truth, 3);
    assert.deepEqual(Array.from(f1), [0.8, 0, 0]);
    // For single-label multiclass data micro-F1 equals accuracy: 2 of 6 correct.
    assert.ok(Math.abs(accuracy(predicted, truth) - 0.3333333333333333) < 1e-15);
  });

  it('classes absent from truth and prediction are skipped', () => {
    // Convention: scikit-learn's default labels = the union of labels present ("By default, all
    // labels in y_true and y_pred are used", sklearn.metrics.f1_score docs). With 10 declared
    // classes the example still gives 0.2666…, not a mean diluted by 7 empty classes.
    assert.ok(Math.abs(macroF1(predicted, truth, 10) - 0.26666666666666666) < 1e-15);
    // A class predicted but never true counts as F1 0: truth [0, 0], prediction [0, 1]:
    // class 0: tp 1, fn 1 → F1 = 2/3; class 1: fp 1 → 0; macro = 1/3.
    assert.ok(Math.abs(macroF1(i32([0, 1]), i32([0, 0]), 3) - 1 / 3) < 1e-15);
  });

  it('mask and unlabelled truth (−1) are skipped; empty selection is NaN', () => {
    const mask = Uint8Array.from([1, 1, 1, 1, 0, 0]);
    // Counted: truths [0, 1, 2, 0], predictions [0, 2, 1, 0] → accuracy 2/4.
    assert.equal(accuracy(predicted, truth, mask), 0.5);
    assert.equal(accuracy(i32([1, 1, 0]), i32([1, -1, 1])), 0.5);
    assert.ok(Number.isNaN(accuracy(i32([1]), i32([-1]))));
    assert.ok(Number.isNaN(macroF1(i32([1]), i32([-1]), 2)));
  });

  it('confusion matrix (rows truth, columns prediction)', () => {
    const { counts } = confusionMatrix(predicted, truth, 3);
    // truth 0 → predicted 0 twice; truth 1 → 2 once, 0 once; truth 2 → 1 twice.
    assert.deepEqual(Array.from(counts), [2, 0, 0, 1, 0, 1, 0, 2, 0]);
    assert.throws(() => confusionMatrix(i32([REJECTED]), i32([0]), 3), /openSetConfusionMatrix/);
    assert.throws(() => macroF1(i32([0]), i32([5]), 3), /truth label 5 of node 0/);
  });

  it('open-set macro-F1: rejection is the extra class "unknown"', () => {
    // Known classes 0 and 1; class 2 was not in training, so its truth maps to unknown (index 2).
    const known = [true, true, false];
    const truthOpen = i32([0, 0, 1, 1, 2, 2, -1]);
    const predOpen = i32([0, REJECTED, 1, 0, REJECTED, 1, 0]);
    assert.deepEqual(Array.from(openSetLabels(truthOpen, known, 'truth')), [0, 0, 1, 1, 3, 3, -1]);
    // Open-set label space has knownClasses.length + 1 = 4 entries (class 2 can never appear).
    // class 0: tp 1, predicted {0, 3}, truth {0, 1} → 2·1 / (2 + 2) = 0.5
    // class 1: tp 1, predicted {2, 5}, truth {2, 3} → 0.5
    // unknown: tp 1 (node 4), predicted {1, 4}, truth {4, 5} → 0.5;  node 6 unlabelled: skipped.
    assert.ok(Math.abs(openSetMacroF1(predOpen, truthOpen, known) - 0.5) < 1e-15);
    // Treating all three classes as known: class 2 truth is never predicted → F1 0; the rejected
    // predictions are misses; unknown has no truth but two predictions → F1 0.
    // class 0: tp 1, pred 2 (nodes 0, 3), truth 2 → 0.5; class 1: tp 1, pred 2, truth 2 → 0.5.
    assert.ok(Math.abs(openSetMacroF1(predOpen, truthOpen, [true, true, true]) - 0.25) < 1e-15);
    const cm = openSetConfusionMatrix(predOpen, truthOpen, known);
    assert.equal(cm.classCount, 4);
    // Row unknown (3): node 4 → unknown, node 5 → class 1.
    assert.deepEqual(Array.from(cm.counts.slice(12, 16)), [0, 1, 0, 1]);
  });
});
