// The shape shared by the read-only report commands (doubts, suggest): parse the flags, load the
// dataset, pick the slice, compute the report with progress on stderr (none with --json), and
// print it or write it to --out.
import type { CliIo } from './io';
import { EXIT } from './io';
import { parseArgs, type CommandSpec, type ParsedArgs } from './args';
import { reportError } from './command';
import { emitReport, RUN_SETTING_FLAGS, runSettingsFromArgs, sliceFromArgs } from './runSettingsFlags';
import { stageProgress } from './progressLine';
import { loadDataset } from '../engine/dataset/load';
import type { Dataset } from '../engine/dataset/types';
import type { RunSettings } from '../engine/pipeline/runSettings';
import type { ProgressSink } from '../engine/util/progress';

/** The run-setting flags of RUN_SETTING_FLAGS a report command offers (rejection and smoothing play no part in these reports). */
export function trainingSettingFlags(names: readonly string[]): CommandSpec['flags'] {
  return RUN_SETTING_FLAGS.filter((flag) => names.includes(flag.name));
}

export interface SliceReportRequest {
  parsed: ParsedArgs;
  dataset: Dataset;
  settings: RunSettings;
  slice: number;
  progress: ProgressSink | undefined;
}

export async function runSliceReport<R>(
  args: string[],
  io: CliIo,
  spec: CommandSpec,
  compute: (request: SliceReportRequest) => Promise<R>,
  formatTable: (report: R) => string,
): Promise<number> {
  let folder = '';
  try {
    const parsed = parseArgs(args, spec);
    folder = parsed.positionals[0];
    const settings = runSettingsFromArgs(parsed);
    const dataset = await loadDataset(folder, { cancel: io.cancel });
    const slice = sliceFromArgs(parsed, dataset);
    const report = await compute({ parsed, dataset, settings, slice, progress: parsed.has('json') ? undefined : stageProgress(io) });
    await emitReport(parsed, io, report, () => formatTable(report));
    return EXIT.ok;
  } catch (error) {
    return reportError(error, io, spec, folder);
  }
}
