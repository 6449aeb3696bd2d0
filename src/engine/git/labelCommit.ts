// Committing a dataset's label files (labels.csv, classes.json, label-log.jsonl, as named in its
// dataset.json) and nothing else.
import { labelFileNamesOf } from '../decisions/labelFiles';
import { commitFiles, type GitOptions, type LabelCommit } from './gitCli';

/** Absolute paths of the dataset's label files. */
export async function labelFilePaths(folder: string): Promise<string[]> {
  const { paths } = await labelFileNamesOf(folder);
  return [paths.labels, paths.classes, paths.log];
}

/**
 * Commits the dataset's label files with `message`; returns the new commit, or null when they
 * do not differ from the last commit. Throws NotInRepositoryError outside a work tree.
 */
export async function commitLabelFiles(folder: string, message: string, options: GitOptions = {}): Promise<LabelCommit | null> {
  return commitFiles(folder, await labelFilePaths(folder), message, options);
}
