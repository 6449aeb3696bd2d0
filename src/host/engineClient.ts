// The extension's handle on the engine: a WorkerConnection with VS Code's cancellation tokens and
// progress reporters plugged in. All engine computation happens in the worker.
import * as vscode from 'vscode';
import type { LocatedProblem } from '../engine/dataset/types';
import type { DatasetSummary, RequestParams, RequestResults, RequestType } from '../protocol/worker';
import { WorkerConnection } from './workerConnection';

export type ProgressReporter = vscode.Progress<{ message?: string; increment?: number }>;

export interface EngineRun {
  token?: vscode.CancellationToken;
  progress?: ProgressReporter;
}

export class EngineClient implements vscode.Disposable {
  private readonly connection: WorkerConnection;

  constructor(workerScript: string, output: vscode.OutputChannel) {
    this.connection = new WorkerConnection({ workerScript, log: (line) => output.appendLine(line) });
  }

  validate(folder: string, run: EngineRun = {}): Promise<LocatedProblem[]> {
    return this.request('validate', { folder }, run);
  }

  summary(folder: string, run: EngineRun = {}): Promise<DatasetSummary> {
    return this.request('summary', { folder }, run);
  }

  async request<K extends RequestType>(type: K, params: RequestParams[K], run: EngineRun = {}): Promise<RequestResults[K]> {
    const abort = new AbortController();
    if (run.token?.isCancellationRequested) abort.abort();
    const subscription = run.token?.onCancellationRequested(() => abort.abort());
    const progress = run.progress;
    try {
      return await this.connection.request(type, params, {
        signal: abort.signal,
        onProgress: progress ? (stage, fraction) => progress.report({ message: progressMessage(stage, fraction) }) : undefined,
      });
    } finally {
      subscription?.dispose();
    }
  }

  dispose(): void {
    void this.connection.dispose();
  }
}

export function progressMessage(stage: string, fraction: number): string {
  return `${stage} ${Math.round(fraction * 100)}%`;
}
