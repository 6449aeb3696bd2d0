// Where datasets are on disk, worked out from paths alone (no `vscode`, no engine).
import { promises as fs } from 'node:fs';
import * as path from 'node:path';

export const manifestFileName = 'dataset.json';

/** How many folders above a file are searched for dataset.json when no stop folder is given. */
const maxLevelsUp = 8;

async function isFile(candidate: string): Promise<boolean> {
  try {
    return (await fs.stat(candidate)).isFile();
  } catch {
    return false;
  }
}

/**
 * The dataset folder a file belongs to: the nearest folder, from the file's own folder upwards,
 * that holds dataset.json. The search stops at `stopAt` (e.g. the workspace folder) inclusive.
 */
export async function findDatasetFolder(
  filePath: string,
  stopAt?: string,
  fileExists: (candidate: string) => Promise<boolean> = isFile,
): Promise<string | undefined> {
  const boundary = stopAt === undefined ? undefined : path.resolve(stopAt);
  let folder = path.dirname(path.resolve(filePath));
  for (let level = 0; boundary !== undefined || level <= maxLevelsUp; level++) {
    if (boundary !== undefined && !isSameOrInside(folder, boundary)) return undefined;
    if (await fileExists(path.join(folder, manifestFileName))) return folder;
    const parent = path.dirname(folder);
    if (parent === folder || folder === boundary) return undefined;
    folder = parent;
  }
  return undefined;
}

export function isSameOrInside(candidate: string, folder: string): boolean {
  const relative = path.relative(folder, candidate);
  const leavesFolder = relative === '..' || relative.startsWith(`..${path.sep}`);
  return !leavesFolder && !path.isAbsolute(relative);
}
