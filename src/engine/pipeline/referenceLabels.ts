// A truth file (id,label) as reference labels for evaluation: classes the dataset does not know
// are appended after dataset.classNames, so their nodes count as unseen.
import { readLabelsCsv } from '../dataset/labelsFile';
import { DatasetError, type Dataset, type LocatedProblem } from '../dataset/types';
import type { ReferenceLabels } from './evaluateSlices';
import * as path from 'node:path';

export async function readTruthFile(dataset: Dataset, filePath: string): Promise<ReferenceLabels> {
  const file = path.basename(filePath);
  const read = await readLabelsCsv(filePath, file);
  const problems: LocatedProblem[] = [...read.problems];
  const classNames = [...dataset.classNames];
  const classIndex = new Map(classNames.map((name, i) => [name, i]));
  const classOfNode = new Int32Array(dataset.nodeIds.length).fill(-1);
  for (const entry of read.entries) {
    const node = dataset.indexOfId.get(entry.id);
    if (node === undefined) {
      problems.push({
        file,
        line: entry.line,
        column: entry.idColumn,
        message: `node "${entry.id}" is not in ${dataset.manifest.files.nodes}`,
      });
      continue;
    }
    let c = classIndex.get(entry.label);
    if (c === undefined) {
      c = classNames.length;
      classNames.push(entry.label);
      classIndex.set(entry.label, c);
    }
    classOfNode[node] = c;
  }
  if (problems.length > 0) throw new DatasetError(problems.slice(0, 1000));
  return { classOfNode, classNames, source: filePath };
}
