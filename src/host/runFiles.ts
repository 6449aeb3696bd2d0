// The run folders of a dataset as the host needs them (lists, the review panel's run), read with
// plain file reads: run.json files are small. Reading scores and candidates is the worker's job.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import type { RunRecord } from '../engine/pipeline/runStore';

/** Same as the engine's RUNS_FOLDER (src/engine/pipeline/runStore.ts). */
export const runsFolderName = 'runs';
export const pendingDecisionsFileName = 'pending-decisions.json';

export function isRunId(runId: string): boolean {
  return /^[A-Za-z0-9._-]+$/.test(runId) && runId !== '.' && runId !== '..';
}

export function runFolderPath(datasetFolder: string, runId: string): string {
  if (!isRunId(runId)) throw new Error(`"${runId}" is not a run id`);
  return path.join(datasetFolder, runsFolderName, runId);
}

export function pendingDecisionsPath(datasetFolder: string, runId: string): string {
  return path.join(runFolderPath(datasetFolder, runId), pendingDecisionsFileName);
}

function looksLikeRunRecord(value: unknown): value is RunRecord {
  if (typeof value !== 'object' || value === null) return false;
  const record = value as Partial<RunRecord>;
  return (
    typeof record.runId === 'string' &&
    typeof record.createdAt === 'string' &&
    typeof record.slice === 'string' &&
    typeof record.files === 'object' &&
    record.files !== null
  );
}

/** Complete runs (run.json present and readable), newest first. */
export async function listRunRecords(datasetFolder: string): Promise<RunRecord[]> {
  const root = path.join(datasetFolder, runsFolderName);
  const names = await fs.readdir(root).catch(() => [] as string[]);
  const records: RunRecord[] = [];
  await Promise.all(
    names.filter(isRunId).map(async (name) => {
      try {
        const record: unknown = JSON.parse(await fs.readFile(path.join(root, name, 'run.json'), 'utf8'));
        if (looksLikeRunRecord(record) && record.runId === name) records.push(record);
      } catch {
        // an incomplete run (run.json is written last) or a foreign folder
      }
    }),
  );
  return records.sort((a, b) => (a.createdAt < b.createdAt ? 1 : a.createdAt > b.createdAt ? -1 : a.runId < b.runId ? 1 : -1));
}

/** The newest run with candidates, else the newest run. */
export function runToReview(runs: readonly RunRecord[]): RunRecord | undefined {
  return runs.find((run) => run.files.candidates !== undefined) ?? runs[0];
}
