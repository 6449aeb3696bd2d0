// What to label next, measured: closed-set accuracy after adding 50 labels chosen by
// `suggestLabelNext` versus 50 chosen at random (and 50 chosen by uncertainty alone), the added
// labels taken from the truth file, averaged over a few seeds. Prints figures; never pass/fail.
// Run alone: npx tsx bench/labelNext.ts
import * as path from 'node:path';
import { loadDataset } from '../src/engine/dataset/load';
import type { Dataset } from '../src/engine/dataset/types';
import { fitSlice, type PrefixFit } from '../src/engine/pipeline/modelOnPrefix';
import { readTruthFile } from '../src/engine/pipeline/referenceLabels';
import type { ReferenceLabels } from '../src/engine/pipeline/evaluateSlices';
import { defaultRunSettings, type RunSettings } from '../src/engine/pipeline/runSettings';
import { firstWindowSlice } from '../src/engine/pipeline/trainingWindow';
import { suggestLabelNext } from '../src/engine/secondLook/labelNext';
import { SeededRandom } from '../src/engine/util/random';

const projectRoot = path.resolve(__dirname, '..');
const strategies = ['none', 'suggested', 'uncertainty only', 'random'] as const;
type Strategy = (typeof strategies)[number];

interface Accuracy {
  newestSlice: number;
  window: number;
}

function accuracyOf(fit: PrefixFit, truth: ReferenceLabels, nodes: number[]): number {
  const classCount = fit.modelClasses.length;
  let correct = 0;
  for (const node of nodes) {
    const local = fit.prefix.localIndex[node];
    let best = 0;
    for (let c = 1; c < classCount; c++)
      if (fit.probabilities[local * classCount + c] > fit.probabilities[local * classCount + best]) best = c;
    if (fit.modelClasses[best] === truth.classOfNode[node]) correct++;
  }
  return nodes.length === 0 ? NaN : correct / nodes.length;
}

async function fitWith(
  dataset: Dataset,
  settings: RunSettings,
  slice: number,
  added: number[],
  truth: ReferenceLabels,
): Promise<PrefixFit> {
  const labels = dataset.labels.slice();
  // A truth class the dataset does not know yet gets an index past classNames: the curator would name it.
  for (const node of added) labels[node] = truth.classOfNode[node];
  return fitSlice(dataset, settings, slice, { labels, includeCurrentSlice: true });
}

export async function runLabelNextBenchmark(
  print: (line: string) => void,
  seeds: readonly number[] = [1, 2, 3],
  added = 50,
): Promise<void> {
  const dataset = await loadDataset(path.join(projectRoot, 'demo-data', 'wind-farm'));
  const truth = await readTruthFile(dataset, path.join(projectRoot, 'demo-data', 'wind-farm.truth.csv'));
  const slice = dataset.slices.length - 1;
  const base: RunSettings = { ...defaultRunSettings, epochs: 100, hiddenUnits: 32, thresholdFolds: 0 };
  const first = firstWindowSlice(slice, base.historyWindow);
  const unlabelledNewest: number[] = [];
  for (let node = 0; node < dataset.nodeIds.length; node++)
    if (dataset.nodeSlice[node] === slice && dataset.labels[node] < 0) unlabelledNewest.push(node);
  print(
    `label next: wind-farm demo, slice ${dataset.slices[slice].key}, ${unlabelledNewest.length} unlabelled nodes in it; ${added} labels added from the truth file; ` +
      `sign, history ${String(base.historyWindow)}, ${base.epochs} epochs, ${base.hiddenUnits} hidden units; seeds ${seeds.join(', ')}`,
  );
  print(
    'accuracy = closed-set accuracy (argmax class equals the true class; unseen classes count as wrong unless added) on unlabelled nodes picked by no strategy',
  );

  const totals = new Map<Strategy, Accuracy>(strategies.map((s) => [s, { newestSlice: 0, window: 0 }]));
  for (const seed of seeds) {
    const settings = { ...base, seed };
    const started = performance.now();
    const baseFit = await fitSlice(dataset, settings, slice, { labels: dataset.labels, includeCurrentSlice: true });
    const ranking = await suggestLabelNext(dataset, settings, { slice, count: unlabelledNewest.length, fit: baseFit });
    const nodeOf = (id: string) => dataset.indexOfId.get(id) as number;
    const picks: Record<Strategy, number[]> = {
      none: [],
      suggested: ranking.suggestions.slice(0, added).map((s) => nodeOf(s.node)),
      'uncertainty only': ranking.suggestions
        .slice()
        .sort((a, b) => b.uncertainty - a.uncertainty || (a.node < b.node ? -1 : 1))
        .slice(0, added)
        .map((s) => nodeOf(s.node)),
      random: new SeededRandom(1000 + seed).shuffle(unlabelledNewest.slice()).slice(0, added),
    };
    const pickedByAny = new Set(Object.values(picks).flat());
    const evalNewest = unlabelledNewest.filter((n) => !pickedByAny.has(n) && truth.classOfNode[n] >= 0);
    const evalWindow: number[] = [];
    for (let node = 0; node < dataset.nodeIds.length; node++) {
      const s = dataset.nodeSlice[node];
      if (s >= first && s <= slice && dataset.labels[node] < 0 && !pickedByAny.has(node) && truth.classOfNode[node] >= 0)
        evalWindow.push(node);
    }
    const cells: string[] = [];
    for (const strategy of strategies) {
      const fit = strategy === 'none' ? baseFit : await fitWith(dataset, settings, slice, picks[strategy], truth);
      const accuracy = { newestSlice: accuracyOf(fit, truth, evalNewest), window: accuracyOf(fit, truth, evalWindow) };
      const total = totals.get(strategy) as Accuracy;
      total.newestSlice += accuracy.newestSlice / seeds.length;
      total.window += accuracy.window / seeds.length;
      const unseen = picks[strategy].filter((n) => truth.classOfNode[n] >= dataset.classNames.length).length;
      cells.push(
        `${strategy} ${accuracy.newestSlice.toFixed(3)} / ${accuracy.window.toFixed(3)}${strategy === 'none' ? '' : ` (${unseen} of unseen classes)`}`,
      );
    }
    print(
      `  seed ${seed} (eval ${evalNewest.length} newest-slice / ${evalWindow.length} window nodes, ${((performance.now() - started) / 1000).toFixed(1)} s): ${cells.join('; ')}`,
    );
  }
  print('  mean accuracy, newest slice / whole window:');
  for (const strategy of strategies) {
    const total = totals.get(strategy) as Accuracy;
    print(`    ${strategy.padEnd(17)} ${total.newestSlice.toFixed(3)} / ${total.window.toFixed(3)}`);
  }
  const suggested = totals.get('suggested') as Accuracy;
  const random = totals.get('random') as Accuracy;
  print(
    `  suggested minus random: ${(suggested.newestSlice - random.newestSlice).toFixed(3)} (newest slice), ${(suggested.window - random.window).toFixed(3)} (window)`,
  );
}

if (require.main === module) {
  runLabelNextBenchmark((line) => console.log(line)).catch((error) => {
    console.error(error);
    process.exit(1);
  });
}
