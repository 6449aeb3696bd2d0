// Checking a dataset folder without loading it for work: every problem in every file, located.
// Never writes.
import * as path from 'node:path';
import type { LocatedProblem } from './types';
import { readDatasetFolder } from './load';
import { readLabelLog } from './labelLog';
import type { CancelSignal, ProgressSink } from '../util/progress';

export async function validateDatasetFolder(
  folder: string,
  options: { progress?: ProgressSink; cancel?: CancelSignal } = {},
): Promise<LocatedProblem[]> {
  const { manifest, problems } = await readDatasetFolder(folder, options);
  if (!manifest) return problems;
  const log = await readLabelLog(path.join(path.resolve(folder), manifest.files.log), manifest.files.log);
  return [...problems, ...log.problems];
}
