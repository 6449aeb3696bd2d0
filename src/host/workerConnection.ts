// Owns the engine worker thread: starts it on first use, matches replies to requests by id,
// forwards progress, turns an AbortSignal into a cancel message, and turns a dead worker into
// rejected requests (the next request starts a fresh worker). No `vscode` here, so tests and
// other hosts can drive the real worker directly.
import { Worker } from 'node:worker_threads';
import type {
  EngineRequest,
  HostToWorkerMessage,
  RequestParams,
  RequestResults,
  RequestType,
  WorkerToHostMessage,
} from '../protocol/worker';
import { isWorkerToHostMessage } from '../protocol/worker';
import { EngineFailureError, RequestCancelledError, WorkerExitedError, errorFromFailure } from './engineErrors';

export interface RequestOptions {
  onProgress?: (stage: string, fraction: number) => void;
  signal?: AbortSignal;
}

export interface WorkerConnectionOptions {
  /** Absolute path of the bundled worker (dist/engine-worker.js). */
  workerScript: string;
  /** How long a cancelled request may keep the worker busy before the worker is terminated. */
  cancelGraceMs?: number;
  log?: (line: string) => void;
}

const defaultCancelGraceMs = 2000;

interface PendingRequest {
  type: RequestType;
  worker: Worker;
  resolve: (value: never) => void;
  reject: (error: Error) => void;
  onProgress?: (stage: string, fraction: number) => void;
  detach: () => void;
}

export class WorkerConnection {
  private worker: Worker | undefined;
  private nextId = 1;
  private readonly pending = new Map<number, PendingRequest>();
  /** Cancelled requests whose final reply has not come yet, with the timer that ends the wait. */
  private readonly draining = new Map<number, { worker: Worker; timer: NodeJS.Timeout }>();
  private disposed = false;

  constructor(private readonly options: WorkerConnectionOptions) {}

  /** Whether a worker thread is currently running (it starts on the first request). */
  get isRunning(): boolean {
    return this.worker !== undefined;
  }

  request<K extends RequestType>(type: K, params: RequestParams[K], options: RequestOptions = {}): Promise<RequestResults[K]> {
    if (this.disposed) return Promise.reject(new WorkerExitedError('The engine connection has been disposed.'));
    const { signal, onProgress } = options;
    if (signal?.aborted) return Promise.reject(new RequestCancelledError());
    const worker = this.ensureWorker();
    const id = this.nextId++;
    return new Promise<RequestResults[K]>((resolve, reject) => {
      const onAbort = () => this.cancel(id);
      signal?.addEventListener('abort', onAbort, { once: true });
      this.pending.set(id, {
        type,
        worker,
        resolve,
        reject,
        onProgress,
        detach: () => signal?.removeEventListener('abort', onAbort),
      });
      worker.ref();
      send(worker, engineRequest(type, id, params));
    });
  }

  /** Rejects every open request and terminates the worker. */
  async dispose(): Promise<void> {
    this.disposed = true;
    const worker = this.worker;
    this.worker = undefined;
    this.rejectAll(
      () => true,
      () => new WorkerExitedError('The engine connection has been disposed.'),
    );
    for (const entry of this.draining.values()) clearTimeout(entry.timer);
    this.draining.clear();
    if (worker) await worker.terminate();
  }

  private ensureWorker(): Worker {
    if (this.worker) return this.worker;
    const worker = new Worker(this.options.workerScript);
    this.worker = worker;
    let lastError: Error | undefined;
    worker.on('message', (message: unknown) => this.receive(worker, message));
    worker.on('messageerror', (error) => this.log(`engine worker: unreadable message: ${error.message}`));
    worker.on('error', (error) => {
      lastError = error;
      this.log(`engine worker crashed: ${error.stack ?? error.message}`);
    });
    worker.on('exit', (code) => {
      if (this.worker === worker) this.worker = undefined;
      const reason = lastError ? `: ${lastError.message}` : ` with exit code ${code}`;
      this.rejectAll(
        (p) => p.worker === worker,
        () => new WorkerExitedError(`The engine worker stopped${reason}. It will restart on the next request.`),
      );
      for (const [id, entry] of this.draining) {
        if (entry.worker !== worker) continue;
        clearTimeout(entry.timer);
        this.draining.delete(id);
      }
    });
    return worker;
  }

  private receive(worker: Worker, message: unknown): void {
    if (!isWorkerToHostMessage(message)) {
      this.log(`engine worker sent a malformed message: ${safeJson(message)}`);
      return;
    }
    if (message.type !== 'progress') this.finishDraining(message.id);
    const pending = this.pending.get(message.id);
    if (!pending || pending.worker !== worker) return;
    this.dispatch(message.id, pending, message);
  }

  private dispatch(id: number, pending: PendingRequest, message: WorkerToHostMessage): void {
    switch (message.type) {
      case 'progress':
        pending.onProgress?.(message.stage, message.fraction);
        return;
      case 'result':
        this.settle(id);
        if (message.request === pending.type) pending.resolve(message.value as never);
        else pending.reject(new EngineFailureError(`The engine answered a '${pending.type}' request with a '${message.request}' result.`));
        return;
      case 'error':
        this.settle(id);
        pending.reject(errorFromFailure(message.error));
        return;
    }
  }

  /** The user's cancellation rejects at once; the worker gets cancelGraceMs to stop, or is terminated. */
  private cancel(id: number): void {
    const pending = this.pending.get(id);
    if (!pending) return;
    this.settle(id);
    pending.reject(new RequestCancelledError());
    const worker = pending.worker;
    send(worker, { type: 'cancel', id });
    const timer = setTimeout(() => {
      this.draining.delete(id);
      this.log(`engine worker did not stop request ${id} within ${this.graceMs} ms after cancellation; terminating it.`);
      if (this.worker === worker) this.worker = undefined;
      void worker.terminate();
    }, this.graceMs);
    this.draining.set(id, { worker, timer });
  }

  private finishDraining(id: number): void {
    const entry = this.draining.get(id);
    if (!entry) return;
    clearTimeout(entry.timer);
    this.draining.delete(id);
    this.updateRef(entry.worker);
  }

  private settle(id: number): void {
    const pending = this.pending.get(id);
    if (!pending) return;
    pending.detach();
    this.pending.delete(id);
    this.updateRef(pending.worker);
  }

  /** An idle worker must not keep a CLI or test process alive. */
  private updateRef(worker: Worker): void {
    const busy =
      [...this.pending.values()].some((p) => p.worker === worker) || [...this.draining.values()].some((d) => d.worker === worker);
    if (!busy) worker.unref();
  }

  private rejectAll(select: (pending: PendingRequest) => boolean, makeError: () => Error): void {
    for (const [id, pending] of [...this.pending]) {
      if (!select(pending)) continue;
      this.settle(id);
      pending.reject(makeError());
    }
  }

  private get graceMs(): number {
    return this.options.cancelGraceMs ?? defaultCancelGraceMs;
  }

  private log(line: string): void {
    this.options.log?.(line);
  }
}

function send(worker: Worker, message: HostToWorkerMessage): void {
  worker.postMessage(message);
}

function engineRequest<K extends RequestType>(type: K, id: number, params: RequestParams[K]): EngineRequest {
  return { type, id, params } as EngineRequest;
}

function safeJson(value: unknown): string {
  try {
    return (JSON.stringify(value) ?? String(value)).slice(0, 200);
  } catch {
    return String(value);
  }
}
