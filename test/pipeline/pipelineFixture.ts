// A small generated wind-farm dataset shared by the pipeline tests (generated once per run).
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { DEFAULT_DEMO_OPTIONS } from '../../demo-data/generator/options';
import { generateDemoDataset } from '../../demo-data/generator/writeDataset';
import { loadDataset } from '../../src/engine/dataset/load';
import type { Dataset } from '../../src/engine/dataset/types';
import { defaultRunSettings, type RunSettings } from '../../src/engine/pipeline/runSettings';

let cached: Promise<{ folder: string; truthFile: string }> | null = null;

/** 600 reports with 16-dimensional Gaussian features (fast to train), seeded. */
export function smallDataset(): Promise<{ folder: string; truthFile: string }> {
  cached ??= (async () => {
    const parent = await fs.mkdtemp(path.join(os.tmpdir(), 'pipeline-test-'));
    const folder = path.join(parent, 'wind-farm');
    await generateDemoDataset({ ...DEFAULT_DEMO_OPTIONS, nodes: 600, features: 16, seed: 3, out: folder });
    return { folder, truthFile: `${folder}.truth.csv` };
  })();
  return cached;
}

export async function loadSmall(): Promise<Dataset> {
  return loadDataset((await smallDataset()).folder);
}

/** Settings that keep a test fast: few epochs, a small hidden layer, no cross-fitting. */
export const quickSettings: RunSettings = { ...defaultRunSettings, epochs: 60, hiddenUnits: 32, thresholdFolds: 0, historyWindow: 'all' };
