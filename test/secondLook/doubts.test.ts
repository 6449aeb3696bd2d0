import assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { parse } from 'csv-parse/sync';
import { loadDataset } from '../../src/engine/dataset/load';
import type { FoldObservation } from '../../src/engine/pipeline/crossFit';
import { defaultRunSettings, type RunSettings } from '../../src/engine/pipeline/runSettings';
import { prefixGraph } from '../../src/engine/pipeline/prefixGraph';
import { firstWindowSlice } from '../../src/engine/pipeline/trainingWindow';
import { sigmoid } from '../../src/engine/scoring/sigmoid';
import { findDoubtfulLabels, labelEvidence } from '../../src/engine/secondLook/doubts';
import type { DoubtsReport } from '../../src/engine/secondLook/reportTypes';
import { SeededRandom } from '../../src/engine/util/random';
import { copyDemoDataset, removeDemoCopy } from './demoCopy';

describe('labelEvidence: the disagreement score', () => {
  it('mixes the self-confidence margin with the share of disagreeing neighbours (formula in doubts.ts)', () => {
    // shares (0.2, 0.7, 0.1), curated class 0, one of two labelled neighbours labelled 1, w = 0.3:
    // margin = 0.2 − 0.7 = −0.5; modelDoubt = (1 + 0.5) / 2 = 0.75; disagreement = 1 − 0.5 = 0.5
    // score = 0.7 · 0.75 + 0.3 · 0.5 = 0.675; suggested = argmax(0.7·0.7 + 0.3·0.5, 0.7·0.1 + 0.3·0) = class 1
    const evidence = labelEvidence([0.2, 0.7, 0.1], 0, [0.5, 0.5, 0], 0.3);
    assert.ok(Math.abs(evidence.score - 0.675) < 1e-12);
    assert.ok(Math.abs(evidence.selfConfidenceMargin + 0.5) < 1e-12);
    assert.equal(evidence.neighbourDisagreement, 0.5);
    assert.equal(evidence.suggested, 1);
  });

  it('without labelled neighbours the score is the model doubt alone, and neighbours can pick the suggestion', () => {
    const alone = labelEvidence([0.6, 0.3, 0.1], 0, null, 0.3);
    assert.ok(Math.abs(alone.score - 0.35) < 1e-12); // (1 − 0.3) / 2
    assert.equal(alone.neighbourDisagreement, null);
    assert.equal(alone.suggested, 1);
    // Two neighbours labelled 2: 0.7·0.1 + 0.3·1 = 0.37 beats 0.7·0.3 = 0.21 for class 1.
    assert.equal(labelEvidence([0.6, 0.3, 0.1], 0, [0, 0, 1], 0.3).suggested, 2);
  });
});

describe('doubtful labels on the demo dataset with flipped labels', function () {
  // Training is pure JS on a loaded machine: few epochs, a small hidden layer and a window of
  // about 275 labelled nodes keep the five fold models to a few seconds each.
  this.timeout(600_000);
  const settings: RunSettings = { ...defaultRunSettings, historyWindow: 8, epochs: 40, hiddenUnits: 32 };
  let folder = '';
  let report: DoubtsReport;
  const flipped = new Set<string>();
  const folds: FoldObservation[] = [];
  let windowLabelCount = 0;
  let localOfNode: (id: string) => number;

  before(async () => {
    folder = await copyDemoDataset();
    const clean = await loadDataset(folder);
    const slice = clean.slices.length - 1;
    const first = firstWindowSlice(slice, settings.historyWindow);
    const labelsFile = path.join(folder, 'labels.csv');
    const rows = parse<{ id: string; label: string }>(await fs.readFile(labelsFile, 'utf8'), { columns: true });
    const knownClasses = clean.classes.filter((c) => c.status === 'active').map((c) => c.name);
    const inWindow = rows.filter((r) => clean.nodeSlice[clean.indexOfId.get(r.id) as number] >= first);
    windowLabelCount = inWindow.length;
    // 5% of the window's labels, each moved to a different known class, chosen by a seeded generator.
    const random = new SeededRandom(2024);
    for (const row of random.shuffle(inWindow.slice()).slice(0, Math.round(0.05 * inWindow.length))) {
      const others = knownClasses.filter((c) => c !== row.label);
      row.label = others[random.int(others.length)];
      flipped.add(row.id);
    }
    await fs.writeFile(labelsFile, 'id,label\n' + rows.map((r) => `${r.id},${r.label}\n`).join(''));
    const noisy = await loadDataset(folder);
    const prefix = prefixGraph(noisy, slice);
    localOfNode = (id) => prefix.localIndex[noisy.indexOfId.get(id) as number];
    report = await findDoubtfulLabels(noisy, settings, { slice, folds: 5, keep: 'all', observeFold: (f) => folds.push(f) });
  });

  after(async () => {
    if (folder) await removeDemoCopy(folder);
  });

  it('finds the flipped labels: at least 60% of the top-ranked 5% were flipped', () => {
    assert.equal(report.labelsChecked, windowLabelCount);
    const top = report.doubts.slice(0, Math.ceil(0.05 * report.labelsChecked));
    const hits = top.filter((d) => flipped.has(d.node)).length;
    const precision = hits / top.length;
    const recall = hits / flipped.size;
    const flaggedByConfidentLearning = report.doubts.filter((d) => d.confidentLearning);
    const confidentHits = flaggedByConfidentLearning.filter((d) => flipped.has(d.node)).length;
    console.log(
      `      measured: ${flipped.size} of ${report.labelsChecked} labels flipped; top ${top.length} by score hold ${hits} of them: ` +
        `precision ${precision.toFixed(3)}, recall ${recall.toFixed(3)}; confident learning flags ${flaggedByConfidentLearning.length}, ` +
        `${confidentHits} of them flipped`,
    );
    assert.ok(precision >= 0.6, `precision ${precision.toFixed(3)} < 0.6`);
  });

  it('ranks every checked label once, by score, and never suggests the curated label', () => {
    assert.equal(report.doubts.length, report.labelsChecked);
    assert.equal(new Set(report.doubts.map((d) => d.node)).size, report.labelsChecked);
    report.doubts.forEach((d, k) => {
      assert.equal(d.rank, k + 1);
      assert.notEqual(d.suggestedLabel, d.curatedLabel);
      assert.equal(d.outputs.length, 3);
      if (k > 0) assert.ok(report.doubts[k - 1].score >= d.score);
    });
    const jointTotal = report.confidentJoint.flat().reduce((a, b) => a + b, 0);
    assert.ok(jointTotal <= report.labelsChecked);
    const offDiagonal = report.confidentJoint.reduce((sum, row, i) => sum + row.reduce((s, n, j) => s + (i === j ? 0 : n), 0), 0);
    assert.equal(report.confidentLearningFlags, offDiagonal);
    assert.equal(report.doubts.filter((d) => d.confidentLearning).length, offDiagonal);
  });

  it('scores each label only with a model that did not train on it', () => {
    assert.equal(folds.length, 5);
    const heldOutCount = new Map<number, number>();
    for (const fold of folds) {
      const trained = new Set(fold.training.nodeIndex);
      assert.equal(fold.training.nodeIndex.length + fold.heldOutNodes.length, report.labelsChecked);
      for (const node of fold.heldOutNodes) {
        assert.ok(!trained.has(node), `fold ${fold.fold} trained on its held-out node ${node}`);
        heldOutCount.set(node, (heldOutCount.get(node) ?? 0) + 1);
      }
    }
    // Every checked node is held out by exactly one fold.
    assert.deepEqual(new Set(heldOutCount.keys()), new Set(report.doubts.map((d) => localOfNode(d.node))));
    assert.ok(Array.from(heldOutCount.values()).every((n) => n === 1));
    // The outputs reported for a node are those of the one fold model that held it out.
    const classCount = report.classes.length;
    for (const d of report.doubts) {
      const local = localOfNode(d.node);
      const fold = folds.find((f) => f.heldOutNodes.includes(local)) as FoldObservation;
      const expected = sigmoid(fold.logits.subarray(local * classCount, (local + 1) * classCount));
      for (const output of d.outputs) {
        assert.ok(Math.abs(expected[report.classes.indexOf(output.className)] - output.output) <= 5e-5, `${d.node} ${output.className}`);
      }
    }
  });
});
