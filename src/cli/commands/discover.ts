import { runOnDataset } from '../datasetCommand';
import * as path from 'node:path';
import type { CliIo } from '../io';
import { EXIT } from '../io';
import { UsageError, type CommandSpec } from '../args';
import { RUN_SETTING_FLAGS, sliceFromArgs } from '../runSettingsFlags';
import { stageProgress } from '../progressLine';
import { formatCandidateLines } from '../candidateLines';
import { scoreSlice } from '../../engine/pipeline/scoreSlice';
import { discoverForFit, discoverInSpace, previousCandidates } from '../../engine/pipeline/discoverSlice';
import { candidatesFileOf, type CandidatesFile } from '../../engine/pipeline/candidatesFile';
import { readExternalScores } from '../../engine/pipeline/externalScores';
import { newRunId, saveRun } from '../../engine/pipeline/runStore';
import { writeFileAtomic } from '../../engine/io/atomicWrite';

export const spec: CommandSpec = {
  name: 'discover',
  summary: 'Group the rejected nodes of a slice into candidate new classes and write them as JSON.',
  positionals: [{ name: 'folder' }],
  flags: [
    { name: 'scores', value: 'FILE', description: 'Novelty scores computed elsewhere: CSV with id,score[,predicted][,rejected].' },
    {
      name: 'embeddings',
      value: 'FILE',
      description: 'With --scores: .npy of embeddings, one row per CSV row (default: the CSV name with .npy).',
    },
    {
      name: 'threshold',
      value: 'X',
      description: 'With --scores and no rejected column: reject nodes whose score is above X (default 0).',
    },
    { name: 'out', value: 'FILE', description: 'Write the candidates JSON here (default: candidates.json in the new run folder).' },
    { name: 'json', description: 'Print the candidates JSON instead of a summary.' },
    ...RUN_SETTING_FLAGS,
  ],
  details:
    'Without --scores, the slice is scored first as `score` does and the run is saved with its candidates.\nCandidate ids stay stable across runs: a candidate overlapping an earlier one (Jaccard ≥ 0.5) keeps its id and any decision made on it.',
};

export function run(args: string[], io: CliIo): Promise<number> {
  return runOnDataset(args, io, spec, async ({ parsed, settings, dataset }) => {
    const slice = sliceFromArgs(parsed, dataset);
    const scoresPath = parsed.value('scores');
    const out = parsed.value('out');
    let candidates: CandidatesFile;
    let savedTo: string | null = null;
    if (scoresPath !== undefined) {
      const embeddingsPath = parsed.value('embeddings') ?? scoresPath.replace(/\.csv$/i, '') + '.npy';
      const thresholdText = parsed.value('threshold') ?? '0';
      const threshold = Number(thresholdText);
      if (!Number.isFinite(threshold)) throw new UsageError(`--threshold must be a number, got "${thresholdText}"`);
      const space = await readExternalScores(dataset, scoresPath, embeddingsPath, {
        threshold,
        slice: parsed.value('slice') === undefined ? null : slice,
      });
      const sliceKey = dataset.slices[slice].key;
      const previous = await previousCandidates(dataset, sliceKey, (g) => g);
      const result = discoverInSpace(dataset, space, settings.seed, previous);
      candidates = candidatesFileOf(dataset, result, (l) => l, {
        runId: null,
        slice: sliceKey,
        scoresSource: path.basename(scoresPath),
        rejectedCount: space.rejected.length,
      });
    } else {
      const progress = parsed.has('json') ? undefined : stageProgress(io);
      const { scores, fit } = await scoreSlice(dataset, settings, slice, { progress, cancel: io.cancel });
      const runId = newRunId(settings, scores.sliceKey);
      candidates = await discoverForFit(dataset, fit, scores, settings, runId);
      savedTo = (await saveRun(dataset, scores, settings, { runId, candidates, previewFit: fit })).folder;
    }
    const text = JSON.stringify(candidates, null, 2) + '\n';
    if (out !== undefined) await writeFileAtomic(out, text);
    if (parsed.has('json')) io.stdout(text);
    else {
      io.stdout(formatCandidateLines(candidates, 20).join('\n') + '\n');
      if (out !== undefined) io.stdout(`candidates written to ${out}\n`);
      if (savedTo) io.stdout(`run saved to ${savedTo}\n`);
    }
    return EXIT.ok;
  });
}
