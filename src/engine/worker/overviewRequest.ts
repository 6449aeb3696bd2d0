// The `overview` request: what the dataset tree and the dataset.json overview show.
import * as path from 'node:path';
import { loadDataset } from '../dataset/load';
import { summarizeDataset } from '../dataset/summary';
import { readCandidatesFile } from '../pipeline/candidatesFile';
import { listRuns, runsFolder } from '../pipeline/runStore';
import type { CancelSignal, ProgressSink } from '../util/progress';
import { overviewRunLimit, type DatasetOverview } from '../../protocol/worker';

export async function datasetOverview(folder: string, context: { progress: ProgressSink; cancel: CancelSignal }): Promise<DatasetOverview> {
  const dataset = await loadDataset(folder, context);
  const summary = summarizeDataset(dataset);
  const runs = await listRuns(dataset.folder);
  let latestCandidates: DatasetOverview['latestCandidates'] = null;
  for (const run of runs) {
    if (!run.files.candidates) continue;
    const file = await readCandidatesFile(path.join(runsFolder(dataset.folder), run.runId, run.files.candidates));
    if (!file) continue;
    latestCandidates = {
      runId: run.runId,
      slice: run.slice,
      candidates: file.candidates
        .map((c) => ({ id: c.id, size: c.size, topTerms: c.topTerms.slice(0, 5).map((t) => t.term), looksLikeDrift: c.looksLikeDrift }))
        .sort((a, b) => b.size - a.size || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0)),
    };
    break;
  }
  return { summary, runs: runs.slice(0, overviewRunLimit), latestCandidates };
}
