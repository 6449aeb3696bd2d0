// Outputs of an already fitted model on another prefix of the graph (a later slice), without
// training: the model's weights are reused as a warm start with zero epochs.
import { trainAndPredict } from '../models/train';
import type { PropagatedFeatures } from '../models/types';
import { sigmoid } from '../scoring/sigmoid';
import type { PrefixFit } from './modelOnPrefix';
import type { PrefixGraph } from './prefixGraph';
import { modelSettingsOf, type RunSettings } from './runSettings';

export async function predictOnPrefix(
  prefix: PrefixGraph,
  fit: PrefixFit,
  settings: RunSettings,
  precomputed?: PropagatedFeatures,
): Promise<Float32Array> {
  const output = await trainAndPredict(
    prefix.inputs,
    { nodeIndex: new Int32Array(0), classIndex: new Int32Array(0), classCount: fit.modelClasses.length },
    { ...modelSettingsOf(settings), epochs: 0 },
    { warmStart: fit.weights, precomputed },
  );
  return sigmoid(output.logits);
}
