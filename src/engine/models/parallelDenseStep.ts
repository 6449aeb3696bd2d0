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
import { createDenseShard, disposeDenseShard, gradientLength, runDenseShard, type DenseShard, type Tfjs } from './denseShard';

interface DenseShardKernels {
  createDenseShard: typeof createDenseShard;
  runDenseShard: typeof runDenseShard;
  disposeDenseShard: typeof disposeDenseShard;
}

interface WorkerSetup {
  tfjsPath: string;
  wasmBackendPath: string;
  wasmFolder: string;
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

/** Splits rows into `parts` contiguous blocks of nearly equal size; returns the part boundaries. */
export function splitRows(rowCount: number, parts: number): number[] {
  const bounds: number[] = [];
  for (let p = 0; p <= parts; p++) bounds.push(Math.round((rowCount * p) / parts));
  return bounds;
}

/** A Float32Array on shared memory (so that workers see it without copying). */
export function sharedFloats(length: number): Float32Array {
  return new Float32Array(new SharedArrayBuffer(length * 4));
}

export class ParallelDenseTraining {
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
   * inputs: the training rows (rows × inputDim) on a SharedArrayBuffer (see sharedFloats).
   * Resolves once every worker holds its shard.
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
  ): Promise<ParallelDenseTraining> {
    if (!(inputs.buffer instanceof SharedArrayBuffer)) throw new Error('ParallelDenseTraining: inputs must live on a SharedArrayBuffer');
    const classCount = posWeight.length;
    const length = gradientLength(inputDim, hiddenUnits, classCount);
    const parameterBuffer = new SharedArrayBuffer((length - 1) * 4);
    const maskBuffers = withDropout ? [0, 1].map(() => new SharedArrayBuffer(rowCount * hiddenUnits * 4)) : [];
    const gradientBuffers: SharedArrayBuffer[] = [];
    const bounds = splitRows(rowCount, shardCount);
    const wasmFile = require.resolve('@tensorflow/tfjs-backend-wasm/dist/tfjs-backend-wasm.wasm');
    const workers: Worker[] = [];
    for (let s = 0; s < shardCount; s++) {
      const gradients = new SharedArrayBuffer(length * 4);
      gradientBuffers.push(gradients);
      const setup: WorkerSetup = {
        tfjsPath: require.resolve('@tensorflow/tfjs'),
        wasmBackendPath: require.resolve('@tensorflow/tfjs-backend-wasm'),
        wasmFolder: dirname(wasmFile) + sep,
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
      // stdout: true keeps tfjs's start-up banner out of the user's console.
      const worker = new Worker(workerSource, { eval: true, workerData: setup, stdout: true });
      worker.stdout.resume();
      workers.push(worker);
    }
    const training = new ParallelDenseTraining(workers, gradientBuffers, parameterBuffer, maskBuffers);
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
    // Shards are added in a fixed order, so a run is reproducible.
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
