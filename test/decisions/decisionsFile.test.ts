import { strict as assert } from 'node:assert';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { DECISION_KINDS, parseDecisionsText, readDecisionsFile } from '../../src/engine/decisions/decisionsFile';
import { makeTempRoot, removeTemporaryFolders } from './fixtures';

const VALID = {
  format: 'graph-curator-decisions',
  version: 1,
  dataset: 'wind-farm',
  runId: null,
  settingsHash: null,
  slice: '2024-Q4',
  baseHashes: {},
  decisions: [{ id: 'd-1', kind: 'dismiss', madeAt: '2025-01-10T09:00:00Z', candidateId: 'c-1' }],
};

describe('decisions file', () => {
  after(removeTemporaryFolders);

  it('reads a valid file', () => {
    const read = parseDecisionsText(JSON.stringify(VALID), 'd.json');
    assert.deepEqual(read.problems, []);
    assert.deepEqual(read.decisions, VALID);
  });

  it('locates a JSON syntax error', () => {
    const text = '{\n  "format": "graph-curator-decisions",\n  "version": 1,\n  "decisions": [ { "id": "d-1" } ,, ]\n}\n';
    const read = parseDecisionsText(text, 'd.json');
    assert.equal(read.decisions, null);
    // Line 4 is `  "decisions": [ { "id": "d-1" } ,, ]`; the second comma is at column 35 (counted by hand).
    assert.equal(text.split('\n')[3].indexOf(',,') + 2, 35);
    assert.deepEqual(
      read.problems.map((p) => [p.file, p.line, p.column]),
      [['d.json', 4, 35]],
    );
  });

  it('locates shape problems at the offending value, naming the decision', () => {
    const decisions = [
      { id: 'd-1', kind: 'merge-into-class', madeAt: '2025-01-10T09:00:00Z', candidateId: 'c-1', members: ['R1', 7], className: 'x' },
      { id: 'd-2', kind: 'merge-classes', madeAt: '2025-01-10T09:00:00Z', from: 'a' },
    ];
    const text = JSON.stringify({ ...VALID, version: 2, decisions }, null, 2);
    const read = parseDecisionsText(text, 'd.json');
    const lines = text.split('\n');
    const lineOf = (needle: string) => lines.findIndex((l) => l.includes(needle)) + 1;
    assert.deepEqual(
      read.problems.map((p) => [p.line, p.column, p.message]),
      [
        [lineOf('"version"'), lines[lineOf('"version"') - 1].indexOf('2') + 1, '"version" must be 1 (this tool reads version 1)'],
        [
          lineOf('7'),
          lines[lineOf('7') - 1].indexOf('7') + 1,
          'decision #1 (d-1, merge-into-class): "members"[1] must be a non-empty string',
        ],
        [lineOf('"d-2"') - 1, 5, 'decision #2 (d-2, merge-classes): missing "into"'],
      ],
    );
  });

  it('reports a missing file and invalid UTF-8', async () => {
    const root = await makeTempRoot();
    const missing = await readDecisionsFile(path.join(root, 'none.json'), 'none.json');
    assert.deepEqual(missing.problems, [{ file: 'none.json', line: 0, column: 0, message: 'decisions file not found' }]);
    await fs.writeFile(path.join(root, 'bad.json'), Buffer.from([0x7b, 0xff, 0x7d]));
    const bad = await readDecisionsFile(path.join(root, 'bad.json'), 'bad.json');
    assert.match(bad.problems[0].message, /UTF-8/);
  });

  it('the JSON Schema lists the same decision kinds and required fields as the reader', async () => {
    interface Schema {
      required: string[];
      definitions: Record<string, { oneOf?: { $ref: string }[]; properties?: { kind?: { const: string } } }>;
    }
    const schema = JSON.parse(await fs.readFile(path.resolve(__dirname, '../../schemas/decisions.schema.json'), 'utf8')) as Schema;
    const kinds = schema.definitions.decision.oneOf!.map((r) => schema.definitions[r.$ref.split('/').pop()!].properties!.kind!.const);
    assert.deepEqual([...kinds].sort(), [...DECISION_KINDS].sort());
    assert.deepEqual([...schema.required].sort(), [
      'baseHashes',
      'dataset',
      'decisions',
      'format',
      'runId',
      'settingsHash',
      'slice',
      'version',
    ]);
  });
});
