// Threshold previews after a window reload: a run saves what the preview needs beside its results
// (threshold-fit.json and its .npy files), and a worker that never scored it previews from them
// exactly what the worker that scored it previews from the fit in memory.
import * as assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { loadDataset } from '../../src/engine/dataset/load';
import type { PrefixFit } from '../../src/engine/pipeline/modelOnPrefix';
import { thresholdFitFileName } from '../../src/engine/pipeline/thresholdFitFile';
import { CancelFlag, silentProgress } from '../../src/engine/util/progress';
import { ReviewRegistry, type RememberedFit } from '../../src/engine/worker/reviewRegistry';
import { readRunForReview } from '../../src/engine/worker/runForReview';
import { savedPreviewerOf } from '../../src/engine/worker/savedPreview';
import { scoreAndSave } from '../../src/engine/worker/scoreRequest';
import type { ThresholdSetting } from '../../src/protocol/webview';
import { createThresholdPreviewer, thresholdPreviewInputOf, thresholdSettingOf } from '../../src/review/thresholdPreview';
import { quickSettings, smallDataset } from '../pipeline/pipelineFixture';

const settingsTried: ThresholdSetting[] = [
  { mode: 'alpha', alpha: 3, quantile: 0.1, lambda: 0.5 },
  { mode: 'alpha', alpha: 0.5, quantile: 0.1, lambda: 0 },
  { mode: 'alpha', alpha: 8, quantile: 0.1, lambda: 1 },
  { mode: 'quantile', alpha: 3, quantile: 0.25, lambda: 0.3 },
];

describe('review/threshold preview from a saved run', function () {
  this.timeout(120_000);
  let folder: string;
  let runId: string;
  let remembered: RememberedFit;

  before(async () => {
    folder = (await smallDataset()).folder;
    let kept: RememberedFit | null = null;
    const outcome = await scoreAndSave(
      { folder, settings: quickSettings },
      { progress: silentProgress, cancel: new CancelFlag() },
      (fit) => {
        kept = fit;
      },
    );
    runId = outcome.runId;
    assert.ok(kept, 'the worker remembers the fit it scored with');
    remembered = kept;
  });

  it('saves the fit in the run folder: .npy files in NumPy’s format, then threshold-fit.json', async () => {
    const runFolder = path.join(folder, 'runs', runId);
    const json = JSON.parse(await fs.readFile(path.join(runFolder, thresholdFitFileName), 'utf8')) as Record<string, unknown>;
    assert.equal(json.format, 'graph-curator-threshold-fit');
    assert.equal(json.runId, runId);
    const record = JSON.parse(await fs.readFile(path.join(runFolder, 'run.json'), 'utf8')) as { files: Record<string, string> };
    assert.equal(record.files.thresholdFit, thresholdFitFileName);
    const outputs = await fs.readFile(path.join(runFolder, 'threshold-outputs.npy'));
    // Magic string \x93NUMPY, then major and minor version, then a header dict with 'descr': '<f4'
    // (NumPy documentation, "numpy.lib.format": the .npy format, version 1.0).
    assert.deepEqual([...outputs.subarray(0, 6)], [0x93, ...Buffer.from('NUMPY')]);
    assert.match(outputs.subarray(10, 10 + outputs.readUInt16LE(8)).toString('latin1'), /'descr': '<f4'/);
    const fit: PrefixFit = remembered.fit;
    assert.match(
      outputs.subarray(10, 10 + outputs.readUInt16LE(8)).toString('latin1'),
      new RegExp(`'shape': \\(${fit.prefix.globalIndex.length}, ${fit.modelClasses.length}\\)`),
    );
  });

  it('previews from the saved fit exactly what the fit in memory previews, for every setting tried', async () => {
    const dataset = await loadDataset(folder);
    const run = await readRunForReview(dataset, runId);
    assert.ok(run.candidates.length > 0, 'the run has candidates to preview');
    const inMemory = createThresholdPreviewer(
      thresholdPreviewInputOf(remembered.dataset, remembered.fit, remembered.settings, run.candidates),
    );
    const fromDisk = (await savedPreviewerOf(dataset, run)).previewer;
    assert.ok(fromDisk, 'a previewer from the saved fit');
    const own = thresholdSettingOf(remembered.settings);
    for (const setting of [own, ...settingsTried]) assert.deepEqual(fromDisk(setting), inMemory(setting), JSON.stringify(setting));
    // The run's own setting gives back the run's own count of rejected nodes.
    assert.equal(fromDisk(own).rejected, run.record.counts.rejected);
    // And the settings tried do change the answer, so the comparison above could fail.
    assert.ok(new Set(settingsTried.map((s) => fromDisk(s).rejected)).size > 1);
  });

  it('opens a saved run with previews in a worker that never scored it; without the file, previews are off', async () => {
    const fresh = new ReviewRegistry();
    const opened = await fresh.open({ folder, runId, persistPath: null }, (f) => loadDataset(f));
    assert.equal(opened.previewAvailable, true);
    const runFolder = path.join(folder, 'runs', runId);
    const saved = path.join(runFolder, thresholdFitFileName);
    const aside = `${saved}.aside`;
    await fs.rename(saved, aside);
    try {
      const without = await new ReviewRegistry().open({ folder, runId, persistPath: null }, (f) => loadDataset(f));
      assert.equal(without.previewAvailable, false);
      assert.equal(without.previewProblem, undefined, 'a run without the file is not a problem');
    } finally {
      await fs.rename(aside, saved);
    }
  });

  it('says which file is damaged, at which line and column, and the panel’s preview request says so too', async () => {
    const runFolder = path.join(folder, 'runs', runId);
    const saved = path.join(runFolder, thresholdFitFileName);
    const original = await fs.readFile(saved, 'utf8');
    try {
      // A truncated copy: the file ends on its second line, inside an object.
      const pretty = JSON.stringify(JSON.parse(original), null, 1).split('\n');
      await fs.writeFile(saved, `${pretty[0]}\n${pretty[1]}`);
      const registry = new ReviewRegistry();
      const opened = await registry.open({ folder, runId, persistPath: null }, (f) => loadDataset(f));
      assert.equal(opened.previewAvailable, false);
      assert.match(opened.previewProblem ?? '', new RegExp(`${thresholdFitFileName.replace('.', '\\.')}:2:\\d+: `));
      const outcome = await registry.message(opened.reviewId, {
        type: 'previewThreshold',
        requestId: 1,
        setting: settingsTried[0],
      });
      const failed = outcome.posts.find((m) => m.type === 'error');
      const reason = /threshold previews are off: .*threshold-fit\.json:2:\d+: .*score the slice again/;
      assert.match(failed?.type === 'error' ? failed.message : '', reason);
      // The panel learns it with its first snapshot, before any move of the controls.
      const ready = await registry.message(opened.reviewId, { type: 'ready' });
      const snapshot = ready.posts.find((m) => m.type === 'snapshot');
      assert.match(snapshot?.type === 'snapshot' ? (snapshot.snapshot.previewsOff ?? '') : '', reason);
    } finally {
      await fs.writeFile(saved, original);
    }
  });
});
