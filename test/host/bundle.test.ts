// Activation must stay light: the extension bundle holds no engine code and loads no tfjs; only
// the worker bundle does the computing.
import * as assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { builtinModules } from 'node:module';
import { buildNodeBundle, formattersSharedWithHost } from './fixtures/buildBundle';

describe('extension and worker bundles', () => {
  it('the extension bundle contains no engine module but the shared formatters, and requires only vscode and Node built-ins', async () => {
    const { outfile, metafile } = await buildNodeBundle('src/host/extension.ts', 'extension.js');
    const inputs = Object.keys(metafile.inputs);
    assert.ok(inputs.includes('src/host/extension.ts'));
    assert.deepEqual(
      inputs.filter((input) => input.startsWith('src/engine/') && !formattersSharedWithHost.includes(input)),
      [],
    );
    const externals = new Set(
      Object.values(metafile.outputs)
        .flatMap((output) => output.imports)
        .filter((imported) => imported.external)
        .map((imported) => imported.path),
    );
    const builtins = new Set([...builtinModules, ...builtinModules.map((name) => `node:${name}`)]);
    assert.deepEqual(
      [...externals].filter((name) => name !== 'vscode' && !builtins.has(name)),
      [],
    );
    assert.ok(externals.has('vscode'), 'vscode must stay external');
    const bundleText = readFileSync(outfile, 'utf8');
    assert.doesNotMatch(bundleText, /require\(["']@tensorflow/);
  });

  it('the worker bundle builds with the engine inside it', async () => {
    const { metafile } = await buildNodeBundle('src/engine/worker/engineWorker.ts', 'engine-worker.js');
    const inputs = Object.keys(metafile.inputs);
    assert.ok(inputs.includes('src/engine/worker/workerSession.ts'));
    assert.ok(inputs.includes('src/engine/util/progress.ts'));
    assert.deepEqual(
      inputs.filter((input) => input.startsWith('src/host/')),
      [],
    );
  });
});
