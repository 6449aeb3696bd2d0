// Shows a dataset's validation problems in the Problems panel, each in the file it names.
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { LocatedProblem } from '../engine/dataset/types';
import { problemPosition } from './problemLocation';

/** End column for problems that name a whole line; VS Code clamps it to the line's length. */
const endOfLine = 1_000_000;

export class ValidationDiagnostics implements vscode.Disposable {
  private readonly collection = vscode.languages.createDiagnosticCollection('graphCurator');
  /** The files each dataset folder last put problems on, so a new validation clears stale ones. */
  private readonly filesByFolder = new Map<string, vscode.Uri[]>();

  show(datasetFolder: string, problems: LocatedProblem[]): void {
    this.clear(datasetFolder);
    const byFile = new Map<string, { uri: vscode.Uri; diagnostics: vscode.Diagnostic[] }>();
    for (const problem of problems) {
      const position = problemPosition(datasetFolder, problem);
      const entry = byFile.get(position.filePath) ?? { uri: vscode.Uri.file(position.filePath), diagnostics: [] };
      const end = position.wholeLine ? endOfLine : position.column;
      const range = new vscode.Range(position.line, position.column, position.line, end);
      const diagnostic = new vscode.Diagnostic(range, problem.message, vscode.DiagnosticSeverity.Error);
      diagnostic.source = 'Graph Curator';
      entry.diagnostics.push(diagnostic);
      byFile.set(position.filePath, entry);
    }
    for (const { uri, diagnostics } of byFile.values()) this.collection.set(uri, diagnostics);
    this.filesByFolder.set(
      datasetFolder,
      [...byFile.values()].map((entry) => entry.uri),
    );
  }

  clear(datasetFolder: string): void {
    for (const uri of this.filesByFolder.get(datasetFolder) ?? []) this.collection.delete(uri);
    this.filesByFolder.delete(datasetFolder);
  }

  /** Clears every dataset folder at or below `deletedPath` (a deleted folder or file). */
  clearWithin(deletedPath: string): void {
    const prefix = deletedPath.endsWith(path.sep) ? deletedPath : deletedPath + path.sep;
    for (const folder of [...this.filesByFolder.keys()]) if (folder === deletedPath || folder.startsWith(prefix)) this.clear(folder);
  }

  dispose(): void {
    this.filesByFolder.clear();
    this.collection.dispose();
  }
}
