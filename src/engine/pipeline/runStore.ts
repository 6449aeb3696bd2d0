// Results of scoring runs on disk: <dataset>/runs/<runId>/ with run.json (settings, hashes,
// counts, timings), scores.csv (one row per scored node) and embeddings.npy (same row order).
// runs/ carries its own .gitignore so results are never committed with the labels.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { createHash } from 'node:crypto';
import type { Dataset } from '../dataset/types';
import { writeFileAtomic } from '../io/atomicWrite';
import { encodeNpy } from '../io/npy';
import { settingsHash, type RunSettings } from './runSettings';
import { rejectedCount, topOutputs, type SliceScores } from './sliceScores';
import type { CandidatesFile } from './candidatesFile';
import { thresholdFitFileName, writeThresholdFit, type PreviewFit } from './thresholdFitFile';

export const RUNS_FOLDER = 'runs';

export interface RunRecord {
  runId: string;
  createdAt: string;
  dataset: string;
  datasetHashes: Record<string, string>;
  settings: RunSettings;
  settingsHash: string;
  slice: string;
  modelClasses: { name: string; threshold: number }[];
  counts: { scored: number; rejected: number; trainingNodes: number };
  rejectionRate: number;
  timings: Record<string, number>;
  files: { scores: string; embeddings: string; candidates?: string; thresholdFit?: string };
}

export function newRunId(settings: RunSettings, sliceKey: string, now = new Date()): string {
  const stamp = now.toISOString().replace(/[:.]/g, '-');
  const suffix = createHash('sha256')
    .update(settingsHash(settings) + sliceKey + stamp)
    .digest('hex')
    .slice(0, 6);
  return `${stamp}-${sliceKey}-${suffix}`;
}

export function runsFolder(datasetFolder: string): string {
  return path.join(datasetFolder, RUNS_FOLDER);
}

function csvField(value: string): string {
  return /[",\n\r]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

export function formatScoresCsv(dataset: Dataset, scores: SliceScores): string {
  const lines = ['id,slice,predicted,top1,top1_output,top2,top2_output,top3,top3_output,novelty,novelty_smoothed,rejected'];
  for (let i = 0; i < scores.nodes.length; i++) {
    const top = topOutputs(scores, i);
    const cells = [csvField(dataset.nodeIds[scores.nodes[i]]), scores.sliceKey, csvField(scores.modelClassNames[scores.predicted[i]])];
    for (let k = 0; k < 3; k++) {
      cells.push(top[k] ? csvField(top[k].className) : '', top[k] ? top[k].output.toFixed(6) : '');
    }
    cells.push(scores.noveltyRaw[i].toFixed(6), scores.noveltySmoothed[i].toFixed(6), scores.rejected[i] ? '1' : '0');
    lines.push(cells.join(','));
  }
  return lines.join('\n') + '\n';
}

export function runRecordOf(dataset: Dataset, scores: SliceScores, settings: RunSettings, runId: string): RunRecord {
  const rejected = rejectedCount(scores);
  return {
    runId,
    createdAt: new Date().toISOString(),
    dataset: dataset.manifest.name,
    datasetHashes: dataset.contentHashes,
    settings,
    settingsHash: settingsHash(settings),
    slice: scores.sliceKey,
    modelClasses: scores.modelClassNames.map((name, c) => ({ name, threshold: scores.thresholds[c] })),
    counts: { scored: scores.nodes.length, rejected, trainingNodes: scores.trainingNodeCount },
    rejectionRate: scores.nodes.length ? rejected / scores.nodes.length : 0,
    timings: scores.timings,
    files: { scores: 'scores.csv', embeddings: 'embeddings.npy' },
  };
}

/** Writes a run folder; returns its path. */
export async function saveRun(
  dataset: Dataset,
  scores: SliceScores,
  settings: RunSettings,
  extra: { runId?: string; candidates?: CandidatesFile; previewFit?: PreviewFit } = {},
): Promise<{ folder: string; record: RunRecord }> {
  const runId = extra.runId ?? newRunId(settings, scores.sliceKey);
  const root = runsFolder(dataset.folder);
  await fs.mkdir(root, { recursive: true });
  const ignore = path.join(root, '.gitignore');
  await fs.access(ignore).catch(() => writeFileAtomic(ignore, '# scoring results are derived data, never committed with labels\n*\n'));
  const folder = path.join(root, runId);
  await fs.mkdir(folder, { recursive: true });
  const record = runRecordOf(dataset, scores, settings, runId);
  await writeFileAtomic(path.join(folder, 'scores.csv'), formatScoresCsv(dataset, scores));
  await writeFileAtomic(path.join(folder, 'embeddings.npy'), encodeNpy(scores.embeddings, [scores.nodes.length, scores.hiddenUnits]));
  if (extra.candidates) {
    record.files.candidates = 'candidates.json';
    await writeFileAtomic(path.join(folder, 'candidates.json'), JSON.stringify({ ...extra.candidates, runId }, null, 2) + '\n');
  }
  // What threshold previews need when the run is reopened without its fit in memory.
  if (extra.previewFit) {
    await writeThresholdFit(folder, runId, dataset, extra.previewFit, settings);
    record.files.thresholdFit = thresholdFitFileName;
  }
  // run.json last: a run folder without it is incomplete and is ignored by readers.
  await writeFileAtomic(path.join(folder, 'run.json'), JSON.stringify(record, null, 2) + '\n');
  return { folder, record };
}

/** Complete runs (with run.json), newest first. */
export async function listRuns(datasetFolder: string): Promise<RunRecord[]> {
  const root = runsFolder(datasetFolder);
  const names = await fs.readdir(root).catch(() => [] as string[]);
  const records: RunRecord[] = [];
  for (const name of names) {
    try {
      records.push(JSON.parse(await fs.readFile(path.join(root, name, 'run.json'), 'utf8')) as RunRecord);
    } catch {
      // incomplete or foreign folder
    }
  }
  return records.sort((a, b) => b.createdAt.localeCompare(a.createdAt));
}
