// How the label files are committed, decided without vscode so that it can be tested: through
// the git extension's API when nothing else is staged (its commit takes the whole index), or
// through git's command line with `commit --only` when other changes are staged, so that the
// curator's unrelated staged work is never committed with the labels.
import * as path from 'node:path';

export type CommitRoute = { route: 'extension' } | { route: 'command-line'; reason: string } | { route: 'files-only'; reason: string };

/** Same file whatever the spelling (case on case-insensitive systems is left alone). */
function samePath(a: string, b: string): boolean {
  return path.resolve(a) === path.resolve(b);
}

export function otherStagedPaths(staged: readonly string[], labelPaths: readonly string[]): string[] {
  return staged.filter((file) => !labelPaths.some((label) => samePath(file, label)));
}

export function chooseCommitRoute(options: {
  gitExtension: 'enabled' | 'disabled' | 'missing';
  staged: readonly string[];
  labelPaths: readonly string[];
  gitOnPath: boolean;
}): CommitRoute {
  const others = otherStagedPaths(options.staged, options.labelPaths);
  if (options.gitExtension === 'enabled' && others.length === 0) return { route: 'extension' };
  const why =
    options.gitExtension !== 'enabled'
      ? `the git extension is ${options.gitExtension}`
      : `${others.length} other change${others.length === 1 ? ' is' : 's are'} staged (${others
          .slice(0, 3)
          .map((p) => path.basename(p))
          .join(', ')}${others.length > 3 ? ', …' : ''}), which must stay out of this commit`;
  return options.gitOnPath ? { route: 'command-line', reason: why } : { route: 'files-only', reason: `${why}, and git is not on PATH` };
}
