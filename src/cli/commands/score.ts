import { runOnDataset } from '../datasetCommand';
import type { CliIo } from '../io';
import { EXIT } from '../io';
import type { CommandSpec } from '../args';
import { RUN_SETTING_FLAGS, sliceFromArgs } from '../runSettingsFlags';
import { scoreSlice } from '../../engine/pipeline/scoreSlice';
import { formatScoresCsv, newRunId, saveRun } from '../../engine/pipeline/runStore';
import { discoverForFit } from '../../engine/pipeline/discoverSlice';
import { formatCandidateLines } from '../candidateLines';
import { rejectedCount } from '../../engine/pipeline/sliceScores';
import { describeWindow } from '../../engine/pipeline/runSettings';
import { writeFileAtomic } from '../../engine/io/atomicWrite';
import { stageProgress } from '../progressLine';

export const spec: CommandSpec = {
  name: 'score',
  summary: 'Train on the history window of a slice, score every node of the slice, and save a run.',
  positionals: [{ name: 'folder' }],
  flags: [
    ...RUN_SETTING_FLAGS,
    { name: 'out', value: 'FILE', description: 'Also write the per-node results (CSV) to FILE.' },
    { name: 'quiet', description: 'Print only the run folder.' },
    { name: 'no-discover', description: 'Skip grouping the rejected nodes into candidate classes.' },
  ],
  details:
    'Writes runs/<run id>/ inside the dataset folder: run.json (settings, hashes, counts, timings), scores.csv (one row per node of the slice), embeddings.npy (hidden layer, same row order) and candidates.json (the rejected nodes grouped into candidate classes).\nModel suggestions are not decisions: a person reviews every label change.',
};

export function run(args: string[], io: CliIo): Promise<number> {
  return runOnDataset(args, io, spec, async ({ parsed, settings, dataset }) => {
    const slice = sliceFromArgs(parsed, dataset);
    const progress = parsed.has('quiet') ? undefined : stageProgress(io);
    const { scores, fit } = await scoreSlice(dataset, settings, slice, { progress, cancel: io.cancel });
    const runId = newRunId(settings, scores.sliceKey);
    progress?.report('discover', 0);
    const candidates = parsed.has('no-discover') ? undefined : await discoverForFit(dataset, fit, scores, settings, runId);
    const { folder: runFolder, record } = await saveRun(dataset, scores, settings, { runId, candidates, previewFit: fit });
    const out = parsed.value('out');
    if (out !== undefined) await writeFileAtomic(out, formatScoresCsv(dataset, scores));
    if (parsed.has('quiet')) {
      io.stdout(runFolder + '\n');
      return EXIT.ok;
    }
    const rejected = rejectedCount(scores);
    const lines = [
      `slice ${scores.sliceKey}: ${scores.nodes.length} nodes scored by ${settings.model} trained on ${scores.trainingNodeCount} labelled nodes (${describeWindow(settings.historyWindow)} and the slice itself)`,
      `rejected ${rejected} of ${scores.nodes.length} (${((100 * rejected) / Math.max(1, scores.nodes.length)).toFixed(1)}%) as fitting no known class`,
      `classes and rejection thresholds: ${record.modelClasses.map((c) => `${c.name} ${c.threshold.toFixed(3)}`).join(', ')}`,
      `timings (s): ${Object.entries(scores.timings)
        .map(([k, v]) => `${k} ${v.toFixed(2)}`)
        .join(', ')}`,
      ...(candidates ? formatCandidateLines(candidates) : []),
      `run saved to ${runFolder}`,
    ];
    io.stdout(lines.join('\n') + '\n');
    return EXIT.ok;
  });
}
