// Chooses the dataset folder a command works on: an explicit resource (explorer context menu),
// else the dataset of the active editor's file, else one of the workspace's dataset.json files.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { findDatasetFolder, manifestFileName } from './datasetPaths';

/** How many dataset.json files the quick pick lists at most. */
const maxManifestsListed = 200;

export async function chooseDatasetFolder(resource?: unknown): Promise<string | undefined> {
  // { folder } from the dataset tree, the overview editor's links and the review commands.
  if (typeof resource === 'object' && resource !== null && typeof (resource as { folder?: unknown }).folder === 'string') {
    const folder = await findDatasetFolder(path.join((resource as { folder: string }).folder, manifestFileName));
    if (folder) return folder;
  }
  if (resource instanceof vscode.Uri && resource.scheme === 'file') {
    const folder = await datasetFolderOf(resource);
    if (folder) return folder;
  }
  const active = vscode.window.activeTextEditor?.document.uri;
  if (active?.scheme === 'file') {
    const folder = await datasetFolderOf(active);
    if (folder) return folder;
  }
  return pickFromWorkspace();
}

/** The dataset folder holding `uri` (a file or the folder itself), searched no higher than its workspace folder. */
export async function datasetFolderOf(uri: vscode.Uri): Promise<string | undefined> {
  const workspaceFolder = vscode.workspace.getWorkspaceFolder(uri)?.uri.fsPath;
  const isFolder = await vscode.workspace.fs.stat(uri).then(
    (stat) => (stat.type & vscode.FileType.Directory) !== 0,
    () => false,
  );
  const start = isFolder ? path.join(uri.fsPath, manifestFileName) : uri.fsPath;
  return findDatasetFolder(start, workspaceFolder);
}

async function pickFromWorkspace(): Promise<string | undefined> {
  const manifests = await vscode.workspace.findFiles(`**/${manifestFileName}`, '**/node_modules/**', maxManifestsListed);
  if (manifests.length === 0) {
    void vscode.window.showWarningMessage(`No ${manifestFileName} found in this workspace. Open a dataset folder first.`);
    return undefined;
  }
  if (manifests.length === 1) return path.dirname(manifests[0].fsPath);
  const items = manifests
    .map((manifest) => {
      const folder = path.dirname(manifest.fsPath);
      return { label: path.basename(folder), description: vscode.workspace.asRelativePath(folder), folder };
    })
    .sort((a, b) => a.description.localeCompare(b.description));
  const picked = await vscode.window.showQuickPick(items, { placeHolder: 'Choose a dataset folder', matchOnDescription: true });
  return picked?.folder;
}
