// The bundled demo dataset copied into a temporary folder, so tests can change labels without
// touching the bundled copy (its runs/ folder and other leftovers are not copied).
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';

export const bundledDemo = path.resolve(__dirname, '..', '..', 'demo-data', 'wind-farm');
export const bundledTruth = path.resolve(__dirname, '..', '..', 'demo-data', 'wind-farm.truth.csv');

export async function copyDemoDataset(): Promise<string> {
  const parent = await fs.mkdtemp(path.join(os.tmpdir(), 'gc-second-look-'));
  const folder = path.join(parent, 'wind-farm');
  await fs.mkdir(folder);
  for (const entry of await fs.readdir(bundledDemo, { withFileTypes: true })) {
    if (entry.isFile()) await fs.copyFile(path.join(bundledDemo, entry.name), path.join(folder, entry.name));
  }
  return folder;
}

export async function removeDemoCopy(folder: string): Promise<void> {
  await fs.rm(path.dirname(folder), { recursive: true, force: true });
}
