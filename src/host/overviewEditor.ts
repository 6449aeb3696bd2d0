// "Dataset Overview": a custom editor for dataset.json (priority "option", so the JSON editor with
// schema validation stays the default; reached with "Reopen Editor With…"). It shows the worker's
// overview and links to the extension's commands; it never edits the document.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { newNonce } from '../review/webviewHtml';
import type { DatasetOverviews } from './datasetOverviews';
import { overviewCommands, overviewHtml, overviewMessageHtml } from './overviewHtml';

export const overviewEditorViewType = 'graphCurator.datasetOverview';

export class DatasetOverviewEditor implements vscode.CustomTextEditorProvider {
  constructor(private readonly overviews: DatasetOverviews) {}

  static register(overviews: DatasetOverviews): vscode.Disposable {
    return vscode.window.registerCustomEditorProvider(overviewEditorViewType, new DatasetOverviewEditor(overviews), {
      webviewOptions: { enableFindWidget: true },
    });
  }

  resolveCustomTextEditor(document: vscode.TextDocument, panel: vscode.WebviewPanel): void {
    const folder = path.dirname(document.uri.fsPath);
    panel.webview.options = { enableScripts: false, enableCommandUris: [...overviewCommands], localResourceRoots: [] };
    const parts = () => ({ cspSource: panel.webview.cspSource, nonce: newNonce() });
    let generation = 0;
    const render = async () => {
      const mine = ++generation;
      panel.webview.html = overviewMessageHtml(`Reading ${path.basename(folder)}…`, parts());
      try {
        const overview = await this.overviews.get(folder);
        if (mine === generation) panel.webview.html = overviewHtml(folder, overview, parts());
      } catch (error) {
        if (mine === generation)
          panel.webview.html = overviewMessageHtml(
            `The dataset could not be read: ${error instanceof Error ? error.message : String(error)}`,
            parts(),
          );
      }
    };
    let stale = false;
    const subscription = this.overviews.onDidChange((changed) => {
      if (changed !== folder) return;
      if (panel.visible) void render();
      else stale = true;
    });
    const visibility = panel.onDidChangeViewState(() => {
      if (!panel.visible || !stale) return;
      stale = false;
      void render();
    });
    panel.onDidDispose(() => {
      subscription.dispose();
      visibility.dispose();
    });
    void render();
  }
}
