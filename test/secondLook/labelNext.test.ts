import assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { parse } from 'csv-parse/sync';
import { loadDataset } from '../../src/engine/dataset/load';
import { defaultRunSettings } from '../../src/engine/pipeline/runSettings';
import { labelUsefulness, marginUncertainty, suggestLabelNext } from '../../src/engine/secondLook/labelNext';
import { copyDemoDataset, removeDemoCopy } from './demoCopy';

describe('what to label next: uncertainty and usefulness', () => {
  it('uncertainty is 1 minus the margin between the two highest shares', () => {
    assert.ok(Math.abs(marginUncertainty([0.2, 0.5, 0.3]) - 0.8) < 1e-12);
    assert.equal(marginUncertainty([0.5, 0.5]), 1);
    assert.equal(marginUncertainty([1, 0, 0]), 0);
    assert.equal(marginUncertainty([1]), 0);
  });

  it('usefulness grows with the log of the unlabelled neighbours', () => {
    assert.equal(labelUsefulness(0.8, 0), 0.8);
    // ln(1 + (e − 1)) = 1, so the factor is 2.
    assert.ok(Math.abs(labelUsefulness(0.5, Math.E - 1) - 1) < 1e-12);
    assert.ok(labelUsefulness(0.5, 10) > labelUsefulness(0.5, 3));
  });
});

describe('suggestLabelNext on the demo dataset', function () {
  this.timeout(600_000);
  let folder = '';
  after(async () => {
    if (folder) await removeDemoCopy(folder);
  });

  it('ranks only unlabelled nodes of the newest slice, by the documented usefulness', async () => {
    folder = await copyDemoDataset();
    const dataset = await loadDataset(folder);
    const slice = dataset.slices.length - 1;
    const report = await suggestLabelNext(dataset, { ...defaultRunSettings, epochs: 40, hiddenUnits: 32 }, { slice, count: 50 });
    assert.equal(report.suggestions.length, 50);
    const newest = dataset.slices[slice];
    let unlabelledInSlice = 0;
    for (let node = 0; node < dataset.nodeIds.length; node++)
      if (dataset.nodeSlice[node] === slice && dataset.labels[node] < 0) unlabelledInSlice++;
    assert.equal(report.unlabelledInSlice, unlabelledInSlice);

    // Unlabelled neighbours counted independently, from the files read with csv-parse.
    const read = async (file: string) =>
      parse<Record<string, string>>(await fs.readFile(path.join(folder, file), 'utf8'), { columns: true });
    const labelled = new Set((await read('labels.csv')).map((r) => r.id));
    const timeOf = new Map((await read('nodes.csv')).map((r) => [r.id, r.time]));
    const neighbours = new Map<string, Set<string>>();
    for (const { source, target } of await read('edges.csv')) {
      if (source === target) continue;
      for (const [a, b] of [
        [source, target],
        [target, source],
      ]) {
        const set = neighbours.get(a) ?? new Set<string>();
        set.add(b);
        neighbours.set(a, set);
      }
    }
    report.suggestions.forEach((s, k) => {
      assert.equal(s.rank, k + 1);
      assert.equal(s.slice, newest.key);
      assert.ok(!labelled.has(s.node), `${s.node} is labelled`);
      assert.ok(timeOf.has(s.node));
      // The newest slice is the whole graph, so every neighbour in edges.csv counts.
      const unlabelledNeighbours = Array.from(neighbours.get(s.node) ?? []).filter((n) => !labelled.has(n)).length;
      assert.equal(s.unlabelledNeighbours, unlabelledNeighbours, s.node);
      assert.ok(Math.abs(s.usefulness - s.uncertainty * (1 + Math.log1p(s.unlabelledNeighbours))) < 1e-3);
      if (k > 0) assert.ok(report.suggestions[k - 1].usefulness >= s.usefulness);
      assert.equal(s.predictedLabel, s.outputs[0].className);
    });
  });
});
