// Checks that the installed .vsix carries what the bundles leave external: tfjs and its wasm
// backend must load from the extension's own folder (never from the project's node_modules) and
// compute on the wasm backend. A missing file in .vscodeignore's allow-list fails here.
import { spawnSync } from 'node:child_process';
import * as os from 'node:os';

// Runs in a separate Node process started outside the project, resolving packages only from the
// installed extension folder (argv[1]).
const probeScript = `
const { createRequire } = require('node:module');
const path = require('node:path');
const extensionFolder = process.argv[1];
const requireFromExtension = createRequire(path.join(extensionFolder, 'package.json'));
(async () => {
  const tf = requireFromExtension('@tensorflow/tfjs');
  const wasm = requireFromExtension('@tensorflow/tfjs-backend-wasm');
  const resolved = requireFromExtension.resolve('@tensorflow/tfjs');
  const wasmFile = requireFromExtension.resolve('@tensorflow/tfjs-backend-wasm/dist/tfjs-backend-wasm.wasm');
  wasm.setWasmPaths(path.dirname(wasmFile) + path.sep);
  const started = await tf.setBackend('wasm');
  await tf.ready();
  const product = tf.matMul(tf.tensor2d([[1, 2], [3, 4]]), tf.tensor2d([[5, 6], [7, 8]]));
  console.log(JSON.stringify({ started, backend: tf.getBackend(), product: Array.from(await product.data()), tfjsPath: resolved }));
})().catch((error) => { console.error(error && error.stack || String(error)); process.exit(1); });
`;

export interface PackagedRuntime {
  backend: string;
  product: number[];
  tfjsPath: string;
}

export function probePackagedRuntime(extensionFolder: string): PackagedRuntime {
  const result = spawnSync(process.execPath, ['-e', probeScript, extensionFolder], {
    cwd: os.tmpdir(),
    encoding: 'utf8',
    timeout: 60_000,
    env: { ...process.env, NODE_PATH: '' },
  });
  if (result.error) throw new Error(`the tfjs probe could not run: ${result.error.message}`);
  if (result.status !== 0) {
    throw new Error(
      `tfjs does not load from the installed extension ${extensionFolder} (a file missing from the .vsix?):\n${result.stderr.trim()}`,
    );
  }
  const lines = result.stdout.trim().split('\n');
  const report = JSON.parse(lines[lines.length - 1]) as { started: boolean; backend: string; product: number[]; tfjsPath: string };
  if (!report.started || report.backend !== 'wasm')
    throw new Error(`the wasm backend did not start from the .vsix (backend: ${report.backend})`);
  if (!report.tfjsPath.startsWith(extensionFolder)) throw new Error(`tfjs resolved outside the extension: ${report.tfjsPath}`);
  return report;
}
