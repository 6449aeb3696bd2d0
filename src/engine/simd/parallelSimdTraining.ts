// Data-parallel mlp/sign training step on the SIMD kernels: the worker pool of
// models/shardedTraining.ts with simdShard.ts shards. Each worker thread copies its block of the
// training rows into its own kernel instance once.
import { Worker } from 'node:worker_threads';
import { kernelModule } from './kernels';
import { createSimdShard, runSimdShard, type SimdShard } from './simdShard';
import { ShardedTraining, type ShardLayout } from '../models/shardedTraining';

interface SimdShardFunctions {
  createSimdShard: typeof createSimdShard;
  runSimdShard: typeof runSimdShard;
}

interface WorkerSetup extends ShardLayout {
  module: WebAssembly.Module;
}

/** The worker's program. Self-contained: shipped as text. */
function workerMain(): void {
  // Reached through process.getBuiltinModule rather than a bare `require`, which a bundler would
  // rewrite in this function's text.
  const threads = process.getBuiltinModule('node:worker_threads');
  const parentPort = threads.parentPort!;
  const setup = threads.workerData as WorkerSetup;
  // simdShard's functions, defined by the text before this function (see workerSource).
  const shardFunctions = (globalThis as unknown as { simdShardFunctions: SimdShardFunctions }).simdShardFunctions;
  const rowCount = setup.rowEnd - setup.rowStart;
  const parameters = new Float32Array(setup.parameters);
  const gradients = new Float32Array(setup.gradients);
  const masks = setup.masks.map((buffer) => new Float32Array(buffer, setup.rowStart * setup.hiddenUnits * 4, rowCount * setup.hiddenUnits));
  let shard: SimdShard | null = null;
  try {
    const classCount = setup.posWeight.length;
    shard = shardFunctions.createSimdShard(
      setup.module,
      new Float32Array(setup.inputs, setup.rowStart * setup.inputDim * 4, rowCount * setup.inputDim),
      rowCount,
      setup.inputDim,
      setup.targets.subarray(setup.rowStart * classCount, setup.rowEnd * classCount),
      setup.posWeight,
      setup.hiddenUnits,
      setup.lossScale,
    );
    parentPort.postMessage({ type: 'ready' });
  } catch (error) {
    parentPort.postMessage({ type: 'error', message: String(error instanceof Error ? error.stack : error) });
  }
  parentPort.on('message', (message: { type: string; mask: number; batch: number; batches: number }) => {
    try {
      if (message.type === 'dispose') {
        parentPort.close();
        return;
      }
      if (!shard) throw new Error('training step requested but the shard could not be set up');
      // batchRange of models/miniBatches.ts, repeated because this code is shipped as text.
      const rowFrom = Math.round((rowCount * message.batch) / message.batches);
      const rowTo = Math.round((rowCount * (message.batch + 1)) / message.batches);
      shardFunctions.runSimdShard(shard, parameters, message.mask < 0 ? null : masks[message.mask], gradients, rowFrom, rowTo);
      parentPort.postMessage({ type: 'done' });
    } catch (error) {
      parentPort.postMessage({ type: 'error', message: String(error instanceof Error ? error.stack : error) });
    }
  });
}

const workerSource = [
  `globalThis.simdShardFunctions = {`,
  `  createSimdShard: ${createSimdShard.toString()},`,
  `  runSimdShard: ${runSimdShard.toString()},`,
  `};`,
  `(${workerMain.toString()})();`,
].join('\n');

/** Data-parallel training whose shards run the SIMD kernels (simdShard.ts) in worker threads. */
export const ParallelSimdTraining = {
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
    const module = kernelModule();
    if (!module) return Promise.reject(new Error('WebAssembly SIMD kernels are not available in this JavaScript engine'));
    return ShardedTraining.start(inputs, rowCount, inputDim, targets, posWeight, hiddenUnits, shardCount, withDropout, (layout) => {
      const setup: WorkerSetup = { ...layout, module };
      return new Worker(workerSource, { eval: true, workerData: setup });
    });
  },
};
