import type { CliIo } from '../io';
import type { CommandSpec, ParsedArgs } from '../args';
import { wholeNumberFlag } from '../runSettingsFlags';
import { reportOutputFlags, runSliceReport, trainingSettingFlags } from '../datasetCommand';
import { defaultSuggestionCount, suggestLabelNext } from '../../engine/secondLook/labelNext';
import { formatSuggestionsTable } from '../../engine/secondLook/formatReports';

// Rejection and smoothing settings play no part here, so their flags are not offered.
const USED_SETTING_FLAGS = ['slice', 'history', 'model', 'seed', 'label-rate', 'epochs', 'batch-rows'];

export const spec: CommandSpec = {
  name: 'suggest',
  summary: 'Suggest which unlabelled nodes of a slice to label next.',
  positionals: [{ name: 'folder' }],
  flags: [
    { name: 'count', value: 'N', description: `How many nodes to suggest (default ${defaultSuggestionCount}).` },
    ...reportOutputFlags('the suggestions'),
    ...trainingSettingFlags(USED_SETTING_FLAGS),
  ],
  details:
    'Trains on the history window of the slice (default the newest slice) and ranks its unlabelled nodes by usefulness = uncertainty × (1 + ln(1 + unlabelled neighbours)), where uncertainty is 1 minus the margin between the two highest normalised outputs.',
};

export function countFromArgs(parsed: ParsedArgs): number {
  return wholeNumberFlag(parsed, 'count', 1, defaultSuggestionCount);
}

export function run(args: string[], io: CliIo): Promise<number> {
  return runSliceReport(
    args,
    io,
    spec,
    ({ parsed, dataset, settings, slice, progress }) =>
      suggestLabelNext(dataset, settings, { slice, count: countFromArgs(parsed), progress, cancel: io.cancel }),
    formatSuggestionsTable,
  );
}
