// The bundled copy in demo-data/ must be exactly what the command documented in
// demo-data/README.md writes, so that neither the data nor the README can go stale.
import { strict as assert } from 'node:assert';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { DEFAULT_DEMO_OPTIONS, parseDemoArgs } from '../../demo-data/generator/options';
import { generateInTemp, removeTemporaryFolders } from './demoFixture';

const demoData = path.resolve(__dirname, '../../demo-data');

async function documentedArguments(): Promise<string[]> {
  const readme = await fs.readFile(path.join(demoData, 'README.md'), 'utf8');
  const command = /node dist\/demo-generator\.js([^\n`]*)/.exec(readme);
  assert.ok(command, 'demo-data/README.md does not show the generator command');
  return command[1].trim().split(/\s+/);
}

describe('bundled demo dataset', () => {
  after(removeTemporaryFolders);

  it('is documented with the defaults that `npm run demo-data` uses', async () => {
    const documented = parseDemoArgs(await documentedArguments());
    assert.deepEqual(documented, DEFAULT_DEMO_OPTIONS);
  });

  it('equals a fresh generation with the documented command, byte for byte', async () => {
    const options = parseDemoArgs(await documentedArguments());
    assert.ok(options);
    const bundled = path.resolve(demoData, '..', options.out);
    const fresh = await generateInTemp({ ...options });
    // runs/ holds scoring results (git-ignored derived data), not generator output.
    const bundledFiles = (await fs.readdir(bundled)).filter((name) => name !== 'runs').sort();
    assert.deepEqual(
      bundledFiles,
      (await fs.readdir(fresh.folder)).sort(),
      'the bundled folder holds other files than the generator writes',
    );
    for (const file of bundledFiles) {
      const same = (await fs.readFile(path.join(bundled, file))).equals(await fs.readFile(path.join(fresh.folder, file)));
      assert.ok(same, `demo-data/wind-farm/${file} is stale: run \`npm run demo-data\``);
    }
    const truthSame = (await fs.readFile(`${bundled}.truth.csv`)).equals(await fs.readFile(fresh.truthFile));
    assert.ok(truthSame, 'demo-data/wind-farm.truth.csv is stale: run `npm run demo-data`');
  });
});
