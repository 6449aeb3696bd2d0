// Dataset overviews (summary, runs, newest candidates) computed by the worker and kept until a
// file of the dataset changes, for the Datasets tree and the dataset.json overview editor.
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { DatasetOverview } from '../protocol/worker';
import type { EngineClient } from './engineClient';
import { findDatasetFolder } from './datasetPaths';

export class DatasetOverviews implements vscode.Disposable {
  private readonly cache = new Map<string, Promise<DatasetOverview>>();
  private readonly changed = new vscode.EventEmitter<string>();
  /** Fires with the dataset folder whose overview is out of date. */
  readonly onDidChange = this.changed.event;
  private readonly disposables: vscode.Disposable[] = [];

  constructor(private readonly client: EngineClient) {
    // Label, node and edge files, manifests, and finished runs (run.json is written last).
    const watcher = vscode.workspace.createFileSystemWatcher('**/{dataset.json,*.csv,classes.json,*.npy,run.json}');
    const onFile = (uri: vscode.Uri) => void this.invalidateFile(uri.fsPath);
    this.disposables.push(watcher, watcher.onDidChange(onFile), watcher.onDidCreate(onFile), watcher.onDidDelete(onFile), this.changed);
  }

  get(folder: string): Promise<DatasetOverview> {
    let overview = this.cache.get(folder);
    if (!overview) {
      overview = this.client.request('overview', { folder });
      this.cache.set(folder, overview);
      overview.catch(() => {
        if (this.cache.get(folder) === overview) this.cache.delete(folder);
      });
    }
    return overview;
  }

  /** Forgets the overview of `folder` (it is computed again when next asked for). */
  invalidate(folder: string): void {
    this.cache.delete(folder);
    this.changed.fire(folder);
  }

  private async invalidateFile(file: string): Promise<void> {
    // A run writes scores.csv and embeddings.npy before run.json: only run.json finishes it.
    const inRuns = file.split(path.sep).includes('runs');
    if (inRuns && path.basename(file) !== 'run.json') return;
    // runs/<id>/run.json belongs to the dataset two levels up.
    const start = path.basename(file) === 'run.json' ? path.dirname(path.dirname(path.dirname(file))) : path.dirname(file);
    const folder = this.cache.has(start) ? start : await findDatasetFolder(path.join(start, 'dataset.json'));
    if (folder && this.cache.has(folder)) this.invalidate(folder);
    else if (folder) this.changed.fire(folder);
  }

  dispose(): void {
    for (const d of this.disposables.splice(0)) d.dispose();
  }
}
