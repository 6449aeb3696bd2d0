// Reads a saved scoring run (runs/<runId>/: run.json, scores.csv, embeddings.npy, candidates.json)
// back into what a review session takes: a ReviewContext over the whole dataset and the run's
// candidates. Node ids the dataset no longer has (nodes.csv edited since the run) are dropped.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import type { Dataset } from '../dataset/types';
import { parseCsvBytes } from '../dataset/csv';
import { buildAdjacency, type CsrMatrix } from '../graph/csr';
import { parseNpy } from '../io/npy';
import { readCandidatesFile, type CandidateRecord, type CandidatesFile } from '../pipeline/candidatesFile';
import { runsFolder, type RunRecord } from '../pipeline/runStore';
import type { SliceScores } from '../pipeline/sliceScores';
import { reviewContextOf, type ReviewContext } from '../../review/reviewContext';
import type { ReviewCandidate } from '../../review/reviewCandidate';

export const pendingDecisionsFileName = 'pending-decisions.json';

/** A run folder name as newRunId makes it: no separators, nothing that leaves runs/. */
export function isRunId(runId: string): boolean {
  return /^[A-Za-z0-9._-]+$/.test(runId) && runId !== '.' && runId !== '..';
}

export function runFolderOf(datasetFolder: string, runId: string): string {
  if (!isRunId(runId)) throw new Error(`"${runId}" is not a run id`);
  return path.join(runsFolder(datasetFolder), runId);
}

export async function readRunRecord(datasetFolder: string, runId: string): Promise<RunRecord> {
  const file = path.join(runFolderOf(datasetFolder, runId), 'run.json');
  let text: string;
  try {
    text = await fs.readFile(file, 'utf8');
  } catch {
    throw new Error(`run ${runId} has no run.json in ${path.dirname(file)} (incomplete or removed run)`);
  }
  try {
    return JSON.parse(text) as RunRecord;
  } catch (error) {
    throw new Error(`${file}: ${(error as Error).message}`);
  }
}

/** The slice's scores as scores.csv and embeddings.npy hold them, in row order. */
export async function readRunScores(dataset: Dataset, record: RunRecord, runFolder: string): Promise<SliceScores> {
  const scoresFile = path.join(runFolder, record.files.scores);
  const bytes = new Uint8Array(await fs.readFile(scoresFile));
  const modelClassNames = record.modelClasses.map((c) => c.name);
  const modelIndex = new Map(modelClassNames.map((name, index) => [name, index]));
  let columns: Record<string, number> = {};
  const rows: { node: number; row: number; predicted: number; novelty: number; rejected: number }[] = [];
  let rowNumber = 0;
  const parsed = parseCsvBytes(
    bytes,
    record.files.scores,
    (row) => {
      const at = rowNumber++;
      const node = dataset.indexOfId.get(row.fields[columns.id]);
      if (node === undefined) return;
      rows.push({
        node,
        row: at,
        predicted: modelIndex.get(row.fields[columns.predicted]) ?? 0,
        novelty: Number(row.fields[columns.novelty_smoothed]),
        rejected: row.fields[columns.rejected] === '1' ? 1 : 0,
      });
    },
    {
      onHeader: (header) => {
        columns = Object.fromEntries(header.fields.map((name, index) => [name, index]));
      },
    },
  );
  for (const name of ['id', 'predicted', 'novelty_smoothed', 'rejected']) {
    if (columns[name] === undefined) throw new Error(`${scoresFile}: no "${name}" column`);
  }
  if (parsed.problems.length > 0) throw new Error(`${scoresFile}: ${parsed.problems[0].message} (line ${parsed.problems[0].line})`);

  const matrix = parseNpy(new Uint8Array(await fs.readFile(path.join(runFolder, record.files.embeddings))), record.files.embeddings);
  const hiddenUnits = matrix.shape[1] ?? 0;
  if (matrix.shape[0] !== rowNumber)
    throw new Error(`${record.files.embeddings} has ${matrix.shape[0]} rows for ${rowNumber} rows of ${record.files.scores}`);
  const source = matrix.data;
  const count = rows.length;
  const embeddings = new Float32Array(count * hiddenUnits);
  rows.forEach((r, i) => embeddings.set(source.subarray(r.row * hiddenUnits, (r.row + 1) * hiddenUnits), i * hiddenUnits));
  const sliceIndex = dataset.slices.findIndex((s) => s.key === record.slice);
  return {
    sliceIndex,
    sliceKey: record.slice,
    modelClassNames,
    nodes: Int32Array.from(rows, (r) => r.node),
    predicted: Int32Array.from(rows, (r) => r.predicted),
    probabilities: new Float32Array(0),
    noveltyRaw: Float32Array.from(rows, (r) => r.novelty),
    noveltySmoothed: Float32Array.from(rows, (r) => r.novelty),
    rejected: Uint8Array.from(rows, (r) => r.rejected),
    embeddings,
    hiddenUnits,
    thresholds: Float32Array.from(record.modelClasses, (c) => c.threshold),
    trainingNodeCount: record.counts.trainingNodes,
    timings: record.timings,
  };
}

export function reviewCandidateOf(record: CandidateRecord, dataset: Dataset): ReviewCandidate | null {
  const members = record.members.map((id) => dataset.indexOfId.get(id)).filter((node): node is number => node !== undefined);
  if (members.length === 0) return null;
  return {
    id: record.id,
    members: Int32Array.from(members).sort(),
    sliceCounts: record.sliceCounts.map((s) => ({ ...s })),
    topTerms: record.topTerms.map((t) => ({ ...t })),
    nearestMembers: record.nearestMembers.flatMap((m) => {
      const node = dataset.indexOfId.get(m.id);
      return node === undefined ? [] : [{ node, distance: m.distance, text: m.text }];
    }),
    neighbourClasses: record.neighbourClasses.map((c) => ({ ...c })),
    meanNovelty: record.meanNovelty,
    cohesion: record.cohesion,
    looksLikeDrift: record.looksLikeDrift,
    driftTowards: record.driftTowards,
  };
}

export interface RunForReview {
  record: RunRecord;
  runFolder: string;
  context: ReviewContext;
  candidates: ReviewCandidate[];
  candidatesFile: CandidatesFile | null;
}

export async function readRunForReview(dataset: Dataset, runId: string, adjacency?: CsrMatrix): Promise<RunForReview> {
  const runFolder = runFolderOf(dataset.folder, runId);
  const record = await readRunRecord(dataset.folder, runId);
  if (record.dataset !== dataset.manifest.name)
    throw new Error(`run ${runId} was made on dataset "${record.dataset}", not "${dataset.manifest.name}"`);
  const scores = await readRunScores(dataset, record, runFolder);
  const graph = adjacency ?? buildAdjacency(dataset.nodeIds.length, dataset.edges, true);
  const context = reviewContextOf(dataset, scores, graph, { runId: record.runId, settingsHash: record.settingsHash });
  // Conflicts are judged against the label files as the run read them, not as they are now.
  context.baseHashes = { ...record.datasetHashes };
  const candidatesFile = record.files.candidates ? await readCandidatesFile(path.join(runFolder, record.files.candidates)) : null;
  const candidates = (candidatesFile?.candidates ?? [])
    .map((c) => reviewCandidateOf(c, dataset))
    .filter((c): c is ReviewCandidate => c !== null);
  return { record, runFolder, context, candidates, candidatesFile };
}
