// Data-parallel training step for large mlp/sign problems: tfjs-wasm runs on one thread in
// Node, so the training rows are split into shards, each held by a worker thread with its own
// tfjs-wasm instance; every epoch the workers compute their shards' gradients (denseShard.ts)
// and the caller adds them up and takes the Adam step. Parameters, dropout masks and gradients
// travel through SharedArrayBuffers, so an epoch costs two short messages per worker.
//
// The workers run the source text of denseShard's functions (eval workers need no separate
// bundle); tfjs itself is required from the installed package, as the main thread does.
import { Worker } from 'node:worker_threads';
import { dirname, sep } from 'node:path';
import { createDenseShard, disposeDenseShard, runDenseShard, type DenseShard, type Tfjs } from './denseShard';
import { ShardedTraining, type ShardLayout } from './shardedTraining';

interface DenseShardKernels {
  createDenseShard: typeof createDenseShard;
  runDenseShard: typeof runDenseShard;
  disposeDenseShard: typeof disposeDenseShard;
}

interface WorkerSetup extends ShardLayout {
  tfjsPath: string;
  wasmBackendPath: string;
  wasmFolder: string;
}

/** The worker's program. Self-contained: shipped as text. */
function workerMain(): void {
  // Modules are reached through process.getBuiltinModule and createRequire rather than a bare
  // `require`, which a bundler would rewrite in this function's text.
  const threads = process.getBuiltinModule('node:worker_threads');
  const parentPort = threads.parentPort!;
  const setup = threads.workerData as WorkerSetup;
  const load = process.getBuiltinModule('node:module').createRequire(setup.tfjsPath);
  const tf = load(setup.tfjsPath) as Tfjs;
  const wasmBackend = load(setup.wasmBackendPath) as { setWasmPaths(prefix: string): void };
  // denseShard's functions, defined by the text before this function (see workerSource); named
  // through globalThis because a bundler rewrites references to imported names.
  const kernels = (globalThis as unknown as { denseShardKernels: DenseShardKernels }).denseShardKernels;
  const rowCount = setup.rowEnd - setup.rowStart;
  const parameters = new Float32Array(setup.parameters);
  const gradients = new Float32Array(setup.gradients);
  const masks = setup.masks.map((buffer) => new Float32Array(buffer, setup.rowStart * setup.hiddenUnits * 4, rowCount * setup.hiddenUnits));
  let shard: DenseShard | null = null;
  wasmBackend.setWasmPaths(setup.wasmFolder);
  tf.setBackend('wasm')
    .then(async (started: boolean) => {
      if (!started) throw new Error('the tfjs wasm backend did not start in a training worker');
      await tf.ready();
    })
    .then(() => {
      const inputs = new Float32Array(setup.inputs, setup.rowStart * setup.inputDim * 4, rowCount * setup.inputDim);
      const classCount = setup.posWeight.length;
      const targets = setup.targets.subarray(setup.rowStart * classCount, setup.rowEnd * classCount);
      shard = kernels.createDenseShard(tf, inputs, rowCount, setup.inputDim, targets, setup.posWeight, setup.hiddenUnits, setup.lossScale);
      parentPort.postMessage({ type: 'ready' });
    })
    .catch((error: unknown) => parentPort.postMessage({ type: 'error', message: String(error instanceof Error ? error.stack : error) }));
  parentPort.on('message', (message: { type: string; mask: number }) => {
    try {
      if (message.type === 'dispose') {
        if (shard) kernels.disposeDenseShard(tf, shard);
        parentPort.close();
        return;
      }
      if (!shard) throw new Error('training step requested before the shard was ready');
      kernels.runDenseShard(tf, shard, parameters, message.mask < 0 ? null : masks[message.mask], gradients);
      parentPort.postMessage({ type: 'done' });
    } catch (error) {
      parentPort.postMessage({ type: 'error', message: String(error instanceof Error ? error.stack : error) });
    }
  });
}

const workerSource = [
  `globalThis.denseShardKernels = {`,
  `  createDenseShard: ${createDenseShard.toString()},`,
  `  runDenseShard: ${runDenseShard.toString()},`,
  `  disposeDenseShard: ${disposeDenseShard.toString()},`,
  `};`,
  `(${workerMain.toString()})();`,
].join('\n');

export { sharedFloats, splitRows } from './shardedTraining';

/** Data-parallel training whose shards run tfjs-wasm (denseShard.ts) in worker threads. */
export const ParallelDenseTraining = {
  start(
    inputs: Float32Array,
    rowCount: number,
    inputDim: number,
    targets: Float32Array,
    posWeight: Float32Array,
    hiddenUnits: number,
    shardCount: number,
    withDropout: boolean,
  ): Promise<ShardedTraining> {
    const wasmFile = require.resolve('@tensorflow/tfjs-backend-wasm/dist/tfjs-backend-wasm.wasm');
    const tfjs = {
      tfjsPath: require.resolve('@tensorflow/tfjs'),
      wasmBackendPath: require.resolve('@tensorflow/tfjs-backend-wasm'),
      wasmFolder: dirname(wasmFile) + sep,
    };
    return ShardedTraining.start(inputs, rowCount, inputDim, targets, posWeight, hiddenUnits, shardCount, withDropout, (layout) => {
      const setup: WorkerSetup = { ...layout, ...tfjs };
      // stdout: true keeps tfjs's start-up banner out of the user's console.
      const worker = new Worker(workerSource, { eval: true, workerData: setup, stdout: true });
      worker.stdout.resume();
      return worker;
    });
  },
};
