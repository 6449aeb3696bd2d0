// The worker pool behind data-parallel mlp/sign training, whatever computes a shard's gradient
// (tfjs-wasm in parallelDenseStep.ts, the SIMD kernels in simd/parallelSimdTraining.ts): the
// training rows are split into shards, one worker thread each; parameters, dropout masks and
// gradients travel through SharedArrayBuffers, so an epoch costs two short messages per worker,
// and the caller adds the shards' gradient vectors in a fixed order, so a run is reproducible.
import type { Worker } from 'node:worker_threads';
import { gradientLength } from './denseShard';

/** What a shard's worker receives as workerData (plus whatever its kind adds). */
export interface ShardLayout {
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

/** Replies of a shard worker: 'ready' once it holds its shard, 'done' after each step. */
export type ShardReply = { type: 'ready' } | { type: 'done' } | { type: 'error'; message: string };

/** A Float32Array on shared memory (so that workers see it without copying). */
export function sharedFloats(length: number): Float32Array {
  return new Float32Array(new SharedArrayBuffer(length * 4));
}

/** Splits rows into `parts` contiguous blocks of nearly equal size; returns the part boundaries. */
export function splitRows(rowCount: number, parts: number): number[] {
  const bounds: number[] = [];
  for (let p = 0; p <= parts; p++) bounds.push(Math.round((rowCount * p) / parts));
  return bounds;
}

export class ShardedTraining {
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
   * startWorker starts one shard's worker from its layout. Resolves once every worker holds its shard.
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
    startWorker: (layout: ShardLayout) => Worker,
  ): Promise<ShardedTraining> {
    if (!(inputs.buffer instanceof SharedArrayBuffer)) throw new Error('parallel training: inputs must live on a SharedArrayBuffer');
    const classCount = posWeight.length;
    const length = gradientLength(inputDim, hiddenUnits, classCount);
    const parameterBuffer = new SharedArrayBuffer((length - 1) * 4);
    const maskBuffers = withDropout ? [0, 1].map(() => new SharedArrayBuffer(rowCount * hiddenUnits * 4)) : [];
    const gradientBuffers: SharedArrayBuffer[] = [];
    const bounds = splitRows(rowCount, shardCount);
    const workers: Worker[] = [];
    for (let s = 0; s < shardCount; s++) {
      const gradients = new SharedArrayBuffer(length * 4);
      gradientBuffers.push(gradients);
      workers.push(
        startWorker({
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
        }),
      );
    }
    const training = new ShardedTraining(workers, gradientBuffers, parameterBuffer, maskBuffers);
    for (const worker of workers) {
      worker.on('message', (reply: ShardReply) => training.onReply(reply));
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
   * when maskIndex is null). With `batch`, each shard uses only its rows batchRange(shard rows,
   * index, count) (miniBatches.ts; SIMD shards only), and the gradient keeps the all-rows loss
   * scale, so the caller rescales it. Returns the summed gradient vector (loss first); valid
   * until the next run.
   */
  async run(maskIndex: number | null, batch?: { index: number; count: number }): Promise<Float32Array> {
    const done = this.waitForAll();
    for (const worker of this.workers)
      worker.postMessage({ type: 'step', mask: maskIndex ?? -1, batch: batch?.index ?? 0, batches: batch?.count ?? 1 });
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

  private onReply(reply: ShardReply): void {
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
