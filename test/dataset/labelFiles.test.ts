import assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { formatLabelsCsv, readLabelsCsv, writeLabelsCsv } from '../../src/engine/dataset/labelsFile';
import { formatClassesJson, readClassesJson, writeClassesJson } from '../../src/engine/dataset/classesFile';
import { appendLabelLog, readLabelLog } from '../../src/engine/dataset/labelLog';
import type { ClassRecord, LabelLogEntry } from '../../src/engine/dataset/types';
import { formatProblem } from '../../src/engine/dataset/types';
import { makeTempDir, removeDir } from './fixtures';

describe('labels.csv, classes.json and label-log.jsonl', () => {
  let dir: string;
  beforeEach(async () => {
    dir = await makeTempDir();
  });
  afterEach(async () => {
    await removeDir(dir);
  });

  it('writes labels sorted by id in code-unit order, LF, with a header, quoting only when needed', () => {
    const text = formatLabelsCsv([
      ['b', 'x'],
      ['a10', 'with, comma'],
      ['B', 'say "y"'],
      ['a2', 'two\nlines'],
      ['é', 'plain'],
    ]);
    // Code-unit order: "B" (0x42) < "a10" < "a2" < "b" < "é" (0xE9); not locale order.
    assert.equal(text, 'id,label\nB,"say ""y"""\na10,"with, comma"\na2,"two\nlines"\nb,x\né,plain\n');
  });

  it('reads back exactly what it wrote', async () => {
    const labels = new Map<string, string>([
      ['n3', 'gearbox'],
      ['n1', 'blade, tip'],
      ['"quoted"', 'a "b"'],
      ['multi', 'line\r\nbreak'],
    ]);
    const file = path.join(dir, 'labels.csv');
    await writeLabelsCsv(file, labels);
    const read = await readLabelsCsv(file);
    assert.deepEqual(read.problems, []);
    assert.deepEqual(new Map([...read.labels].sort()), new Map([...labels].sort()));
    const first = await fs.readFile(file, 'utf8');
    await writeLabelsCsv(file, read.labels);
    assert.equal(await fs.readFile(file, 'utf8'), first);
  });

  it('leaves the old file intact and no temporary file when a write fails before its rename', async () => {
    const file = path.join(dir, 'labels.csv');
    await writeLabelsCsv(file, [['n1', 'old']]);
    const before = await fs.readFile(file, 'utf8');
    await assert.rejects(
      writeLabelsCsv(file, [['n1', 'new']], {
        beforeRename: () => {
          throw new Error('disk full (simulated)');
        },
      }),
      /disk full/,
    );
    assert.equal(await fs.readFile(file, 'utf8'), before);
    assert.deepEqual(await fs.readdir(dir), ['labels.csv']);
    await assert.rejects(writeClassesJson(path.join(dir, 'classes.json'), [], { beforeRename: () => Promise.reject(new Error('no')) }));
    assert.deepEqual(await fs.readdir(dir), ['labels.csv']);
  });

  it('reports duplicate ids, empty labels and missing columns in a labels or truth file', async () => {
    const file = path.join(dir, 'truth.csv');
    await fs.writeFile(file, 'id,label\nn1,a\nn2,\nn1,b\n');
    const read = await readLabelsCsv(file, 'truth.csv');
    assert.deepEqual(read.problems.map(formatProblem), [
      'truth.csv:3:4: empty label for node "n2": leave unlabelled nodes out of the file',
      'truth.csv:4:1: duplicate id "n1": a node has at most one label',
    ]);
    assert.deepEqual([...read.labels], [['n1', 'a']]);
  });

  it('round-trips classes.json and locates its problems', async () => {
    const classes: ClassRecord[] = [
      { name: 'gearbox', description: 'drive train', introducedIn: '2021-Q1', status: 'active' },
      { name: 'gear', description: '', introducedIn: '2021-Q2', status: 'merged', mergedInto: 'gearbox' },
    ];
    const file = path.join(dir, 'classes.json');
    await writeClassesJson(file, classes);
    const read = await readClassesJson(file);
    assert.deepEqual(read.problems, []);
    assert.deepEqual(read.classes, classes);
    assert.equal(await fs.readFile(file, 'utf8'), formatClassesJson(read.classes));
    await fs.writeFile(
      file,
      '{ "classes": [\n  { "name": "a", "status": "gone" },\n  { "name": "a" },\n  { "name": "b", "mergedInto": "zz", "colour": 1 }\n] }',
    );
    assert.deepEqual((await readClassesJson(file)).problems.map(formatProblem), [
      'classes.json:2:28: "status" must be one of "active", "merged", "retired"; found "gone"',
      'classes.json:3:13: duplicate class "a"',
      'classes.json:4:38: unknown key "colour"; expected one of name, description, introducedIn, status, mergedInto',
      'classes.json:4:32: "mergedInto" names an unknown class "zz"',
    ]);
    assert.deepEqual((await readClassesJson(path.join(dir, 'none.json'))).missing, true);
  });

  it('appends to the label log and reads it back; a bad line is located', async () => {
    const file = path.join(dir, 'label-log.jsonl');
    const entries: LabelLogEntry[] = [
      { time: '2021-07-14T10:00:00.000Z', node: 'n1', oldLabel: null, newLabel: 'blade', reason: 'review', decisionId: 'd1' },
      { time: '2021-07-14T10:01:00.000Z', node: 'n2', oldLabel: 'blade', newLabel: null, reason: 'unlabel' },
    ];
    await appendLabelLog(file, entries.slice(0, 1));
    await appendLabelLog(file, entries.slice(1));
    const read = await readLabelLog(file);
    assert.deepEqual(read.entries, entries);
    assert.equal((await fs.readFile(file, 'utf8')).split('\n').length, 3);
    await fs.appendFile(file, '{"time":1}\n');
    assert.deepEqual((await readLabelLog(file, 'label-log.jsonl')).problems.map(formatProblem), [
      'label-log.jsonl:3:1: "time" must be a string',
    ]);
  });
});
