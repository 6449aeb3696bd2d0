// What a threshold preview needs from a run's fit, saved in the run folder so that previews work
// when a saved run is reopened (after a window reload, in a new worker) without scoring again.
// The graph is not saved: it is the dataset's prefix graph up to the run's slice, rebuilt on load.
//
//   threshold-fit.json          format, version, run id, slice, prefix size, novelty method,
//                               smoothing rounds, model classes, and every field of the DOC
//                               threshold fit (typed arrays by file or inline, other values as they are)
//   threshold-outputs.npy       float32, prefix nodes × model classes: the model's outputs
//                               (raw novelty, prefix nodes × 1, for the msp and energy methods)
//   threshold-fit-<field>.npy   float32 fields of the threshold fit (e.g. its probabilities), flat
//
// The .npy files are written first and threshold-fit.json last, each atomically: a folder without
// the JSON has no saved fit, and one with it has all its files.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { parseJsonWithPositions } from '../dataset/jsonPositions';
import type { Dataset } from '../dataset/types';
import { writeFileAtomic } from '../io/atomicWrite';
import { encodeNpy, parseNpy } from '../io/npy';
import type { PrefixFit, ThresholdFit } from './modelOnPrefix';
import { prefixGraph } from './prefixGraph';
import type { NoveltyMethod } from './runSettings';

export const thresholdFitFileName = 'threshold-fit.json';
const outputsFileName = 'threshold-outputs.npy';
const format = 'graph-curator-threshold-fit';
const version = 1;

/** One field of the threshold fit as threshold-fit.json holds it. */
type SavedField = { float32File: string; length: number } | { int32: number[] } | { value: string | number | boolean | null };

interface ThresholdFitJson {
  format: typeof format;
  version: typeof version;
  runId: string;
  slice: string;
  sliceIndex: number;
  prefixNodes: number;
  noveltyMethod: NoveltyMethod;
  smoothingRounds: number;
  modelClasses: number[];
  outputs: { file: string; kind: 'probabilities' | 'novelty-raw'; shape: number[] };
  thresholdFit: Record<string, SavedField> | null;
}

/** The part of a run's fit a threshold preview reads (see thresholdPreviewInputOf). */
export type PreviewFit = Pick<PrefixFit, 'slice' | 'prefix' | 'modelClasses' | 'probabilities' | 'noveltyRaw' | 'thresholdFit'>;

export interface SavedThresholdFit {
  fit: PreviewFit;
  noveltyMethod: NoveltyMethod;
  smoothingRounds: number;
}

export async function writeThresholdFit(
  runFolder: string,
  runId: string,
  dataset: Dataset,
  fit: PreviewFit,
  settings: { noveltyMethod: NoveltyMethod; smoothingRounds: number },
): Promise<void> {
  const prefixNodes = fit.prefix.globalIndex.length;
  const classCount = fit.modelClasses.length;
  const doc = settings.noveltyMethod === 'doc';
  const outputs = doc ? fit.probabilities : fit.noveltyRaw;
  const shape = doc ? [prefixNodes, classCount] : [prefixNodes, 1];
  await writeFileAtomic(path.join(runFolder, outputsFileName), encodeNpy(outputs, shape));
  let savedFit: Record<string, SavedField> | null = null;
  if (doc) {
    savedFit = {};
    for (const [field, value] of Object.entries(fit.thresholdFit)) {
      if (value instanceof Float32Array) {
        const file = `threshold-fit-${field}.npy`;
        await writeFileAtomic(path.join(runFolder, file), encodeNpy(value, [value.length]));
        savedFit[field] = { float32File: file, length: value.length };
      } else if (value instanceof Int32Array) savedFit[field] = { int32: Array.from(value) };
      else if (value === null || ['string', 'number', 'boolean'].includes(typeof value))
        savedFit[field] = { value: value as string | number | boolean | null };
      else throw new Error(`threshold fit field "${field}" cannot be saved (${Object.prototype.toString.call(value)})`);
    }
  }
  const json: ThresholdFitJson = {
    format,
    version,
    runId,
    slice: dataset.slices[fit.slice]?.key ?? String(fit.slice),
    sliceIndex: fit.slice,
    prefixNodes,
    noveltyMethod: settings.noveltyMethod,
    smoothingRounds: settings.smoothingRounds,
    modelClasses: Array.from(fit.modelClasses),
    outputs: { file: outputsFileName, kind: doc ? 'probabilities' : 'novelty-raw', shape },
    thresholdFit: savedFit,
  };
  await writeFileAtomic(path.join(runFolder, thresholdFitFileName), JSON.stringify(json) + '\n');
}

async function readFloat32(folder: string, file: string, expectedLength: number): Promise<Float32Array> {
  if (path.basename(file) !== file) throw new Error(`${thresholdFitFileName}: "${file}" is not a file name in the run folder`);
  const matrix = parseNpy(new Uint8Array(await fs.readFile(path.join(folder, file))), file);
  if (matrix.data.length !== expectedLength)
    throw new Error(`${file}: ${matrix.data.length} values where ${thresholdFitFileName} says ${expectedLength}`);
  return matrix.data;
}

/**
 * The saved fit of a run, with the prefix graph rebuilt from `dataset`; null when the run folder
 * has none (a run saved before this file existed). Throws, naming the file, when it is damaged or
 * no longer matches the dataset (nodes added to the run's slices since).
 */
export async function readThresholdFit(runFolder: string, dataset: Dataset): Promise<SavedThresholdFit | null> {
  const file = path.join(runFolder, thresholdFitFileName);
  let text: string;
  try {
    text = await fs.readFile(file, 'utf8');
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return null;
    throw error;
  }
  let json: ThresholdFitJson;
  try {
    json = JSON.parse(text) as ThresholdFitJson;
  } catch (error) {
    // Parsed again only to say where: the located parser throws naming file, line and column.
    parseJsonWithPositions(text, file);
    throw new Error(`${file}: ${(error as Error).message}`);
  }
  if (json?.format !== format || json.version !== version) throw new Error(`${file}: not a ${format} file of version ${version}`);
  const sliceIndex = dataset.slices.findIndex((s) => s.key === json.slice);
  if (sliceIndex < 0) throw new Error(`${file}: slice "${json.slice}" is not in dataset "${dataset.manifest.name}"`);
  const prefix = prefixGraph(dataset, sliceIndex);
  if (prefix.globalIndex.length !== json.prefixNodes)
    throw new Error(
      `${file}: the run scored ${json.prefixNodes} nodes up to slice ${json.slice}, the dataset now has ${prefix.globalIndex.length}; score the slice again for threshold previews`,
    );
  const classCount = json.modelClasses.length;
  const doc = json.outputs.kind === 'probabilities';
  const outputs = await readFloat32(runFolder, json.outputs.file, json.prefixNodes * (doc ? classCount : 1));
  const thresholdFit: Record<string, unknown> = {};
  for (const [field, saved] of Object.entries(json.thresholdFit ?? {})) {
    if ('float32File' in saved) thresholdFit[field] = await readFloat32(runFolder, saved.float32File, saved.length);
    else if ('int32' in saved) thresholdFit[field] = Int32Array.from(saved.int32);
    else thresholdFit[field] = saved.value;
  }
  return {
    fit: {
      slice: sliceIndex,
      prefix,
      modelClasses: Int32Array.from(json.modelClasses),
      probabilities: doc ? outputs : new Float32Array(0),
      noveltyRaw: doc ? new Float32Array(0) : outputs,
      thresholdFit: thresholdFit as unknown as ThresholdFit,
    },
    noveltyMethod: json.noveltyMethod,
    smoothingRounds: json.smoothingRounds,
  };
}
