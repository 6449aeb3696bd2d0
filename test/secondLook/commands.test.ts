import assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { runCli } from '../../src/cli/run';
import { collectingIo } from '../../src/cli/io';
import type { DoubtsReport, LabelNextReport } from '../../src/engine/secondLook/reportTypes';
import { hashFolder, makeTempDir, removeDir, writeValidDataset } from '../dataset/fixtures';

async function cli(...argv: string[]) {
  const io = collectingIo();
  const code = await runCli(argv, io);
  return { code, out: io.out, err: io.err };
}

// The tiny fixture: 5 nodes over three quarters, labels n1 blade, n2 gearbox, n5 gearbox.
describe('graph-curator doubts and suggest', function () {
  this.timeout(300_000);
  let parent: string;
  let dir: string;
  beforeEach(async () => {
    parent = await makeTempDir('gc-second-look-cli-');
    dir = path.join(parent, 'tiny');
    await fs.mkdir(dir);
    await writeValidDataset(dir);
  });
  afterEach(async () => {
    await removeDir(parent);
  });

  it('doubts --json and --out give the same documented report and leave the dataset untouched', async () => {
    const before = await hashFolder(dir);
    const out = path.join(parent, 'doubts.json');
    const result = await cli('doubts', dir, '--folds', '3', '--epochs', '5', '--all', '--json', '--out', out);
    assert.equal(result.code, 0, result.err);
    const report = JSON.parse(result.out) as DoubtsReport;
    assert.equal(report.format, 'graph-curator-doubts');
    assert.equal(report.slice, '2021-Q3');
    assert.equal(report.labelsChecked, 3);
    assert.deepEqual(report.doubts.map((d) => d.node).sort(), ['n1', 'n2', 'n5']);
    assert.deepEqual(report.classes.slice().sort(), ['blade', 'gearbox']);
    assert.deepEqual(Object.keys(report.baseHashes).sort(), ['classes.json', 'labels.csv']);
    assert.equal(await fs.readFile(out, 'utf8'), result.out);
    assert.deepEqual(await hashFolder(dir), before);
  });

  it('doubts prints a table by default', async () => {
    const result = await cli('doubts', dir, '--folds', '3', '--epochs', '5');
    assert.equal(result.code, 0, result.err);
    assert.match(result.out, /^slice 2021-Q3: checked 3 curated labels of 2021-Q1 … 2021-Q3 with 3-fold cross-fitting$/m);
    assert.match(result.out, /doubtful \(score above 0\.5/);
  });

  it('doubts explains when the window has too few labels for the folds, and refuses bad flags', async () => {
    const few = await cli('doubts', dir, '--epochs', '5');
    assert.equal(few.code, 1);
    assert.match(few.err, /only 3 labelled nodes in the window of slice 2021-Q3: at least 5 are needed for 5 folds/);
    const bad = await cli('doubts', dir, '--folds', '1');
    assert.equal(bad.code, 2);
    assert.match(bad.err, /--folds must be a whole number ≥ 2, got "1"/);
    assert.equal((await cli('doubts', dir, '--slice', '1999-Q1')).code, 2);
    assert.equal((await cli('doubts', dir, '--alpha', '2')).code, 2);
  });

  it('suggest ranks the unlabelled node of the newest slice', async () => {
    const json = await cli('suggest', dir, '--count', '3', '--epochs', '5', '--json');
    assert.equal(json.code, 0, json.err);
    const report = JSON.parse(json.out) as LabelNextReport;
    assert.equal(report.format, 'graph-curator-label-next');
    assert.equal(report.unlabelledInSlice, 1);
    assert.deepEqual(
      report.suggestions.map((s) => s.node),
      ['n4'],
    );
    assert.equal(report.suggestions[0].unlabelledNeighbours, 1); // n3; n5 is labelled
    const table = await cli('suggest', dir, '--count', '3', '--epochs', '5');
    assert.match(table.out, /^1\s+n4\s/m);
    assert.equal((await cli('suggest', dir, '--count', 'x')).code, 2);
  });
});
