// The Datasets view: every dataset.json in the workspace (and folders opened with "Open Dataset
// Folder…"), and under each its slices, classes, runs and newest candidates. Children come from
// the worker's overview, so expanding a large dataset never blocks the extension host.
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { DatasetOverviews } from './datasetOverviews';
import { datasetChildren, datasetDescription, type TreeNodeModel } from './datasetTreeModel';
import { manifestFileName } from './datasetPaths';

export const datasetsViewId = 'graphCuratorDatasets';
const extraFoldersKey = 'graphCurator.extraDatasetFolders';
const maxDatasets = 200;

const icons: Record<TreeNodeModel['kind'], string> = {
  dataset: 'database',
  group: 'folder',
  slice: 'calendar',
  class: 'tag',
  run: 'history',
  candidate: 'lightbulb',
  message: 'info',
};

export class DatasetTreeProvider implements vscode.TreeDataProvider<TreeNodeModel>, vscode.Disposable {
  private readonly changed = new vscode.EventEmitter<TreeNodeModel | undefined>();
  readonly onDidChangeTreeData = this.changed.event;
  private readonly disposables: vscode.Disposable[] = [];
  private roots: TreeNodeModel[] = [];

  constructor(
    private readonly overviews: DatasetOverviews,
    private readonly state: vscode.Memento,
  ) {
    const watcher = vscode.workspace.createFileSystemWatcher(`**/${manifestFileName}`, false, true, false);
    this.disposables.push(
      this.changed,
      watcher,
      watcher.onDidCreate(() => this.refresh()),
      watcher.onDidDelete(() => this.refresh()),
      overviews.onDidChange((folder) => {
        const root = this.roots.find((r) => r.id === folder);
        this.changed.fire(root);
      }),
      vscode.workspace.onDidChangeWorkspaceFolders(() => this.refresh()),
    );
  }

  refresh(): void {
    this.changed.fire(undefined);
  }

  /** Lists a folder outside the workspace too (from "Open Dataset Folder…"). */
  async addFolder(folder: string): Promise<void> {
    const extra = this.state.get<string[]>(extraFoldersKey, []);
    if (!extra.includes(folder)) await this.state.update(extraFoldersKey, [...extra, folder]);
    this.refresh();
  }

  getTreeItem(node: TreeNodeModel): vscode.TreeItem {
    const collapsible =
      node.kind === 'dataset'
        ? vscode.TreeItemCollapsibleState.Expanded
        : node.children
          ? vscode.TreeItemCollapsibleState.Collapsed
          : vscode.TreeItemCollapsibleState.None;
    const item = new vscode.TreeItem(node.label, collapsible);
    item.id = node.id;
    item.description = node.description;
    item.tooltip = node.tooltip;
    item.iconPath = new vscode.ThemeIcon(icons[node.kind]);
    item.contextValue = `graphCurator.${node.kind}`;
    if (node.command) item.command = node.command;
    if (node.kind === 'dataset') item.resourceUri = vscode.Uri.file(path.join(node.id, manifestFileName));
    return item;
  }

  async getChildren(node?: TreeNodeModel): Promise<TreeNodeModel[]> {
    if (!node) return (this.roots = await this.datasetRoots());
    if (node.kind !== 'dataset') return node.children ?? [];
    try {
      const overview = await this.overviews.get(node.id);
      node.description = datasetDescription(overview);
      return datasetChildren(node.id, overview);
    } catch (error) {
      const text = error instanceof Error ? error.message : String(error);
      return [{ id: `${node.id}#error`, kind: 'message', label: `Could not read the dataset: ${text}`, tooltip: text }];
    }
  }

  private async datasetRoots(): Promise<TreeNodeModel[]> {
    const manifests = await vscode.workspace.findFiles(`**/${manifestFileName}`, '**/{node_modules,runs}/**', maxDatasets);
    const folders = new Set(manifests.map((m) => path.dirname(m.fsPath)));
    for (const extra of this.state.get<string[]>(extraFoldersKey, [])) folders.add(extra);
    return [...folders]
      .sort((a, b) => path.basename(a).localeCompare(path.basename(b)) || a.localeCompare(b))
      .map((folder) => ({ id: folder, folder, kind: 'dataset' as const, label: path.basename(folder), tooltip: folder }));
  }

  dispose(): void {
    for (const d of this.disposables.splice(0)) d.dispose();
  }
}
