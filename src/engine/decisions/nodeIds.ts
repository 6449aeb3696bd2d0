// The node ids of nodes.csv, read without building the dataset (no features, no edges): all an
// apply needs to reject decisions naming nodes that do not exist.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { DatasetError, type DatasetManifest, type LocatedProblem } from '../dataset/types';
import { readCsvFile, requireColumns } from '../dataset/csv';

export async function readNodeIds(folder: string, manifest: DatasetManifest): Promise<Set<string>> {
  const file = manifest.files.nodes;
  const filePath = path.join(folder, file);
  if (
    !(await fs.stat(filePath).then(
      (s) => s.isFile(),
      () => false,
    ))
  )
    throw new DatasetError([{ file, line: 0, column: 0, message: 'file not found' }]);
  const ids = new Set<string>();
  const headerProblems: LocatedProblem[] = [];
  let idIndex = -1;
  const result = await readCsvFile(
    filePath,
    file,
    (row) => {
      if (idIndex >= 0 && row.fields[idIndex] !== '') ids.add(row.fields[idIndex]);
    },
    {
      onHeader: (header) =>
        ([idIndex] = requireColumns(
          header,
          file,
          [{ name: manifest.nodeColumns.id, role: 'nodeColumns.id in dataset.json' }],
          headerProblems,
        )),
    },
  );
  // Other problems of nodes.csv (times, features) do not matter for checking ids; these do.
  if (headerProblems.length > 0 || result.fatal) throw new DatasetError([...headerProblems, ...(result.fatal ? result.problems : [])]);
  return ids;
}
