// Shared by the demo-data tests: generate into a fresh temporary folder and read the files back
// with csv-parse (an independent RFC 4180 parser), never with the generator's own code.
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { parse } from 'csv-parse/sync';
import { DEFAULT_DEMO_OPTIONS, type DemoOptions } from '../../demo-data/generator/options';
import { generateDemoDataset, type DemoSummary } from '../../demo-data/generator/writeDataset';

export interface Generated {
  folder: string;
  truthFile: string;
  summary: DemoSummary;
}

const made: string[] = [];

export async function generateInTemp(overrides: Partial<DemoOptions>): Promise<Generated> {
  const parent = await fs.mkdtemp(path.join(os.tmpdir(), 'demo-data-test-'));
  made.push(parent);
  const folder = path.join(parent, 'wind-farm');
  const summary = await generateDemoDataset({ ...DEFAULT_DEMO_OPTIONS, ...overrides, out: folder });
  return { folder, truthFile: `${folder}.truth.csv`, summary };
}

export async function removeTemporaryFolders(): Promise<void> {
  while (made.length > 0) await fs.rm(made.pop()!, { recursive: true, force: true });
}

export async function readCsv(file: string): Promise<Record<string, string>[]> {
  return parse<Record<string, string>>(await fs.readFile(file, 'utf8'), { columns: true, skip_empty_lines: true });
}

export async function readJson<T>(file: string): Promise<T> {
  return JSON.parse(await fs.readFile(file, 'utf8')) as T;
}

/** "2021-05-17" → "2021-Q2". */
export function quarterOf(date: string): string {
  return `${date.slice(0, 4)}-Q${Math.floor((Number(date.slice(5, 7)) - 1) / 3) + 1}`;
}
