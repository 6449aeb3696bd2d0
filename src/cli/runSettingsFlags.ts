// The flags that set a run's settings, shared by score, evaluate and discover.
import type { FlagSpec, ParsedArgs } from './args';
import { UsageError } from './args';
import { modelKinds, type ModelKind } from '../engine/models/types';
import { defaultRunSettings, type NoveltyMethod, type RunSettings } from '../engine/pipeline/runSettings';
import type { Dataset } from '../engine/dataset/types';
import { writeFileAtomic } from '../engine/io/atomicWrite';
import type { CliIo } from './io';

export const RUN_SETTING_FLAGS: FlagSpec[] = [
  { name: 'slice', value: 'T', description: 'Slice key to score (e.g. 2024-Q4); default the newest slice.' },
  {
    name: 'history',
    value: 'H',
    description: `Earlier slices whose labels train the model, or "all" (default ${String(defaultRunSettings.historyWindow)}).`,
  },
  { name: 'model', value: 'KIND', description: `mlp | gcn | sage | sign (default ${defaultRunSettings.model}).` },
  { name: 'seed', value: 'S', description: `Random seed (default ${defaultRunSettings.seed}).` },
  { name: 'alpha', value: 'A', description: `DOC threshold width: threshold = max(0.5, 1 − A·σ) (default ${defaultRunSettings.alpha}).` },
  {
    name: 'threshold-folds',
    value: 'F',
    description: `Cross-fitting folds for the DOC thresholds; 0 fits them on the training outputs (default ${defaultRunSettings.thresholdFolds}).`,
  },
  {
    name: 'threshold-scale',
    value: 'std|mad',
    description: `Spread of the DOC Gaussian fit: standard deviation or robust median absolute deviation (default ${defaultRunSettings.thresholdScale}).`,
  },
  {
    name: 'lambda',
    value: 'L',
    description: `Neighbour smoothing weight, 0 turns it off (default ${defaultRunSettings.smoothingWeight}).`,
  },
  { name: 'rounds', value: 'K', description: `Neighbour smoothing rounds (default ${defaultRunSettings.smoothingRounds}).` },
  { name: 'novelty', value: 'METHOD', description: 'doc | msp | energy (default doc).' },
  {
    name: 'quantile',
    value: 'Q',
    description: 'Reject the fraction Q of the slice with the highest novelty instead of the DOC rule (default for msp and energy: 0.1).',
  },
  { name: 'label-rate', value: 'R', description: "Fraction of the window's labels used for training (default 1)." },
  {
    name: 'epochs',
    value: 'N',
    description: `Training steps: full-batch epochs, or one mini-batch each when the training rows exceed --batch-rows (default ${defaultRunSettings.epochs}).`,
  },
  {
    name: 'batch-rows',
    value: 'B',
    description: `Rows per training mini-batch for mlp and sign, 0 = always full batch (default ${defaultRunSettings.batchRows}).`,
  },
  { name: 'warm', description: "Warm-start each slice from the previous slice's model (trains the chain of slices)." },
];

function numberFlag(args: ParsedArgs, name: string, check: (v: number) => boolean, expectation: string): number | undefined {
  const raw = args.value(name);
  if (raw === undefined) return undefined;
  const value = Number(raw);
  if (raw.trim() === '' || !Number.isFinite(value) || !check(value)) throw new UsageError(`--${name} must be ${expectation}, got "${raw}"`);
  return value;
}

/** A whole-number flag at least `min`, or `fallback` when the flag is absent. */
export function wholeNumberFlag(args: ParsedArgs, name: string, min: number, fallback: number): number {
  return numberFlag(args, name, (v) => Number.isInteger(v) && v >= min, `a whole number ≥ ${min}`) ?? fallback;
}

/** Writes a report to --out (atomically) when asked, and prints it as JSON (--json) or as text. */
export async function emitReport(args: ParsedArgs, io: CliIo, report: unknown, asText: () => string): Promise<void> {
  const json = JSON.stringify(report, null, 2) + '\n';
  const out = args.value('out');
  if (out !== undefined) await writeFileAtomic(out, json);
  io.stdout(args.has('json') ? json : asText());
}

export function runSettingsFromArgs(args: ParsedArgs): RunSettings {
  const settings: RunSettings = { ...defaultRunSettings };
  const history = args.value('history');
  if (history !== undefined) {
    if (history === 'all') settings.historyWindow = 'all';
    else {
      const h = Number(history);
      if (!Number.isInteger(h) || h < 0) throw new UsageError(`--history must be a whole number ≥ 0 or "all", got "${history}"`);
      settings.historyWindow = h;
    }
  }
  const model = args.value('model');
  if (model !== undefined) {
    if (!(modelKinds as readonly string[]).includes(model))
      throw new UsageError(`--model must be one of ${modelKinds.join(', ')}, got "${model}"`);
    settings.model = model as ModelKind;
  }
  const novelty = args.value('novelty');
  if (novelty !== undefined) {
    if (!['doc', 'msp', 'energy'].includes(novelty)) throw new UsageError(`--novelty must be doc, msp or energy, got "${novelty}"`);
    settings.noveltyMethod = novelty as NoveltyMethod;
  }
  settings.seed = numberFlag(args, 'seed', Number.isInteger, 'a whole number') ?? settings.seed;
  settings.alpha = numberFlag(args, 'alpha', (v) => v >= 0, 'a number ≥ 0') ?? settings.alpha;
  settings.thresholdFolds =
    numberFlag(args, 'threshold-folds', (v) => Number.isInteger(v) && (v === 0 || v >= 2), '0 or a whole number ≥ 2') ??
    settings.thresholdFolds;
  const scale = args.value('threshold-scale');
  if (scale !== undefined) {
    if (scale !== 'std' && scale !== 'mad') throw new UsageError(`--threshold-scale must be std or mad, got "${scale}"`);
    settings.thresholdScale = scale;
  }
  settings.smoothingWeight = numberFlag(args, 'lambda', (v) => v >= 0 && v <= 1, 'a number in [0, 1]') ?? settings.smoothingWeight;
  settings.smoothingRounds =
    numberFlag(args, 'rounds', (v) => Number.isInteger(v) && v >= 0, 'a whole number ≥ 0') ?? settings.smoothingRounds;
  settings.rejectQuantile = numberFlag(args, 'quantile', (v) => v > 0 && v < 1, 'a fraction between 0 and 1') ?? settings.rejectQuantile;
  settings.labelRate = numberFlag(args, 'label-rate', (v) => v > 0 && v <= 1, 'a fraction in (0, 1]') ?? settings.labelRate;
  settings.epochs = numberFlag(args, 'epochs', (v) => Number.isInteger(v) && v >= 1, 'a whole number ≥ 1') ?? settings.epochs;
  settings.batchRows = wholeNumberFlag(args, 'batch-rows', 0, settings.batchRows);
  settings.warmStart = args.has('warm');
  return settings;
}

/** Index of the slice named by --slice, or the newest slice. */
export function sliceFromArgs(args: ParsedArgs, dataset: Dataset): number {
  const key = args.value('slice');
  if (key === undefined) return dataset.slices.length - 1;
  const slice = dataset.slices.find((s) => s.key === key);
  if (!slice) {
    const keys = dataset.slices.map((s) => s.key);
    throw new UsageError(
      `--slice ${key} is not a slice of this dataset (slices: ${keys.length > 8 ? `${keys.slice(0, 4).join(', ')}, …, ${keys.slice(-2).join(', ')}` : keys.join(', ')})`,
    );
  }
  return slice.index;
}
