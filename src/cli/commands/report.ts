import * as path from 'node:path';
import type { CliIo } from '../io';
import { EXIT } from '../io';
import { parseArgs, UsageError, type CommandSpec } from '../args';
import { reportError } from '../command';
import { RUN_SETTING_FLAGS, runSettingsFromArgs } from '../runSettingsFlags';
import { stageProgress } from '../progressLine';
import { loadDataset } from '../../engine/dataset/load';
import { writeFileAtomic } from '../../engine/io/atomicWrite';
import { buildReport } from '../../engine/report/buildReport';
import { QUICK_SWEEP_EPOCHS, QUICK_SWEEP_SLICES } from '../../engine/report/settingSweeps';
import { renderReportDocument } from '../../report/renderReport';

export const spec: CommandSpec = {
  name: 'report',
  summary:
    'Write a self-contained HTML report of quality over time: graph model against the MLP baseline, warm against cold start, history-window and label-rate sweeps.',
  positionals: [{ name: 'folder' }],
  flags: [
    { name: 'html', value: 'FILE', description: 'Where to write the report (one HTML file that opens offline).' },
    { name: 'truth', value: 'FILE', description: 'Held-out true labels (id,label); classes absent from labels.csv count as unseen.' },
    { name: 'json', value: 'FILE', description: 'Also write the report data as JSON.' },
    {
      name: 'quick',
      description: `Sweeps on the newest ${QUICK_SWEEP_SLICES} slices with at most ${QUICK_SWEEP_EPOCHS} epochs (the main evaluation is unchanged).`,
    },
    { name: 'no-cache', description: 'Recompute even if runs/report-cache holds a report for the same inputs.' },
    ...RUN_SETTING_FLAGS.filter((f) => f.name !== 'slice'),
  ],
  details:
    'The report fits a warm and a cold chain of models over every slice for the graph model and the MLP baseline, then sweeps the history window (1, 2, 3, 5, all) and the label rate (10% to 90%).\n' +
    'Results are cached in <folder>/runs/report-cache by the dataset files, the settings, the truth file and --quick, so repeating the command with the same inputs is instant.',
};

export async function run(args: string[], io: CliIo): Promise<number> {
  let folder = '';
  try {
    const parsed = parseArgs(args, spec);
    folder = parsed.positionals[0];
    const htmlPath = parsed.value('html');
    if (htmlPath === undefined) throw new UsageError('--html FILE is required');
    const jsonPath = parsed.value('json');
    const settings = runSettingsFromArgs(parsed);
    const dataset = await loadDataset(folder, { cancel: io.cancel });
    const { report, fromCache } = await buildReport(dataset, {
      settings,
      truthFile: parsed.value('truth') ?? null,
      quick: parsed.has('quick'),
      useCache: !parsed.has('no-cache'),
      progress: stageProgress(io),
      cancel: io.cancel,
    });
    await writeFileAtomic(path.resolve(htmlPath), renderReportDocument(report));
    if (jsonPath !== undefined) await writeFileAtomic(path.resolve(jsonPath), JSON.stringify(report, null, 2) + '\n');
    const source = fromCache ? `from the cache (computed ${report.createdAt})` : `computed in ${report.computeSeconds.toFixed(1)} s`;
    io.stdout(
      `wrote ${htmlPath}${jsonPath !== undefined ? ` and ${jsonPath}` : ''}: ${report.evaluation.slices.length} slices, ${source}\n`,
    );
    return EXIT.ok;
  } catch (error) {
    return reportError(error, io, spec, folder);
  }
}
