// Data-parallel mlp/sign training step on the SIMD kernels: the interface of
// models/parallelDenseStep.ts's ParallelDenseTraining (which runs tfjs-wasm shards), with
// simdShard.ts shards instead. Each worker thread copies its block of the training rows into
// its own kernel instance once; every epoch it reads the parameters and dropout mask from
// SharedArrayBuffers and writes its shard's gradient vector into another, and the caller adds
// the shards' vectors in a fixed order, so a run is reproducible.
import { Worker } from 'node:worker_threads';
import { kernelModule } from './kernels';
import { createSimdShard, runSimdShard, type SimdShard } from './simdShard';

interface SimdShardFunctions {
  createSimdShard: typeof createSimdShard;
  runSimdShard: typeof runSimdShard;
}

interface WorkerSetup {
  module: WebAssembly.Module;
  inputs: SharedArrayBuffer;
  rowStart: number;
  rowEnd: number;
  inputDim: number;
  targets: Float32Array;
  posWeight: Float32Array;
  hiddenUnits: number;
  lossScale: number;
  parameters: SharedArrayBuffer;
  masks: SharedArrayBuffer[];
  gradients: SharedArrayBuffer;
}

type WorkerReply = { type: 'ready' } | { type: 'done' } | { type: 'error'; message: string };

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
  parentPort.on('message', (message: { type: string; mask: number }) => {
    try {
      if (message.type === 'dispose') {
        parentPort.close();
        return;
      }
      if (!shard) throw new Error('training step requested but the shard could not be set up');
      shardFunctions.runSimdShard(shard, parameters, message.mask < 0 ? null : masks[message.mask], gradients);
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

function splitRows(rowCount: number, parts: number): number[] {
  const bounds: number[] = [];
  for (let p = 0; p <= parts; p++) bounds.push(Math.round((rowCount * p) / parts));
  return bounds;
}

export class ParallelSimdTraining {
  /** Write the flat parameters here before each run (layout of flattenParameters). */
  readonly parameters: Float32Array;
  /** Two mask buffers (rows × hidden), so the next epoch's mask can be drawn during a run. */
  readonly masks: Float32Array[];
  private readonly gradientViews: Float32Array[];
  private readonly summed: Float32Array;
  private pending: { resolve: () => void; reject: (error: Error) => void; waiting: number } | null = null;
  private failure: Error | null = null;

  private constructor(
    private readonly workers: Worker[],
    gradientBuffers: SharedArrayBuffer[],
    parameterBuffer: SharedArrayBuffer,
    maskBuffers: SharedArrayBuffer[],
  ) {
    this.parameters = new Float32Array(parameterBuffer);
    this.masks = maskBuffers.map((b) => new Float32Array(b));
    this.gradientViews = gradientBuffers.map((b) => new Float32Array(b));
    this.summed = new Float32Array(this.gradientViews[0].length);
  }

  /**
   * inputs: the training rows (rows × inputDim) on a SharedArrayBuffer. Resolves once every
   * worker holds its shard.
   */
  static async start(
    inputs: Float32Array,
    rowCount: number,
    inputDim: number,
    targets: Float32Array,
    posWeight: Float32Array,
    hiddenUnits: number,
    shardCount: number,
    withDropout: boolean,
  ): Promise<ParallelSimdTraining> {
    if (!(inputs.buffer instanceof SharedArrayBuffer)) throw new Error('ParallelSimdTraining: inputs must live on a SharedArrayBuffer');
    const module = kernelModule();
    if (!module) throw new Error('WebAssembly SIMD kernels are not available in this JavaScript engine');
    const classCount = posWeight.length;
    const length = 1 + inputDim * hiddenUnits + hiddenUnits + hiddenUnits * classCount + classCount;
    const parameterBuffer = new SharedArrayBuffer((length - 1) * 4);
    const maskBuffers = withDropout ? [0, 1].map(() => new SharedArrayBuffer(rowCount * hiddenUnits * 4)) : [];
    const gradientBuffers: SharedArrayBuffer[] = [];
    const bounds = splitRows(rowCount, shardCount);
    const workers: Worker[] = [];
    for (let s = 0; s < shardCount; s++) {
      const gradients = new SharedArrayBuffer(length * 4);
      gradientBuffers.push(gradients);
      const setup: WorkerSetup = {
        module,
        inputs: inputs.buffer,
        rowStart: bounds[s],
        rowEnd: bounds[s + 1],
        inputDim,
        targets,
        posWeight,
        hiddenUnits,
        lossScale: 1 / (rowCount * classCount),
        parameters: parameterBuffer,
        masks: maskBuffers,
        gradients,
      };
      workers.push(new Worker(workerSource, { eval: true, workerData: setup }));
    }
    const training = new ParallelSimdTraining(workers, gradientBuffers, parameterBuffer, maskBuffers);
    for (const worker of workers) {
      worker.on('message', (reply: WorkerReply) => training.onReply(reply));
      worker.on('error', (error) => training.onFailure(error));
      worker.on('exit', (code) => {
        if (code !== 0) training.onFailure(new Error(`a training worker stopped with exit code ${code}`));
      });
    }
    try {
      await training.waitForAll();
    } catch (error) {
      await training.dispose();
      throw error;
    }
    return training;
  }

  /**
   * One step over all shards with the current parameters and masks[maskIndex] (or no dropout
   * when maskIndex is null). Returns the summed gradient vector (loss first); valid until the
   * next run.
   */
  async run(maskIndex: number | null): Promise<Float32Array> {
    const done = this.waitForAll();
    for (const worker of this.workers) worker.postMessage({ type: 'step', mask: maskIndex ?? -1 });
    await done;
    this.summed.set(this.gradientViews[0]);
    for (let s = 1; s < this.gradientViews.length; s++) {
      const part = this.gradientViews[s];
      for (let i = 0; i < part.length; i++) this.summed[i] += part[i];
    }
    return this.summed;
  }

  async dispose(): Promise<void> {
    this.failure ??= new Error('training workers disposed');
    await Promise.all(
      this.workers.map(
        (worker) =>
          new Promise<void>((resolve) => {
            const timer = setTimeout(() => void worker.terminate().then(() => resolve()), 2000);
            worker.once('exit', () => {
              clearTimeout(timer);
              resolve();
            });
            worker.postMessage({ type: 'dispose' });
          }),
      ),
    );
  }

  private waitForAll(): Promise<void> {
    if (this.failure) return Promise.reject(this.failure);
    return new Promise((resolve, reject) => {
      this.pending = { resolve, reject, waiting: this.workers.length };
    });
  }

  private onReply(reply: WorkerReply): void {
    if (reply.type === 'error') {
      this.onFailure(new Error(`training worker failed: ${reply.message}`));
      return;
    }
    const pending = this.pending;
    if (!pending) return;
    pending.waiting--;
    if (pending.waiting === 0) {
      this.pending = null;
      pending.resolve();
    }
  }

  private onFailure(error: Error): void {
    if (this.failure) return;
    this.failure = error;
    const pending = this.pending;
    this.pending = null;
    pending?.reject(error);
  }
}
