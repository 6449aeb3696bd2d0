import type { CliIo } from '../io';
import type { CommandSpec, ParsedArgs } from '../args';
import { wholeNumberFlag } from '../runSettingsFlags';
import { reportOutputFlags, runSliceReport, trainingSettingFlags } from '../datasetCommand';
import { defaultDoubtFolds, findDoubtfulLabels } from '../../engine/secondLook/doubts';
import { formatDoubtsTable } from '../../engine/secondLook/formatReports';

// Rejection and smoothing settings play no part here, so their flags are not offered.
const USED_SETTING_FLAGS = ['slice', 'history', 'model', 'seed', 'epochs', 'batch-rows'];

export const spec: CommandSpec = {
  name: 'doubts',
  summary: 'Flag curated labels that models trained without them, and their neighbours, disagree with.',
  positionals: [{ name: 'folder' }],
  flags: [
    {
      name: 'folds',
      value: 'K',
      description: `Cross-fitting folds: each label is judged by a model trained on the other folds (default ${defaultDoubtFolds}).`,
    },
    { name: 'all', description: 'List every checked label, not only the doubtful ones.' },
    ...reportOutputFlags('the report'),
    ...trainingSettingFlags(USED_SETTING_FLAGS),
  ],
  details:
    'Checks the curated labels of the history window of the slice (default the newest slice). A label is doubtful when its score is above 0.5 (the out-of-fold outputs and the labelled neighbours lean towards another class) or confident learning counts it off the diagonal of its confident joint.\nNothing is changed: resolve each doubt in the review panel or with a decisions file (move-members or keep-label).',
};

export function foldsFromArgs(parsed: ParsedArgs): number {
  return wholeNumberFlag(parsed, 'folds', 2, defaultDoubtFolds);
}

export function run(args: string[], io: CliIo): Promise<number> {
  return runSliceReport(
    args,
    io,
    spec,
    ({ parsed, dataset, settings, slice, progress }) =>
      findDoubtfulLabels(dataset, settings, {
        slice,
        folds: foldsFromArgs(parsed),
        keep: parsed.has('all') ? 'all' : 'doubtful',
        progress,
        cancel: io.cancel,
      }),
    formatDoubtsTable,
  );
}
