import assert from 'node:assert/strict';
import { encodeNpy } from '../../src/engine/io/npy';
import { validateDatasetFolder } from '../../src/engine/dataset/validate';
import { formatProblem } from '../../src/engine/dataset/types';
import { hashFolder, makeTempDir, removeDir, VALID_FILES, writeValidDataset, type FolderFiles } from './fixtures';

const NODE_LINES = VALID_FILES['nodes.csv'].trimEnd().split('\n');
const nodesWith = (lineNumber: number, replacement: string): string =>
  NODE_LINES.map((l, k) => (k + 1 === lineNumber ? replacement : l)).join('\n') + '\n';
const manifestWith = (extra: Record<string, unknown>): string =>
  JSON.stringify({ ...JSON.parse(VALID_FILES['dataset.json']), ...extra }, null, 2);
const npyManifest = manifestWith({ features: { source: 'npy' }, nodeColumns: { id: 'id', text: ['title'], features: [] } });

/** Builds the valid dataset with some files replaced and returns validate's problems as text. */
async function problemsWith(overrides: FolderFiles): Promise<string[]> {
  const dir = await makeTempDir();
  try {
    await writeValidDataset(dir, overrides);
    return (await validateDatasetFolder(dir)).map(formatProblem);
  } finally {
    await removeDir(dir);
  }
}

/** A .npy file with a given header dtype, built by hand (format 1.0, header padded to 64 bytes). */
function npyWithDescr(descr: string, shape: number[], bytesPer: number): Uint8Array {
  let header = `{'descr': '${descr}', 'fortran_order': False, 'shape': (${shape.join(', ')}), }`;
  header += ' '.repeat((64 - ((10 + header.length + 1) % 64)) % 64) + '\n';
  const count = shape.reduce((a, b) => a * b, 1);
  const out = new Uint8Array(10 + header.length + count * bytesPer);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0], 0);
  new DataView(out.buffer).setUint16(8, header.length, true);
  for (let i = 0; i < header.length; i++) out[10 + i] = header.charCodeAt(i);
  return out;
}

describe('validateDatasetFolder', () => {
  it('finds nothing wrong with a valid dataset', async () => {
    assert.deepEqual(await problemsWith({}), []);
  });

  it('duplicate node id', async () => {
    const nodes = VALID_FILES['nodes.csv'] + 'n2,2021-09-01,again,1,1\n';
    assert.deepEqual(await problemsWith({ 'nodes.csv': nodes }), ['nodes.csv:7:1: duplicate node id "n2" (first on line 3)']);
  });

  it('edge to or from an unknown node', async () => {
    assert.deepEqual(await problemsWith({ 'edges.csv': 'source,target\nn1,n2\nn2,zz\nqq,n1\n' }), [
      'edges.csv:3:4: edge to unknown node "zz" (not in nodes.csv)',
      'edges.csv:4:1: edge from unknown node "qq" (not in nodes.csv)',
    ]);
  });

  it('ragged row', async () => {
    assert.deepEqual(await problemsWith({ 'nodes.csv': nodesWith(4, 'n3,2021-05-20,blade erosion,1') }), [
      'nodes.csv:4:30: ragged row: 4 fields, the header has 5',
    ]);
    assert.deepEqual(await problemsWith({ 'edges.csv': 'source,target\nn1,n2,n3\n' }), [
      'edges.csv:2:7: ragged row: 3 fields, the header has 2',
    ]);
  });

  it('unterminated quote', async () => {
    assert.deepEqual(await problemsWith({ 'nodes.csv': nodesWith(6, 'n5,2021-08-03,"gearbox noise,-1,3.5') }), [
      'nodes.csv:6:15: unterminated quoted field: the closing quote (") is missing',
    ]);
  });

  it('non-numeric, NaN and infinite feature values', async () => {
    const nodes = NODE_LINES.slice(0, 4).join('\n') + '\nn4,2021-08-02,tower bolt,abc,NaN\nn5,2021-08-03,gearbox noise,-Infinity,1e999\n';
    assert.deepEqual(await problemsWith({ 'nodes.csv': nodes }), [
      'nodes.csv:5:26: non-numeric value "abc" in feature column "x"',
      'nodes.csv:5:30: "NaN" is not a finite number in feature column "y"',
      'nodes.csv:6:29: "-Infinity" is not a finite number in feature column "x"',
      'nodes.csv:6:39: "1e999" is not a finite number in feature column "y"',
    ]);
  });

  it('npy row count that does not match the node count', async () => {
    const npy = encodeNpy(new Float32Array(8), [4, 2]);
    assert.deepEqual(await problemsWith({ 'dataset.json': npyManifest, 'features.npy': npy }), [
      'features.npy:1:1: shape (4, 2) has 4 rows but nodes.csv has 5 nodes',
    ]);
  });

  it('npy dtype that is not float32 or float64', async () => {
    assert.deepEqual(await problemsWith({ 'dataset.json': npyManifest, 'features.npy': npyWithDescr('<i4', [5, 2], 4) }), [
      "features.npy:1:11: unsupported dtype '<i4': expected little-endian float32 ('<f4') or float64 ('<f8')",
    ]);
  });

  it('non-finite npy value, at its byte offset', async () => {
    const values = new Float32Array(10);
    values[3] = NaN;
    const npy = encodeNpy(values, [5, 2]);
    // encodeNpy pads the header to 128 bytes; value 3 starts 3 × 4 bytes later.
    assert.deepEqual(await problemsWith({ 'dataset.json': npyManifest, 'features.npy': npy }), [
      'features.npy:1:141: value at row 1 (node "n2"), column 1 is NaN, not a finite number',
    ]);
  });

  it('label on an unknown node', async () => {
    assert.deepEqual(await problemsWith({ 'labels.csv': VALID_FILES['labels.csv'] + 'ghost,blade\n' }), [
      'labels.csv:5:1: label on unknown node "ghost" (not in nodes.csv)',
    ]);
  });

  it('unknown granularity', async () => {
    const manifest =
      '{\n  "name": "tiny",\n  "time": { "granularity": "fortnight" },\n  "nodeColumns": { "text": ["title"], "features": ["x", "y"] },\n  "features": { "source": "columns" }\n}\n';
    assert.deepEqual(await problemsWith({ 'dataset.json': manifest }), [
      'dataset.json:3:28: "time.granularity" must be one of "year", "quarter", "month", "week", "day", "step"; found "fortnight"',
    ]);
  });

  it('unparseable time', async () => {
    assert.deepEqual(await problemsWith({ 'nodes.csv': nodesWith(4, 'n3,2021-13-20,blade erosion,1,1') }), [
      "nodes.csv:4:4: unparseable time: '2021-13-20' has month 13: months run from 01 to 12",
    ]);
    assert.deepEqual(await problemsWith({ 'nodes.csv': nodesWith(3, 'n2,"last spring",gearbox oil,0,1') }), [
      "nodes.csv:3:4: unparseable time: 'last spring' is not an ISO-8601 date (YYYY, YYYY-MM, YYYY-MM-DD or a date-time)",
    ]);
  });

  it('empty file', async () => {
    assert.deepEqual(await problemsWith({ 'edges.csv': '' }), ['edges.csv:1:1: empty file: expected a header line']);
    assert.deepEqual(await problemsWith({ 'nodes.csv': 'id,time,title,x,y\n' }), [
      'nodes.csv:2:1: no nodes: the file has a header but no rows',
    ]);
  });

  it('invalid UTF-8', async () => {
    const bytes = new Uint8Array([
      ...new TextEncoder().encode(NODE_LINES.slice(0, 3).join('\n') + '\nn3,2021-05-20,blade '),
      0xe9,
      ...new TextEncoder().encode('rosion,1,1\n'),
    ]);
    assert.deepEqual(await problemsWith({ 'nodes.csv': bytes }), ['nodes.csv:4:21: invalid UTF-8 byte sequence: save the file as UTF-8']);
  });

  it('manifest not matching the schema', async () => {
    const manifest =
      '{\n  "name": "tiny",\n  "directed": "yes",\n  "nodeColumns": { "text": ["title"], "features": ["x", "y"] },\n  "features": { "source": "columns", "vocabularySize": 0 }\n}\n';
    assert.deepEqual(await problemsWith({ 'dataset.json': manifest }), [
      'dataset.json:3:15: "directed" must be true or false',
      'dataset.json:5:56: "features.vocabularySize" must be at least 1',
    ]);
  });

  it('missing required files and columns', async () => {
    assert.deepEqual(await problemsWith({ 'edges.csv': null }), ['edges.csv: file not found'.replace(': ', ':0:0: ')]);
    const noManifest = await problemsWith({ 'dataset.json': null });
    assert.equal(noManifest.length, 1);
    assert.match(noManifest[0], /^dataset\.json:0:0: no dataset\.json in .* \(create one with "graph-curator init"\)$/);
    const noTime = 'id,title,x,y\nn1,blade crack,1,0\n';
    assert.deepEqual(await problemsWith({ 'nodes.csv': noTime, 'edges.csv': 'source,target\n', 'labels.csv': 'id,label\n' }), [
      'nodes.csv:1:1: missing column "time" (time.column in dataset.json); the header has "id", "title", "x", "y"',
    ]);
    assert.deepEqual(await problemsWith({ 'labels.csv': 'node,label\nn1,blade\n' }), [
      'labels.csv:1:1: missing column "id" (node id); the header has "node", "label"',
    ]);
    assert.deepEqual(await problemsWith({ 'dataset.json': npyManifest }), ['features.npy:0:0: file not found (features.source is "npy")']);
  });

  it('reports every problem of every file at once, and an invalid label-log line', async () => {
    const problems = await problemsWith({
      'nodes.csv': nodesWith(4, 'n3,2021-05-20,blade erosion,oops,1'),
      'edges.csv': 'source,target\nn1,n9\n',
      'labels.csv': 'id,label\nn1,blade\nn1,gearbox\n',
      'label-log.jsonl': '{"time":"2021-01-01T00:00:00Z","node":"n1","oldLabel":null,"newLabel":"blade","reason":"first"}\nnot json\n',
    });
    assert.deepEqual(problems, [
      'nodes.csv:4:29: non-numeric value "oops" in feature column "x"',
      'edges.csv:2:4: edge to unknown node "n9" (not in nodes.csv)',
      'labels.csv:3:1: duplicate id "n1": a node has at most one label',
      'label-log.jsonl:2:1: not a JSON object (each line of the log is one JSON object)',
    ]);
  });

  it('writes nothing, valid or not', async () => {
    for (const overrides of [{}, { 'edges.csv': 'source,target\nn1,zz\n', 'dataset.json': npyManifest }] as FolderFiles[]) {
      const dir = await makeTempDir();
      try {
        await writeValidDataset(dir, overrides);
        const before = await hashFolder(dir);
        await validateDatasetFolder(dir);
        assert.deepEqual(await hashFolder(dir), before);
      } finally {
        await removeDir(dir);
      }
    }
  });
});
