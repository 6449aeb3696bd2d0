import type { CliIo } from '../io';
import { EXIT } from '../io';
import { parseArgs, type CommandSpec } from '../args';
import { reportError } from '../command';
import { loadDataset } from '../../engine/dataset/load';
import { formatSummaryText, summarizeDataset } from '../../engine/dataset/summary';

export const spec: CommandSpec = {
  name: 'summary',
  summary: 'Nodes and edges per time slice, labels per class, unlabelled share.',
  positionals: [{ name: 'folder' }],
  flags: [{ name: 'json', description: 'Print the summary as JSON.' }],
};

export async function run(args: string[], io: CliIo): Promise<number> {
  let folder = '';
  try {
    const parsed = parseArgs(args, spec);
    folder = parsed.positionals[0];
    const summary = summarizeDataset(await loadDataset(folder, { cancel: io.cancel }));
    io.stdout(parsed.has('json') ? JSON.stringify(summary, null, 2) + '\n' : formatSummaryText(summary));
    return EXIT.ok;
  } catch (error) {
    return reportError(error, io, spec, folder);
  }
}
