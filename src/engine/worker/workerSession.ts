// The request loop of the engine worker, apart from the thread plumbing so that it reads plainly:
// one CancelFlag per running request, progress throttled per request, and every request answered
// exactly once with a result or an error.
import type {
  ErrorMessage,
  RequestParams,
  RequestResults,
  RequestType,
  ResultMessage,
  WorkerFailure,
  WorkerToHostMessage,
} from '../../protocol/worker';
import { isCancelMessage, isEngineRequest } from '../../protocol/worker';
import { DatasetError } from '../dataset/types';
import { ConflictError } from '../decisions/applyErrors';
import { CancelFlag, CancelledError, type ProgressSink } from '../util/progress';
import type { RequestContext, RequestHandlers } from './requestHandlers';

/** Smallest change of fraction worth a message; the host only draws a progress bar. */
const progressStep = 0.01;

/** Request id used when an unreadable message carried no usable id. */
export const unknownRequestId = 0;

export class WorkerSession {
  private readonly running = new Map<number, CancelFlag>();

  constructor(
    private readonly post: (message: WorkerToHostMessage) => void,
    private readonly handlers: RequestHandlers,
  ) {}

  /** Handles one message from the host; returns the request's completion (for tests), if one started. */
  receive(message: unknown): Promise<void> | undefined {
    if (isCancelMessage(message)) {
      this.running.get(message.id)?.cancel();
      return undefined;
    }
    if (!isEngineRequest(message)) {
      this.post(
        failure(idOf(message), { kind: 'internal', message: `The engine worker received a malformed message: ${describe(message)}` }),
      );
      return undefined;
    }
    if (this.running.has(message.id)) {
      this.post(failure(message.id, { kind: 'internal', message: `Request id ${message.id} is already running.` }));
      return undefined;
    }
    return this.run(message.id, message.type, message.params);
  }

  private async run<K extends RequestType>(id: number, type: K, params: RequestParams[K]): Promise<void> {
    const cancel = new CancelFlag();
    this.running.set(id, cancel);
    const context: RequestContext = { progress: this.progressFor(id), cancel };
    try {
      const value: RequestResults[K] = await this.handlers[type](params, context);
      // A result computed after the host gave up on it is not wanted: the host expects 'cancelled'.
      if (cancel.cancelled) throw new CancelledError();
      this.post({ type: 'result', id, request: type, value } as ResultMessage);
    } catch (error) {
      this.post(failure(id, toFailure(error)));
    } finally {
      this.running.delete(id);
    }
  }

  private progressFor(id: number): ProgressSink {
    let lastStage = '';
    let lastFraction = -1;
    return {
      report: (stage, fraction) => {
        const clamped = Number.isFinite(fraction) ? Math.min(1, Math.max(0, fraction)) : 0;
        if (stage === lastStage && clamped < 1 && clamped - lastFraction < progressStep) return;
        lastStage = stage;
        lastFraction = clamped;
        this.post({ type: 'progress', id, stage, fraction: clamped });
      },
    };
  }
}

export function toFailure(error: unknown): WorkerFailure {
  if (error instanceof DatasetError) return { kind: 'dataset', message: error.message, problems: error.problems };
  if (error instanceof CancelledError) return { kind: 'cancelled', message: error.message };
  if (error instanceof ConflictError) return { kind: 'conflict', message: error.message, files: error.files };
  if (error instanceof Error) return { kind: 'internal', message: error.message, stack: error.stack };
  return { kind: 'internal', message: String(error) };
}

function failure(id: number, error: WorkerFailure): ErrorMessage {
  return { type: 'error', id, error };
}

function idOf(message: unknown): number {
  if (typeof message === 'object' && message !== null && 'id' in message) {
    const id = message.id;
    if (typeof id === 'number' && Number.isSafeInteger(id) && id >= 0) return id;
  }
  return unknownRequestId;
}

function describe(message: unknown): string {
  try {
    const text = JSON.stringify(message) ?? String(message);
    return text.length > 200 ? `${text.slice(0, 200)}…` : text;
  } catch {
    return String(message);
  }
}
