// The whole scoring pipeline at benchmark sizes, stage by stage (load, propagate, train, score,
// smooth) with time and peak memory, beside the PyTorch reference script on the same folder
// when python3-torch is installed. Prints figures; never fails on time.
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { loadDataset } from '../src/engine/dataset/load';
import type { Dataset } from '../src/engine/dataset/types';
import { fitSlice, type PrefixFit } from '../src/engine/pipeline/modelOnPrefix';
import type { ReferenceLabels } from '../src/engine/pipeline/evaluateSlices';
import { readTruthFile } from '../src/engine/pipeline/referenceLabels';
import { prefixGraph } from '../src/engine/pipeline/prefixGraph';
import { defaultRunSettings } from '../src/engine/pipeline/runSettings';
import { precomputePropagation } from '../src/engine/models/train';
import { initTensorflow } from '../src/engine/tf/backend';
import { formatBytes, peakMemoryBytes, resetPeakMemory } from './peakMemory';

const projectRoot = path.resolve(__dirname, '..');

function generate(nodes: number, features: number, edgesPerNode: number): string {
  const folder = path.join(os.tmpdir(), `graph-curator-bench-${nodes}-${features}-${edgesPerNode}`);
  if (!existsSync(path.join(folder, 'dataset.json'))) {
    mkdirSync(path.dirname(folder), { recursive: true });
    execFileSync(
      process.execPath,
      [
        path.join(projectRoot, 'dist', 'demo-generator.js'),
        '--nodes',
        String(nodes),
        '--features',
        String(features),
        '--edges-per-node',
        String(edgesPerNode),
        '--seed',
        '11',
        '--out',
        folder,
      ],
      { stdio: 'inherit' },
    );
  }
  return folder;
}

/** Debian's python3-torch lives under /usr/bin/python3, which another python3 on PATH may shadow. */
function torchPython(): string | null {
  for (const python of ['/usr/bin/python3', 'python3']) {
    if (spawnSync(python, ['-c', 'import torch'], { stdio: 'ignore' }).status === 0) return python;
  }
  return null;
}

function runTorch(folder: string): Record<string, number> | null {
  const script = path.resolve(projectRoot, '..', 'shared', 'reference', 'torch_pipeline.py');
  const python = torchPython();
  // BENCH_SKIP_TORCH=1 skips the reference run, e.g. when re-measuring our side only.
  if (!existsSync(script) || !python || process.env.BENCH_SKIP_TORCH === '1') return null;
  const result = spawnSync(python, [script, folder, '--threads', '2'], { encoding: 'utf8', env: { ...process.env } });
  if (result.status !== 0) return null;
  const stages: Record<string, number> = {};
  for (const line of result.stdout.split('\n')) {
    const m = /^(\w+) ([\d.]+)$/.exec(line.trim());
    if (m) stages[m[1]] = Number(m[2]);
  }
  return stages;
}

interface StageFigure {
  seconds: number;
  peakBytes: number;
}

async function measure<T>(figures: Record<string, StageFigure>, stage: string, work: () => Promise<T> | T): Promise<T> {
  resetPeakMemory();
  const started = performance.now();
  const result = await work();
  figures[stage] = { seconds: (performance.now() - started) / 1000, peakBytes: peakMemoryBytes() };
  return result;
}

export async function runPipelineBenchmark(nodes: number, print: (line: string) => void): Promise<void> {
  const folder = generate(nodes, 128, 10);
  const figures: Record<string, StageFigure> = {};
  const backend = await initTensorflow();
  const totalStarted = performance.now();
  resetPeakMemory();
  const dataset = await measure(figures, 'load', () => loadDataset(folder));
  const lastSlice = dataset.slices.length - 1;
  // Same work as the reference script: every curated label trains, every node is scored.
  // BENCH_BATCH_ROWS=0 measures full-batch training for comparison.
  const batchRows = process.env.BENCH_BATCH_ROWS ? Number(process.env.BENCH_BATCH_ROWS) : defaultRunSettings.batchRows;
  const settings = { ...defaultRunSettings, historyWindow: 'all' as const, batchRows };
  const prefix = await measure(figures, 'graph', () => prefixGraph(dataset, lastSlice));
  const propagated = await measure(figures, 'propagate', () => precomputePropagation(prefix.inputs, 2));
  const fit = await measure(figures, 'train+score+smooth', () =>
    fitSlice(dataset, settings, lastSlice, { labels: dataset.labels, includeCurrentSlice: true, prefix, precomputed: propagated }),
  );
  const totalSeconds = (performance.now() - totalStarted) / 1000;
  let rejected = 0;
  for (const s of fit.noveltySmoothed) if (s > 0) rejected++;
  print(
    `pipeline: ${dataset.nodeIds.length} nodes, ${dataset.edges.count} edges, ${dataset.featureDim} features, ${fit.training.nodes.length} training nodes, batch rows ${batchRows || 'all'}, backend ${backend}`,
  );
  const torch = runTorch(folder);
  print(
    `  stage                 ours (s)   peak memory   ${torch ? 'PyTorch (s)   ratio' : process.env.BENCH_SKIP_TORCH === '1' ? '(PyTorch run skipped: BENCH_SKIP_TORCH=1)' : '(PyTorch not installed: apt-get install -y python3-torch to compare)'}`,
  );
  const rows: [string, number, number | undefined][] = [
    ['load', figures.load.seconds, torch?.load],
    ['graph (CSR)', figures.graph.seconds, undefined],
    ['propagate', figures.propagate.seconds, torch?.propagate],
    ['train', fit.timings.train ?? 0, torch?.train],
    ['score', fit.timings.score ?? 0, torch?.score],
    ['smooth', fit.timings.smooth ?? 0, torch?.smooth],
    ['total', totalSeconds, torch?.total],
  ];
  for (const [name, ours, reference] of rows) {
    const peak =
      name === 'total'
        ? Math.max(...Object.values(figures).map((f) => f.peakBytes))
        : (figures[name === 'graph (CSR)' ? 'graph' : name]?.peakBytes ?? figures['train+score+smooth'].peakBytes);
    const comparison = reference !== undefined ? `${reference.toFixed(2).padStart(11)}   ${(ours / reference).toFixed(2)}x` : '';
    print(`  ${name.padEnd(20)} ${ours.toFixed(2).padStart(9)}   ${formatBytes(peak).padStart(11)}   ${comparison}`);
  }
  print(`  rejected ${rejected} of ${fit.noveltySmoothed.length}`);
  print(
    `  timings of the fit (s): ${Object.entries(fit.timings)
      .map(([k, v]) => `${k} ${v.toFixed(2)}`)
      .join(', ')}`,
  );
  const truthFile = `${folder}.truth.csv`;
  if (existsSync(truthFile))
    print(`  against ${path.basename(truthFile)}: ${qualityAgainstTruth(dataset, fit, await readTruthFile(dataset, truthFile))}`);
}

/** Accuracy on unlabelled known-class nodes and rejection rates of known and unseen nodes: speed is only worth having at equal quality. */
function qualityAgainstTruth(dataset: Dataset, fit: PrefixFit, truth: ReferenceLabels): string {
  const knownClasses = dataset.classNames.length;
  const classCount = fit.modelClasses.length;
  let known = 0;
  let right = 0;
  let knownRejected = 0;
  let unseen = 0;
  let unseenRejected = 0;
  for (let node = 0; node < dataset.nodeIds.length; node++) {
    const actual = truth.classOfNode[node];
    const local = fit.prefix.localIndex[node];
    if (actual < 0 || local < 0 || dataset.labels[node] >= 0) continue;
    const isRejected = fit.noveltySmoothed[local] > 0;
    if (actual >= knownClasses) {
      unseen++;
      if (isRejected) unseenRejected++;
      continue;
    }
    known++;
    if (isRejected) knownRejected++;
    let best = 0;
    for (let c = 1; c < classCount; c++)
      if (fit.probabilities[local * classCount + c] > fit.probabilities[local * classCount + best]) best = c;
    if (fit.modelClasses[best] === actual) right++;
  }
  const share = (a: number, b: number) => (b === 0 ? 'n/a' : (a / b).toFixed(3));
  return `accuracy on ${known} unlabelled known-class nodes ${share(right, known)}; rejected: known ${share(knownRejected, known)}, unseen-class ${share(unseenRejected, unseen)} of ${unseen}`;
}

if (process.argv[1] && /bench[\\/]pipeline\.ts$/.test(process.argv[1])) {
  const nodes = Number(process.argv[2] ?? 10000);
  runPipelineBenchmark(nodes, (line) => console.log(line)).catch((error) => {
    console.error(error);
    process.exit(1);
  });
}
