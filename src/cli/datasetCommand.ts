// The shape shared by the commands that work on one dataset with run settings (score, discover,
// evaluate, doubts, suggest): parse the flags, read the settings, load the dataset, run the
// command's own part, and report any failure against the folder it names.
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

export interface DatasetCommandContext {
  parsed: ParsedArgs;
  settings: RunSettings;
  dataset: Dataset;
}

/** Runs `body` on the dataset named by the first positional; returns its exit code, or the error's. */
export async function runOnDataset(
  args: string[],
  io: CliIo,
  spec: CommandSpec,
  body: (context: DatasetCommandContext) => Promise<number>,
): Promise<number> {
  let folder = '';
  try {
    const parsed = parseArgs(args, spec);
    folder = parsed.positionals[0];
    const settings = runSettingsFromArgs(parsed);
    const dataset = await loadDataset(folder, { cancel: io.cancel });
    return await body({ parsed, settings, dataset });
  } catch (error) {
    return reportError(error, io, spec, folder);
  }
}

/** The run-setting flags of RUN_SETTING_FLAGS a command offers (e.g. rejection and smoothing play no part in the second-look reports). */
export function trainingSettingFlags(names: readonly string[]): CommandSpec['flags'] {
  return RUN_SETTING_FLAGS.filter((flag) => names.includes(flag.name));
}

/** --out and --json of a report command; `what` names the report ("the report", "the suggestions"). */
export function reportOutputFlags(what: string): CommandSpec['flags'] {
  return [
    { name: 'out', value: 'FILE', description: `Also write ${what} (JSON, see docs/second-look.md) to FILE.` },
    { name: 'json', description: `Print ${what} as one JSON object instead of a table.` },
  ];
}

export interface SliceReportRequest extends DatasetCommandContext {
  slice: number;
  /** Stage progress on stderr, or undefined with --json. */
  progress: ProgressSink | undefined;
}

/** A read-only report on one slice (doubts, suggest): printed as a table or JSON, and written to --out. */
export function runSliceReport<R>(
  args: string[],
  io: CliIo,
  spec: CommandSpec,
  compute: (request: SliceReportRequest) => Promise<R>,
  formatTable: (report: R) => string,
): Promise<number> {
  return runOnDataset(args, io, spec, async (context) => {
    const { parsed, dataset } = context;
    const slice = sliceFromArgs(parsed, dataset);
    const report = await compute({ ...context, slice, progress: parsed.has('json') ? undefined : stageProgress(io) });
    await emitReport(parsed, io, report, () => formatTable(report));
    return EXIT.ok;
  });
}
