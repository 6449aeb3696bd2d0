// Commits a dataset's label files (and only them) after an apply: through the built-in git
// extension when it is enabled and nothing else is staged, else through the engine worker's git
// command line (`commit --only -- <label files>`), else not at all (the files stay written).
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { HostServices } from '../hostServices';
import { chooseCommitRoute } from './commitRoute';
import type { GitApi, GitExtension, GitRepository } from './gitApi';

export type CommitReport =
  { committed: true; commit: string; via: 'git extension' | 'git command line' } | { committed: false; why: string };

async function gitApi(): Promise<{ state: 'enabled'; api: GitApi } | { state: 'disabled' | 'missing' }> {
  const extension = vscode.extensions.getExtension<GitExtension>('vscode.git');
  if (!extension) return { state: 'missing' };
  try {
    const exports = extension.isActive ? extension.exports : await extension.activate();
    if (!exports?.enabled) return { state: 'disabled' };
    return { state: 'enabled', api: exports.getAPI(1) };
  } catch {
    return { state: 'disabled' };
  }
}

async function repositoryOf(api: GitApi, folder: string): Promise<GitRepository | null> {
  const uri = vscode.Uri.file(folder);
  return api.getRepository(uri) ?? (api.openRepository ? await api.openRepository(uri).catch(() => null) : null);
}

async function offerInit(folder: string): Promise<boolean> {
  const choice = await vscode.window.showWarningMessage(
    `The dataset folder ${path.basename(folder)} is in no git repository, so the label changes were written but not committed.`,
    { modal: true, detail: 'Initialise a repository in the dataset folder and commit the label files?' },
    'Initialise Repository',
  );
  return choice === 'Initialise Repository';
}

export async function commitLabelFiles(
  services: HostServices,
  folder: string,
  allLabelPaths: string[],
  message: string,
): Promise<CommitReport> {
  // classes.json or the log may not exist (nothing was ever written to them): git cannot add those.
  const present = await Promise.all(
    allLabelPaths.map((file) =>
      fs.stat(file).then(
        (s) => s.isFile(),
        () => false,
      ),
    ),
  );
  const labelPaths = allLabelPaths.filter((_, k) => present[k]);
  const git = await gitApi();
  let repository: GitRepository | null = null;
  if (git.state === 'enabled') {
    repository = await repositoryOf(git.api, folder);
    if (!repository) {
      if (!(await offerInit(folder))) return { committed: false, why: 'the folder is in no git repository' };
      repository = git.api.init ? ((await git.api.init(vscode.Uri.file(folder))) ?? null) : null;
      if (!repository) return viaCommandLine(services, folder, message, true);
    }
    await repository.status();
  }
  const staged = repository ? repository.state.indexChanges.map((c) => c.uri.fsPath) : [];
  const route = chooseCommitRoute({ gitExtension: git.state, staged, labelPaths, gitOnPath: true });
  if (route.route !== 'extension' || !repository) {
    services.output.appendLine(
      `Committing the label files with git's command line: ${route.route === 'extension' ? 'no repository from the git extension' : route.reason}.`,
    );
    return viaCommandLine(services, folder, message, false);
  }
  await repository.add(labelPaths);
  await repository.status();
  // Checked again after staging: something may have been staged meanwhile.
  const again = chooseCommitRoute({
    gitExtension: 'enabled',
    staged: repository.state.indexChanges.map((c) => c.uri.fsPath),
    labelPaths,
    gitOnPath: true,
  });
  if (again.route !== 'extension') return viaCommandLine(services, folder, message, false);
  if (repository.state.indexChanges.length === 0) return { committed: false, why: 'the label files match the last commit' };
  await repository.commit(message);
  await repository.status();
  return { committed: true, commit: repository.state.HEAD?.commit ?? '(unknown)', via: 'git extension' };
}

async function viaCommandLine(services: HostServices, folder: string, message: string, initialise: boolean): Promise<CommitReport> {
  try {
    let outcome = await services.client.request('commitLabels', { folder, message, initialise });
    if (outcome.outcome === 'no-repository') {
      if (!(await offerInit(folder))) return { committed: false, why: 'the folder is in no git repository' };
      outcome = await services.client.request('commitLabels', { folder, message, initialise: true });
    }
    if (outcome.outcome === 'committed') return { committed: true, commit: outcome.commit, via: 'git command line' };
    if (outcome.outcome === 'nothing-to-commit') return { committed: false, why: 'the label files match the last commit' };
    return { committed: false, why: 'the folder is in no git repository' };
  } catch (error) {
    const text = error instanceof Error ? error.message : String(error);
    services.output.appendLine(`Commit of the label files failed: ${text}`);
    return { committed: false, why: `git failed: ${text}` };
  }
}
