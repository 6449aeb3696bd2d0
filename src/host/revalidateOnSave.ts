// Re-validates a dataset shortly after any file inside its folder is saved, so the Problems panel
// follows the user's edits. Saves in quick succession are coalesced, and a newer validation
// cancels an older one still running for the same folder.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { validateDataset } from './commands/validate';
import { datasetFolderOf } from './datasetLocator';
import type { HostServices } from './hostServices';

const debounceMs = 500;

export function registerRevalidateOnSave(services: HostServices): vscode.Disposable {
  const timers = new Map<string, NodeJS.Timeout>();
  const running = new Map<string, vscode.CancellationTokenSource>();

  const revalidate = async (folder: string): Promise<void> => {
    running.get(folder)?.cancel();
    const cancellation = new vscode.CancellationTokenSource();
    running.set(folder, cancellation);
    try {
      await vscode.window.withProgress({ location: vscode.ProgressLocation.Window, title: 'Validating dataset' }, () =>
        validateDataset(services, folder, { token: cancellation.token }),
      );
    } finally {
      if (running.get(folder) === cancellation) running.delete(folder);
      cancellation.dispose();
    }
  };

  const onSave = vscode.workspace.onDidSaveTextDocument(async (document) => {
    if (document.uri.scheme !== 'file') return;
    const folder = await datasetFolderOf(document.uri);
    if (!folder) return;
    clearTimeout(timers.get(folder));
    timers.set(
      folder,
      setTimeout(() => {
        timers.delete(folder);
        void revalidate(folder);
      }, debounceMs),
    );
  });

  // A dataset folder that is deleted or renamed away takes its problems with it. Deleting a folder
  // reports only the folder itself (VS Code coalesces the events of what was inside), so every
  // deletion is matched against the folders that have problems shown.
  const deletions = vscode.workspace.createFileSystemWatcher('**', true, true, false);
  const onDelete = deletions.onDidDelete((uri) => {
    if (uri.scheme !== 'file') return;
    const deleted = uri.fsPath;
    services.diagnostics.clearWithin(path.basename(deleted) === 'dataset.json' ? path.dirname(deleted) : deleted);
  });

  return new vscode.Disposable(() => {
    onSave.dispose();
    onDelete.dispose();
    deletions.dispose();
    for (const timer of timers.values()) clearTimeout(timer);
    timers.clear();
    for (const cancellation of running.values()) cancellation.cancel();
    running.clear();
  });
}
