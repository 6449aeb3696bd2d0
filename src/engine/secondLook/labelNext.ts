// What to label next: the unlabelled nodes of a slice ranked by how much one label is likely to
// help. With q the model's outputs normalised to sum to 1 and u the node's unlabelled neighbours:
//   uncertainty = 1 − (q_top − q_second)                 (in [0, 1]; 1 when the top two tie)
//   usefulness  = uncertainty × (1 + ln(1 + u))
// The margin between the top two classes says where the model is torn; the neighbour factor
// prefers nodes whose label also informs many unlabelled neighbours through message passing,
// growing slowly so that hubs do not crowd out every uncertain node.
import type { Dataset } from '../dataset/types';
import { fitSlice, localNodesOfSlice, type PrefixFit } from '../pipeline/modelOnPrefix';
import { settingsHash, type RunSettings } from '../pipeline/runSettings';
import type { CancelSignal, ProgressSink } from '../util/progress';
import { labelFileHashes, rounded, topClassOutputs } from './classOutputs';
import { normaliseRows } from './confidentJoint';
import { namedCounts, neighbourLabelsOf } from './neighbourLabels';
import type { LabelNextReport, LabelSuggestion } from './reportTypes';

export const defaultSuggestionCount = 20;

export interface LabelNextOptions {
  slice: number;
  count?: number;
  /** Curated labels as global class indices (default dataset.labels). */
  labels?: Int32Array;
  /** A fit of this slice on these labels to reuse instead of training one. */
  fit?: PrefixFit;
  progress?: ProgressSink;
  cancel?: CancelSignal;
}

/** 1 − margin between the two highest shares of a normalised row. */
export function marginUncertainty(shares: ArrayLike<number>): number {
  let top = -Infinity;
  let second = -Infinity;
  for (let c = 0; c < shares.length; c++) {
    if (shares[c] > top) {
      second = top;
      top = shares[c];
    } else if (shares[c] > second) second = shares[c];
  }
  // With a single class there is no second choice: the model cannot be torn.
  return second === -Infinity ? 0 : 1 - (top - second);
}

export function labelUsefulness(uncertainty: number, unlabelledNeighbours: number): number {
  return uncertainty * (1 + Math.log1p(unlabelledNeighbours));
}

export async function suggestLabelNext(dataset: Dataset, settings: RunSettings, options: LabelNextOptions): Promise<LabelNextReport> {
  const count = options.count ?? defaultSuggestionCount;
  if (!Number.isInteger(count) || count < 1) throw new Error(`count must be a whole number ≥ 1, got ${count}`);
  const labels = options.labels ?? dataset.labels;
  const { slice } = options;
  // Suggestions need outputs, not rejection thresholds, so the threshold cross-fitting is skipped.
  const fit =
    options.fit ??
    (await fitSlice(dataset, { ...settings, thresholdFolds: 0 }, slice, {
      labels,
      includeCurrentSlice: true,
      progress: options.progress,
      cancel: options.cancel,
    }));
  if (fit.slice !== slice) throw new Error(`the fit given is of slice ${dataset.slices[fit.slice].key}, not ${dataset.slices[slice].key}`);
  const classCount = fit.modelClasses.length;
  const classNames = Array.from(fit.modelClasses, (g) => dataset.classNames[g]);
  const shares = normaliseRows(fit.probabilities, classCount);

  const ranked: { suggestion: LabelSuggestion; usefulness: number }[] = [];
  let unlabelledInSlice = 0;
  for (const local of localNodesOfSlice(dataset, fit, slice)) {
    const node = fit.prefix.globalIndex[local];
    if (labels[node] >= 0) continue;
    unlabelledInSlice++;
    const rowShares = shares.subarray(local * classCount, (local + 1) * classCount);
    const neighbours = neighbourLabelsOf(local, fit.prefix.inputs.adjacency, fit.prefix.globalIndex, labels);
    const uncertainty = marginUncertainty(rowShares);
    const usefulness = labelUsefulness(uncertainty, neighbours.unlabelled);
    const outputs = topClassOutputs(fit.probabilities.subarray(local * classCount, (local + 1) * classCount), classNames);
    ranked.push({
      usefulness,
      suggestion: {
        rank: 0,
        node: dataset.nodeIds[node],
        slice: dataset.slices[slice].key,
        usefulness: rounded(usefulness),
        uncertainty: rounded(uncertainty),
        unlabelledNeighbours: neighbours.unlabelled,
        neighbourLabels: namedCounts(neighbours.byClass, dataset.classNames),
        predictedLabel: outputs[0].className,
        outputs,
      },
    });
  }
  ranked.sort(
    (a, b) => b.usefulness - a.usefulness || (a.suggestion.node < b.suggestion.node ? -1 : a.suggestion.node > b.suggestion.node ? 1 : 0),
  );
  return {
    format: 'graph-curator-label-next',
    version: 1,
    dataset: dataset.manifest.name,
    slice: dataset.slices[slice].key,
    settingsHash: settingsHash(settings),
    trainingNodes: fit.training.nodes.length,
    unlabelledInSlice,
    classes: classNames,
    baseHashes: labelFileHashes(dataset),
    suggestions: ranked.slice(0, count).map(({ suggestion }, k) => ({ ...suggestion, rank: k + 1 })),
  };
}
