// Small dataset folders written to temporary directories for the dataset and CLI tests.
import { promises as fs } from 'node:fs';
import { createHash } from 'node:crypto';
import * as os from 'node:os';
import * as path from 'node:path';

export async function makeTempDir(prefix = 'gc-dataset-'): Promise<string> {
  return fs.mkdtemp(path.join(os.tmpdir(), prefix));
}

export async function removeDir(dir: string): Promise<void> {
  await fs.rm(dir, { recursive: true, force: true });
}

export type FolderFiles = Record<string, string | Uint8Array | null>;

/** Writes files into dir; a null value deletes that file. */
export async function writeFolder(dir: string, files: FolderFiles): Promise<void> {
  for (const [name, content] of Object.entries(files)) {
    const target = path.join(dir, name);
    if (content === null) await fs.rm(target, { force: true });
    else await fs.writeFile(target, content);
  }
}

/** A valid dataset: 5 nodes over 3 quarters, 4 edges, 2 classes, numeric feature columns. */
export const VALID_FILES: Record<string, string> = {
  'dataset.json': JSON.stringify(
    {
      name: 'tiny',
      time: { column: 'time', granularity: 'quarter' },
      nodeColumns: { id: 'id', text: ['title'], features: ['x', 'y'] },
      features: { source: 'columns' },
    },
    null,
    2,
  ),
  'nodes.csv':
    'id,time,title,x,y\nn1,2021-01-15,blade crack,1,0\nn2,2021-02-01,gearbox oil,0,1\nn3,2021-05-20,blade erosion,1,1\nn4,2021-08-02,tower bolt,0.5,2\nn5,2021-08-03,gearbox noise,-1,3.5\n',
  'edges.csv': 'source,target\nn1,n2\nn2,n3\nn3,n4\nn4,n5\n',
  'labels.csv': 'id,label\nn1,blade\nn2,gearbox\nn5,gearbox\n',
  'classes.json': JSON.stringify(
    {
      classes: [
        { name: 'gearbox', description: 'drive train', introducedIn: '2021-Q1', status: 'active' },
        { name: 'blade', description: '', introducedIn: '2021-Q1', status: 'active' },
      ],
    },
    null,
    2,
  ),
};

export async function writeValidDataset(dir: string, overrides: FolderFiles = {}): Promise<void> {
  await writeFolder(dir, { ...VALID_FILES, ...overrides });
}

/** name → sha256 of every file in dir (recursively), to prove nothing was written. */
export async function hashFolder(dir: string): Promise<Record<string, string>> {
  const out: Record<string, string> = {};
  for (const entry of await fs.readdir(dir, { withFileTypes: true, recursive: true })) {
    if (!entry.isFile()) continue;
    const full = path.join(entry.parentPath ?? (entry as unknown as { path: string }).path, entry.name);
    out[path.relative(dir, full)] = createHash('sha256')
      .update(await fs.readFile(full))
      .digest('hex');
  }
  return out;
}
