import { strict as assert } from 'node:assert';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { DEFAULT_DEMO_OPTIONS, UsageError, parseDemoArgs } from '../../demo-data/generator/options';
import { generateDemoDataset } from '../../demo-data/generator/writeDataset';
import { generateInTemp, removeTemporaryFolders } from './demoFixture';

describe('demo generator options', () => {
  after(removeTemporaryFolders);

  it('uses the documented defaults when given no arguments', () => {
    assert.deepEqual(parseDemoArgs([]), DEFAULT_DEMO_OPTIONS);
    assert.equal(parseDemoArgs(['--help']), null);
  });

  it('reads every flag', () => {
    assert.deepEqual(
      parseDemoArgs(['--nodes', '100000', '--features', '128', '--edges-per-node', '10', '--seed', '42', '--out', '/tmp/x', '--force']),
      {
        nodes: 100000,
        features: 128,
        edgesPerNode: 10,
        seed: 42,
        out: '/tmp/x',
        force: true,
      },
    );
  });

  it('rejects bad arguments with a message naming the flag', () => {
    assert.throws(
      () => parseDemoArgs(['--nodes', 'many']),
      (e: unknown) => e instanceof UsageError && /--nodes must be an integer, got "many"/.test(e.message),
    );
    assert.throws(() => parseDemoArgs(['--nodes', '10']), /--nodes must be between 200/);
    assert.throws(() => parseDemoArgs(['--features']), /--features needs a value/);
    assert.throws(() => parseDemoArgs(['--edges-per-node', '0']), /--edges-per-node must be between 1/);
    assert.throws(() => parseDemoArgs(['--colour', 'blue']), /unknown argument "--colour"/);
    assert.throws(() => parseDemoArgs(['--out', '--seed']), /--out needs a folder/);
  });

  it('refuses to overwrite a folder whose label log holds curated changes, unless forced', async () => {
    const generated = await generateInTemp({ nodes: 300 });
    const log = path.join(generated.folder, 'label-log.jsonl');
    const entry =
      JSON.stringify({ time: '2025-01-01T00:00:00Z', node: 'R000001', oldLabel: null, newLabel: 'converter-fault', reason: 'test' }) + '\n';
    await fs.writeFile(log, entry);
    const labelsBefore = await fs.readFile(path.join(generated.folder, 'labels.csv'), 'utf8');
    const options = { ...DEFAULT_DEMO_OPTIONS, nodes: 400, out: generated.folder };
    await assert.rejects(
      generateDemoDataset(options),
      (e: unknown) => e instanceof Error && e.message.includes(log) && e.message.includes('--force'),
    );
    assert.equal(await fs.readFile(log, 'utf8'), entry);
    assert.equal(await fs.readFile(path.join(generated.folder, 'labels.csv'), 'utf8'), labelsBefore);

    const summary = await generateDemoDataset({ ...options, force: true });
    assert.equal(summary.nodes, 400);
    assert.equal(await fs.readFile(log, 'utf8'), '');
  });
});
