// Read-only virtual documents holding a label file as an apply would write it, so that VS Code's
// diff editor can show the change before anything is written (`graph-curator-preview:` URIs).
import * as vscode from 'vscode';

export const previewScheme = 'graph-curator-preview';

export class PreviewDocuments implements vscode.TextDocumentContentProvider, vscode.Disposable {
  private readonly texts = new Map<string, string>();
  private readonly changed = new vscode.EventEmitter<vscode.Uri>();
  readonly onDidChange = this.changed.event;
  private counter = 0;
  private readonly registration: vscode.Disposable;

  constructor() {
    this.registration = vscode.workspace.registerTextDocumentContentProvider(previewScheme, this);
  }

  /** A fresh URI for `text`, named like the file it previews (so the diff editor picks its language). */
  add(fileName: string, text: string, label = 'after apply'): vscode.Uri {
    const uri = vscode.Uri.from({ scheme: previewScheme, path: `/${++this.counter}/${fileName}`, query: label });
    this.texts.set(uri.toString(), text);
    return uri;
  }

  /** Forgets previews no longer shown; an open diff editor keeps its copy. */
  clear(): void {
    this.texts.clear();
  }

  provideTextDocumentContent(uri: vscode.Uri): string {
    return this.texts.get(uri.toString()) ?? '(this preview has expired: run Apply Decisions again)';
  }

  dispose(): void {
    this.texts.clear();
    this.changed.dispose();
    this.registration.dispose();
  }
}
