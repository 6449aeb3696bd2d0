import type { CliIo } from '../io';
import { EXIT } from '../io';
import { parseArgs, type CommandSpec, type ParsedArgs } from '../args';
import { reportError } from '../command';
import { emitReport, RUN_SETTING_FLAGS, runSettingsFromArgs, sliceFromArgs, wholeNumberFlag } from '../runSettingsFlags';
import { stageProgress } from '../progressLine';
import { loadDataset } from '../../engine/dataset/load';
import { defaultSuggestionCount, suggestLabelNext } from '../../engine/secondLook/labelNext';
import { formatSuggestionsTable } from '../../engine/secondLook/formatReports';

// Rejection and smoothing settings play no part here, so their flags are not offered.
const USED_SETTING_FLAGS = ['slice', 'history', 'model', 'seed', 'label-rate', 'epochs'];

export const spec: CommandSpec = {
  name: 'suggest',
  summary: 'Suggest which unlabelled nodes of a slice to label next.',
  positionals: [{ name: 'folder' }],
  flags: [
    { name: 'count', value: 'N', description: `How many nodes to suggest (default ${defaultSuggestionCount}).` },
    { name: 'out', value: 'FILE', description: 'Also write the suggestions (JSON, see docs/second-look.md) to FILE.' },
    { name: 'json', description: 'Print the suggestions as one JSON object instead of a table.' },
    ...RUN_SETTING_FLAGS.filter((f) => USED_SETTING_FLAGS.includes(f.name)),
  ],
  details:
    'Trains on the history window of the slice (default the newest slice) and ranks its unlabelled nodes by usefulness = uncertainty × (1 + ln(1 + unlabelled neighbours)), where uncertainty is 1 minus the margin between the two highest normalised outputs.',
};

export function countFromArgs(parsed: ParsedArgs): number {
  return wholeNumberFlag(parsed, 'count', 1, defaultSuggestionCount);
}

export async function run(args: string[], io: CliIo): Promise<number> {
  let folder = '';
  try {
    const parsed = parseArgs(args, spec);
    folder = parsed.positionals[0];
    const settings = runSettingsFromArgs(parsed);
    const count = countFromArgs(parsed);
    const dataset = await loadDataset(folder, { cancel: io.cancel });
    const slice = sliceFromArgs(parsed, dataset);
    const report = await suggestLabelNext(dataset, settings, {
      slice,
      count,
      progress: parsed.has('json') ? undefined : stageProgress(io),
      cancel: io.cancel,
    });
    await emitReport(parsed, io, report, () => formatSuggestionsTable(report));
    return EXIT.ok;
  } catch (error) {
    return reportError(error, io, spec, folder);
  }
}
