// A hand-made report for the rendering tests: three slices, figures chosen so that every number
// on the page can be traced back to this file.
import type { ModelEvaluation, SliceMetrics } from '../../src/engine/pipeline/evaluateSlices';
import { defaultRunSettings } from '../../src/engine/pipeline/runSettings';
import { continualSummary } from '../../src/engine/report/continualSummary';
import type { QualityReport, SettingSweep, SweepModelFigures } from '../../src/engine/report/reportTypes';

export const SLICES = ['2021', '2022', '2023'];

function slice(key: string, accuracy: number | null, extra: Partial<SliceMetrics> = {}): SliceMetrics {
  return {
    slice: key,
    trainingNodes: 20,
    testNodes: 10,
    unseenTestNodes: 2,
    accuracy,
    macroF1: accuracy,
    openSetMacroF1: 0.5,
    noveltyAuroc: 0.75,
    rejectionRate: 0.1,
    trainSeconds: 0.5,
    ...extra,
  };
}

function evaluation(model: 'sign' | 'mlp', matrix: (number | null)[][]): ModelEvaluation {
  return {
    model,
    warmStart: false,
    perSlice: SLICES.map((key, i) => slice(key, matrix[i][i])),
    accuracyMatrix: matrix,
    averageAccuracy: null,
    backwardTransfer: null,
    warmMinusCold: null,
    forwardTransfer: null,
  };
}

function figures(accuracy: number): SweepModelFigures {
  return { meanAccuracy: accuracy, meanMacroF1: accuracy, meanTrainingNodes: 20, trainSeconds: 1, perSlice: [] };
}

function sweep(parameter: 'historyWindow' | 'labelRate', settings: (number | 'all')[]): SettingSweep {
  return {
    parameter,
    points: settings.map((s, k) => ({ setting: s, label: String(s), graph: figures(0.6 + 0.05 * k), baseline: figures(0.5 + 0.05 * k) })),
  };
}

export function handMadeReport(
  graphMatrix: (number | null)[][],
  graphUntrained: (number | null)[],
  baselineMatrix: (number | null)[][] = graphMatrix,
  baselineUntrained = graphUntrained,
): QualityReport {
  const settings = { ...defaultRunSettings };
  const graph = evaluation('sign', graphMatrix);
  const baseline = evaluation('mlp', baselineMatrix);
  const rows = SLICES.map((key) => ({ slice: key, warm: 0.8, cold: 0.7, difference: 0.8 - 0.7 }));
  return {
    formatVersion: 1,
    createdAt: '2024-01-01T00:00:00.000Z',
    cacheKey: 'fixture',
    computeSeconds: 1,
    dataset: {
      name: 'hand-made',
      folder: '/nowhere/hand-made',
      nodes: 30,
      labelled: 20,
      slices: SLICES.map((key) => ({ key, nodeCount: 10 })),
      contentHashes: {},
    },
    reference: { source: 'truth.csv', sha256: 'ab'.repeat(32) },
    settings,
    settingsHash: '0123456789abcdef',
    evaluation: { dataset: 'hand-made', reference: 'truth.csv', slices: SLICES, settings, graphModel: graph, baseline },
    continual: {
      graph: continualSummary(graphMatrix, SLICES, graphUntrained),
      baseline: continualSummary(baselineMatrix, SLICES, baselineUntrained),
    },
    warmAgainstCold: { graph: rows, baseline: rows, meanDifference: { graph: 0.1, baseline: 0.1 } },
    sweepPlan: { quick: true, slices: SLICES.slice(-2), epochs: 10, warmStart: false, thresholdFolds: 0 },
    historySweep: sweep('historyWindow', [1, 2, 3, 5, 'all']),
    labelRateSweep: sweep('labelRate', [0.1, 0.3, 0.5, 0.7, 0.9]),
  };
}

/** data-value of the cell with this data-metric, as a number (NaN when empty), and its text. */
export function metricCell(html: string, metric: string): { value: number; text: string } {
  const match = new RegExp(`<t[dh][^>]*data-value="([^"]*)"[^>]*data-metric="${metric}"[^>]*>([^<]*)</t[dh]>`).exec(html);
  if (!match) throw new Error(`no cell with data-metric="${metric}"`);
  return { value: match[1] === '' ? NaN : Number(match[1]), text: match[2] };
}
