// Whole reports cached on disk under <dataset>/runs/report-cache/<key>.json, keyed by everything
// that can change a figure: the dataset files' content hashes, the settings, the reference file's
// content and the sweep plan. A second report with the same inputs is read back instead of refitted.
import { createHash } from 'node:crypto';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { writeFileAtomic } from '../io/atomicWrite';
import { RUNS_FOLDER, runsFolder } from '../pipeline/runStore';
import { settingsHash, type RunSettings } from '../pipeline/runSettings';
import { HISTORY_WINDOW_SWEEP, LABEL_RATE_SWEEP, REPORT_FORMAT_VERSION, type QualityReport } from './reportTypes';

export const REPORT_CACHE_FOLDER = 'report-cache';

export interface ReportKeyInputs {
  contentHashes: Record<string, string>;
  settings: RunSettings;
  /** SHA-256 of the truth file's bytes; null when the report is measured on labels.csv. */
  referenceSha256: string | null;
  quick: boolean;
}

export function reportCacheKey(inputs: ReportKeyInputs): string {
  const hashes = Object.entries(inputs.contentHashes).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  const material = JSON.stringify({
    format: REPORT_FORMAT_VERSION,
    hashes,
    settings: settingsHash(inputs.settings),
    reference: inputs.referenceSha256,
    quick: inputs.quick,
    historyWindows: HISTORY_WINDOW_SWEEP,
    labelRates: LABEL_RATE_SWEEP,
  });
  return createHash('sha256').update(material).digest('hex').slice(0, 32);
}

export function reportCacheFolder(datasetFolder: string): string {
  return path.join(runsFolder(datasetFolder), REPORT_CACHE_FOLDER);
}

export async function sha256OfFile(file: string): Promise<string> {
  return createHash('sha256')
    .update(await fs.readFile(file))
    .digest('hex');
}

/** The cached report for `key`, or null when absent, unreadable or of another format. */
export async function readCachedReport(cacheFolder: string, key: string): Promise<QualityReport | null> {
  let text: string;
  try {
    text = await fs.readFile(path.join(cacheFolder, `${key}.json`), 'utf8');
  } catch {
    return null;
  }
  try {
    const report = JSON.parse(text) as QualityReport;
    return report.formatVersion === REPORT_FORMAT_VERSION && report.cacheKey === key ? report : null;
  } catch {
    // A damaged cache file only costs a recomputation; it is overwritten below.
    return null;
  }
}

export async function writeCachedReport(cacheFolder: string, report: QualityReport): Promise<void> {
  await fs.mkdir(cacheFolder, { recursive: true });
  const runs = path.dirname(cacheFolder);
  if (path.basename(runs) === RUNS_FOLDER) {
    const ignore = path.join(runs, '.gitignore');
    await fs.access(ignore).catch(() => writeFileAtomic(ignore, '# scoring results are derived data, never committed with labels\n*\n'));
  }
  await writeFileAtomic(path.join(cacheFolder, `${report.cacheKey}.json`), JSON.stringify(report) + '\n');
}
