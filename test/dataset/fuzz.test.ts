// Random bytes and random mutations of a valid dataset fed to the parsers for a bounded time:
// the only acceptable outcomes are a dataset or located problems (DatasetError), never another
// exception and never a hang.
import assert from 'node:assert/strict';
import { parseCsvBytes } from '../../src/engine/dataset/csv';
import { parseJsonWithPositions } from '../../src/engine/dataset/jsonPositions';
import { parseManifest } from '../../src/engine/dataset/manifest';
import { parseClassesJson } from '../../src/engine/dataset/classesFile';
import { parseLabelLog } from '../../src/engine/dataset/labelLog';
import { readDatasetFolder } from '../../src/engine/dataset/load';
import { DatasetError, type LocatedProblem } from '../../src/engine/dataset/types';
import { SeededRandom } from '../../src/engine/util/random';
import { makeTempDir, removeDir, VALID_FILES, writeValidDataset } from './fixtures';

const FUZZ_MILLISECONDS = 1500;

function assertLocated(problems: LocatedProblem[], context: string): void {
  for (const p of problems) {
    assert.equal(typeof p.file, 'string', context);
    assert.ok(p.file.length > 0, context);
    assert.ok(Number.isInteger(p.line) && p.line >= 0, `${context}: line ${p.line}`);
    assert.ok(Number.isInteger(p.column) && p.column >= 0, `${context}: column ${p.column}`);
    assert.ok(p.message.length > 0, context);
  }
}

function randomBytes(random: SeededRandom, length: number): Uint8Array {
  const interesting = [0x22, 0x2c, 0x0a, 0x0d, 0x7b, 0x7d, 0x5b, 0x5d, 0x3a, 0x5c, 0xef, 0xbb, 0xbf, 0xc3, 0xe2, 0xf0, 0x80, 0xff];
  const out = new Uint8Array(length);
  for (let i = 0; i < length; i++) out[i] = random.next() < 0.5 ? interesting[random.int(interesting.length)] : 0x20 + random.int(0x5f);
  return out;
}

function mutate(random: SeededRandom, text: string): Uint8Array {
  const bytes = Array.from(new TextEncoder().encode(text));
  const edits = 1 + random.int(4);
  for (let k = 0; k < edits; k++) {
    const at = random.int(bytes.length + 1);
    const choice = random.int(4);
    if (choice === 0) bytes.splice(at, 1);
    else if (choice === 1) bytes.splice(at, 0, ...randomBytes(random, 1 + random.int(3)));
    else if (choice === 2) bytes.splice(at, random.int(8));
    else bytes.splice(at, 0, ...bytes.slice(random.int(bytes.length), random.int(bytes.length)));
  }
  return Uint8Array.from(bytes);
}

describe('fuzzing the dataset parsers', () => {
  it('turns random bytes into rows or located problems (CSV, JSON, manifest, classes, log)', () => {
    const random = new SeededRandom(99);
    const end = Date.now() + FUZZ_MILLISECONDS;
    let rounds = 0;
    while (Date.now() < end) {
      const bytes =
        random.next() < 0.5 ? randomBytes(random, random.int(200)) : mutate(random, VALID_FILES[Object.keys(VALID_FILES)[random.int(5)]]);
      const csv = parseCsvBytes(bytes, 'fuzz.csv', (row) => assert.equal(row.fields.length, row.fieldColumns.length));
      assertLocated(csv.problems, 'csv');
      const text = new TextDecoder().decode(bytes);
      try {
        parseJsonWithPositions(text, 'fuzz.json');
      } catch (error) {
        assert.ok(error instanceof DatasetError, String(error));
        assertLocated(error.problems, 'json');
      }
      const manifest = parseManifest(text);
      assert.ok(manifest.manifest !== null || manifest.problems.length > 0);
      assertLocated(manifest.problems, 'manifest');
      assertLocated(parseClassesJson(text, 'classes.json').problems, 'classes');
      assertLocated(parseLabelLog(text, 'label-log.jsonl').problems, 'log');
      rounds++;
    }
    assert.ok(rounds > 50, `only ${rounds} rounds`);
  });

  it('loads mutated dataset folders into a dataset or located problems', async () => {
    const random = new SeededRandom(7);
    const dir = await makeTempDir();
    const end = Date.now() + FUZZ_MILLISECONDS;
    let rounds = 0;
    let rejected = 0;
    try {
      while (Date.now() < end) {
        const names = Object.keys(VALID_FILES);
        const target = names[random.int(names.length)];
        await writeValidDataset(dir, { [target]: mutate(random, VALID_FILES[target]) });
        const read = await readDatasetFolder(dir);
        if (read.dataset) {
          assert.deepEqual(read.problems, []);
          assert.equal(read.dataset.labels.length, read.dataset.nodeIds.length);
          assert.equal(read.dataset.features.length, read.dataset.nodeIds.length * read.dataset.featureDim);
        } else {
          assert.ok(read.problems.length > 0);
          assertLocated(read.problems, target);
          rejected++;
        }
        rounds++;
      }
    } finally {
      await removeDir(dir);
    }
    assert.ok(rounds > 10 && rejected > 0, `${rounds} rounds, ${rejected} rejected`);
  });
});
