// Builds one bundle per target: the extension host (node, vscode external), the engine
// worker, the CLI, the benchmark and demo generator (node), and the review webview (browser).
import * as esbuild from 'esbuild';
import { existsSync } from 'node:fs';

const watch = process.argv.includes('--watch');
const production = process.argv.includes('--production');

// tfjs and its wasm backend stay external for node targets: the wasm backend locates its
// .wasm files inside its own package folder, and the package ships node_modules with them.
const nodeExternals = [
  'vscode',
  '@tensorflow/tfjs',
  '@tensorflow/tfjs-core',
  '@tensorflow/tfjs-backend-wasm',
  '@tensorflow/tfjs-backend-cpu',
];

const common = {
  bundle: true,
  sourcemap: !production,
  minify: production,
  logLevel: 'warning',
};

const nodeTargets = [
  { entry: 'src/host/extension.ts', out: 'dist/extension.js' },
  { entry: 'src/engine/worker/engineWorker.ts', out: 'dist/engine-worker.js' },
  { entry: 'src/cli/main.ts', out: 'dist/cli.js' },
  { entry: 'bench/main.ts', out: 'dist/bench.js' },
  { entry: 'demo-data/generator/main.ts', out: 'dist/demo-generator.js' },
].filter((t) => existsSync(t.entry));

// In a folder of its own: the review panel's localResourceRoots name that folder (and media/), so
// the webview can load nothing of the extension host's, the engine's or the CLI's bundles.
const browserTargets = [{ entry: 'webview/main.ts', out: 'dist/webview/webview.js' }].filter((t) => existsSync(t.entry));

const contexts = [];
for (const target of nodeTargets) {
  contexts.push(
    await esbuild.context({
      ...common,
      entryPoints: [target.entry],
      outfile: target.out,
      platform: 'node',
      target: 'node20',
      format: 'cjs',
      external: nodeExternals,
    }),
  );
}
for (const target of browserTargets) {
  contexts.push(
    await esbuild.context({
      ...common,
      entryPoints: [target.entry],
      outfile: target.out,
      platform: 'browser',
      target: 'chrome120',
      format: 'iife',
    }),
  );
}

if (watch) {
  await Promise.all(contexts.map((c) => c.watch()));
} else {
  await Promise.all(contexts.map((c) => c.rebuild()));
  await Promise.all(contexts.map((c) => c.dispose()));
}
