import { runOnDataset } from '../datasetCommand';
import type { CliIo } from '../io';
import { EXIT } from '../io';
import type { CommandSpec } from '../args';
import { RUN_SETTING_FLAGS } from '../runSettingsFlags';
import { stageProgress } from '../progressLine';
import { evaluateSlices } from '../../engine/pipeline/evaluateSlices';
import { readTruthFile } from '../../engine/pipeline/referenceLabels';
import { formatEvaluation } from '../../engine/pipeline/formatEvaluation';

export const spec: CommandSpec = {
  name: 'evaluate',
  summary: 'Fit a model for every slice and report quality over time, graph model beside the MLP baseline.',
  positionals: [{ name: 'folder' }],
  flags: [
    { name: 'truth', value: 'FILE', description: 'Held-out true labels (id,label); classes absent from labels.csv count as unseen.' },
    { name: 'json', description: 'Print the report as one JSON object.' },
    ...RUN_SETTING_FLAGS.filter((f) => f.name !== 'slice'),
  ],
  details:
    'With --truth, every curated label trains and the truth file tests (training nodes are left out of the test). Without it, each slice is tested on its own labels by a model trained on earlier slices.\nWith --warm, the cold-start chain is fitted too and the report gives warm minus cold per slice.',
};

export function run(args: string[], io: CliIo): Promise<number> {
  return runOnDataset(args, io, spec, async ({ parsed, settings, dataset }) => {
    const truthPath = parsed.value('truth');
    const reference = truthPath === undefined ? null : await readTruthFile(dataset, truthPath);
    const report = await evaluateSlices(dataset, settings, {
      reference,
      compareColdStart: settings.warmStart,
      progress: parsed.has('json') ? undefined : stageProgress(io),
      cancel: io.cancel,
    });
    io.stdout(parsed.has('json') ? JSON.stringify(report, null, 2) + '\n' : formatEvaluation(report));
    return EXIT.ok;
  });
}
