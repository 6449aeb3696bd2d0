// A·H on several cores: the rows of A are cut into contiguous ranges of about equal work, the
// calling thread computes the first range and worker threads the others, all reading the same
// SharedArrayBuffer copies of A and H and writing disjoint rows of one shared result.
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { CsrMatrix } from './csr';
import { checkProductShapes, spmmRowRange } from './spmm';

// Below this many multiply-adds the copy into shared memory and the messages cost more than
// the second core saves (about half a millisecond of work on one core).
const PARALLEL_MIN_WORK = 1 << 19;

// The worker runs the very same kernel as spmm: its source text is sent, not a second copy.
const WORKER_SOURCE = `
const { parentPort } = require('node:worker_threads');
const spmmRowRange = (${spmmRowRange.toString()});
parentPort.on('message', (job) => {
  try {
    spmmRowRange(job.rowPtr, job.colIndex, job.values, job.dense, job.columns, job.out, job.rowStart, job.rowEnd);
    parentPort.postMessage({ id: job.id });
  } catch (error) {
    parentPort.postMessage({ id: job.id, error: String(error && error.stack || error) });
  }
});
`;

interface SharedCsr {
  /** The arrays the copies were made from: a matrix whose arrays were swapped is copied again. */
  sourceArrays: [Int32Array, Int32Array, Float32Array];
  rowPtr: Int32Array;
  colIndex: Int32Array;
  values: Float32Array;
}

interface PendingJob {
  resolve: () => void;
  reject: (error: Error) => void;
}

interface WorkerSlot {
  worker: Worker;
  pending: Map<number, PendingJob>;
}

export class SpmmPool {
  // Shared copies of matrices already multiplied, so that repeated products with one matrix
  // (propagation, every training epoch) copy it once. Matrices are treated as immutable.
  private readonly sharedMatrices = new WeakMap<CsrMatrix, SharedCsr>();
  private nextJobId = 0;
  private disposed = false;

  private constructor(private readonly slots: WorkerSlot[]) {}

  /** threads counts the calling thread too: threads = 2 starts one worker. Default: the number of cores. */
  static async create(threads: number = availableParallelism()): Promise<SpmmPool> {
    if (!Number.isInteger(threads) || threads < 1) throw new Error(`SpmmPool: threads must be a positive integer, got ${threads}`);
    const slots: WorkerSlot[] = [];
    for (let i = 1; i < threads; i++) slots.push(await startWorker());
    const pool = new SpmmPool(slots);
    for (const slot of slots) pool.watch(slot);
    return pool;
  }

  get threadCount(): number {
    return this.slots.length + 1;
  }

  /**
   * A·H, as spmm. The result may be backed by a SharedArrayBuffer (it is when workers took part),
   * which makes it cheap to pass straight back into multiply.
   */
  async multiply(a: CsrMatrix, dense: Float32Array, columns: number): Promise<Float32Array> {
    if (this.disposed) throw new Error('SpmmPool: multiply called after dispose');
    checkProductShapes('SpmmPool.multiply', a.colCount, a.rowCount, dense, columns, undefined);
    const nnz = a.rowPtr[a.rowCount];
    if (this.slots.length === 0 || (nnz + a.rowCount) * columns < PARALLEL_MIN_WORK) {
      const out = new Float32Array(a.rowCount * columns);
      spmmRowRange(a.rowPtr, a.colIndex, a.values, dense, columns, out, 0, a.rowCount);
      return out;
    }
    const shared = this.share(a);
    const sharedDense = isShared(dense) ? dense : copyToShared(dense.subarray(0, a.colCount * columns));
    const out = new Float32Array(new SharedArrayBuffer(a.rowCount * columns * 4));
    const bounds = splitRowsByWork(a.rowPtr, a.rowCount, this.slots.length + 1);
    const replies: Promise<void>[] = [];
    for (let part = 1; part < bounds.length - 1; part++) {
      replies.push(
        this.post(this.slots[part - 1], {
          rowPtr: shared.rowPtr,
          colIndex: shared.colIndex,
          values: shared.values,
          dense: sharedDense,
          columns,
          out,
          rowStart: bounds[part],
          rowEnd: bounds[part + 1],
        }),
      );
    }
    // The calling thread takes the first range, reading its own (unshared) arrays.
    spmmRowRange(a.rowPtr, a.colIndex, a.values, dense, columns, out, bounds[0], bounds[1]);
    await Promise.all(replies);
    return out;
  }

  async dispose(): Promise<void> {
    if (this.disposed) return;
    this.disposed = true;
    const slots = this.slots.splice(0);
    for (const slot of slots) rejectAll(slot, new Error('SpmmPool disposed'));
    await Promise.all(slots.map((slot) => slot.worker.terminate()));
  }

  private share(a: CsrMatrix): SharedCsr {
    const cached = this.sharedMatrices.get(a);
    if (cached && cached.sourceArrays[0] === a.rowPtr && cached.sourceArrays[1] === a.colIndex && cached.sourceArrays[2] === a.values) {
      return cached;
    }
    const shared: SharedCsr = {
      sourceArrays: [a.rowPtr, a.colIndex, a.values],
      rowPtr: isShared(a.rowPtr) ? a.rowPtr : copyToShared(a.rowPtr),
      colIndex: isShared(a.colIndex) ? a.colIndex : copyToShared(a.colIndex),
      values: isShared(a.values) ? a.values : copyToShared(a.values),
    };
    this.sharedMatrices.set(a, shared);
    return shared;
  }

  private post(slot: WorkerSlot, job: Record<string, unknown>): Promise<void> {
    const id = this.nextJobId++;
    return new Promise<void>((resolve, reject) => {
      slot.pending.set(id, { resolve, reject });
      // A busy worker keeps the process alive; an idle one must not (see watch).
      slot.worker.ref();
      slot.worker.postMessage({ ...job, id });
    });
  }

  private watch(slot: WorkerSlot): void {
    slot.worker.on('message', (reply: { id: number; error?: string }) => {
      const job = slot.pending.get(reply.id);
      if (!job) return;
      slot.pending.delete(reply.id);
      if (slot.pending.size === 0) slot.worker.unref();
      if (reply.error) job.reject(new Error(`SpmmPool worker failed: ${reply.error}`));
      else job.resolve();
    });
    slot.worker.on('error', (error) => rejectAll(slot, error instanceof Error ? error : new Error(String(error))));
    slot.worker.on('exit', (code) => {
      if (slot.pending.size > 0) rejectAll(slot, new Error(`SpmmPool worker exited with code ${code}`));
    });
  }
}

/**
 * Row boundaries [0, ..., rowCount] cutting A into `parts` contiguous ranges of about equal
 * work. Work is counted as non-zeros plus rows (each row also writes its output row), so a few
 * dense rows do not leave one thread with most of the edges.
 */
export function splitRowsByWork(rowPtr: Int32Array, rowCount: number, parts: number): Int32Array {
  const bounds = new Int32Array(parts + 1);
  const totalWork = rowPtr[rowCount] + rowCount;
  for (let part = 1; part < parts; part++) {
    const target = (totalWork * part) / parts;
    // Smallest row r with rowPtr[r] + r ≥ target, searched between the previous bound and the end.
    let low = bounds[part - 1];
    let high = rowCount;
    while (low < high) {
      const mid = (low + high) >>> 1;
      if (rowPtr[mid] + mid < target) low = mid + 1;
      else high = mid;
    }
    bounds[part] = low;
  }
  bounds[parts] = rowCount;
  return bounds;
}

function startWorker(): Promise<WorkerSlot> {
  const worker = new Worker(WORKER_SOURCE, { eval: true });
  return new Promise((resolve, reject) => {
    worker.once('online', () => {
      worker.unref();
      resolve({ worker, pending: new Map() });
    });
    worker.once('error', reject);
  });
}

function rejectAll(slot: WorkerSlot, error: Error): void {
  for (const job of slot.pending.values()) job.reject(error);
  slot.pending.clear();
}

function isShared(array: Int32Array | Float32Array): boolean {
  return array.buffer instanceof SharedArrayBuffer;
}

function copyToShared<T extends Int32Array | Float32Array>(array: T): T {
  const shared = new SharedArrayBuffer(array.byteLength);
  const copy = (array instanceof Int32Array ? new Int32Array(shared) : new Float32Array(shared)) as T;
  copy.set(array);
  return copy;
}
