// The small part of the built-in git extension's API (extensions/git/src/api/git.d.ts, version 1)
// that committing label files uses, typed here so that the extension takes no dependency for it.
import type * as vscode from 'vscode';

export interface GitChange {
  readonly uri: vscode.Uri;
}

export interface GitRepositoryState {
  readonly HEAD: { readonly commit?: string; readonly name?: string } | undefined;
  readonly indexChanges: readonly GitChange[];
  readonly workingTreeChanges: readonly GitChange[];
}

export interface GitRepository {
  readonly rootUri: vscode.Uri;
  readonly state: GitRepositoryState;
  /** Paths are file-system paths. */
  add(paths: string[]): Promise<void>;
  commit(message: string, options?: { all?: boolean | 'tracked' }): Promise<void>;
  status(): Promise<void>;
}

export interface GitApi {
  readonly state: 'uninitialized' | 'initialized';
  readonly repositories: readonly GitRepository[];
  getRepository(uri: vscode.Uri): GitRepository | null;
  openRepository?(root: vscode.Uri): Promise<GitRepository | null>;
  init?(root: vscode.Uri): Promise<GitRepository | null | undefined>;
}

export interface GitExtension {
  readonly enabled: boolean;
  getAPI(version: 1): GitApi;
}
