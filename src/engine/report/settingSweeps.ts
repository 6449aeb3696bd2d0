// Sweeps of one setting (history window, label rate) with everything else fixed: each point is
// an evaluateSlices call restricted to the sweep's slices, sharing prefix graphs and propagated
// features with every other call of the report.
import type { Dataset } from '../dataset/types';
import type { CancelSignal, ProgressSink } from '../util/progress';
import { throwIfCancelled } from '../util/progress';
import { evaluateSlices, type ModelEvaluation, type PrefixCache, type ReferenceLabels } from '../pipeline/evaluateSlices';
import { describeWindow, type RunSettings } from '../pipeline/runSettings';
import {
  HISTORY_WINDOW_SWEEP,
  LABEL_RATE_SWEEP,
  type SettingSweep,
  type SweepModelFigures,
  type SweepPlan,
  type SweepPoint,
} from './reportTypes';

/** Quick sweeps: the newest slices only, and at most this many epochs. */
export const QUICK_SWEEP_SLICES = 3;
export const QUICK_SWEEP_EPOCHS = 50;

export function sweepPlanFor(dataset: Dataset, settings: RunSettings, quick: boolean): SweepPlan {
  const keys = dataset.slices.map((s) => s.key);
  return {
    quick,
    slices: quick ? keys.slice(-QUICK_SWEEP_SLICES) : keys,
    epochs: quick ? Math.min(settings.epochs, QUICK_SWEEP_EPOCHS) : settings.epochs,
    warmStart: false,
    thresholdFolds: 0,
  };
}

export interface SweepContext {
  dataset: Dataset;
  settings: RunSettings;
  plan: SweepPlan;
  reference: ReferenceLabels | null;
  cache: PrefixCache;
  progress?: ProgressSink;
  cancel?: CancelSignal;
}

function meanOf(values: (number | null)[]): number | null {
  const defined = values.filter((v): v is number => v !== null);
  return defined.length ? defined.reduce((a, b) => a + b, 0) / defined.length : null;
}

export function sweepFigures(evaluation: ModelEvaluation, sliceKeys: readonly string[]): SweepModelFigures {
  const perSlice = evaluation.perSlice
    .filter((m) => sliceKeys.includes(m.slice))
    .map((m) => ({
      slice: m.slice,
      accuracy: m.accuracy,
      macroF1: m.macroF1,
      trainingNodes: m.trainingNodes,
      trainSeconds: m.trainSeconds,
    }));
  const fitted = perSlice.filter((m) => m.trainingNodes > 0);
  return {
    meanAccuracy: meanOf(perSlice.map((m) => m.accuracy)),
    meanMacroF1: meanOf(perSlice.map((m) => m.macroF1)),
    meanTrainingNodes: fitted.length ? fitted.reduce((a, m) => a + m.trainingNodes, 0) / fitted.length : 0,
    trainSeconds: perSlice.reduce((a, m) => a + m.trainSeconds, 0),
    perSlice,
  };
}

async function sweepPoint(
  ctx: SweepContext,
  changed: Partial<RunSettings>,
  setting: number | 'all',
  label: string,
  stage: string,
): Promise<SweepPoint> {
  throwIfCancelled(ctx.cancel);
  const { plan, dataset } = ctx;
  const settings: RunSettings = {
    ...ctx.settings,
    ...changed,
    warmStart: plan.warmStart,
    thresholdFolds: plan.thresholdFolds,
    epochs: plan.epochs,
  };
  const onlySlices = dataset.slices.filter((s) => plan.slices.includes(s.key)).map((s) => s.index);
  const evaluation = await evaluateSlices(dataset, settings, {
    reference: ctx.reference,
    compareColdStart: false,
    cache: ctx.cache,
    onlySlices,
    progress: ctx.progress && { report: (inner, fraction) => ctx.progress?.report(`${stage}: ${inner}`, fraction) },
    cancel: ctx.cancel,
  });
  return {
    setting,
    label,
    graph: sweepFigures(evaluation.graphModel, plan.slices),
    baseline: sweepFigures(evaluation.baseline, plan.slices),
  };
}

export async function historyWindowSweep(ctx: SweepContext): Promise<SettingSweep> {
  const points: SweepPoint[] = [];
  for (const window of HISTORY_WINDOW_SWEEP)
    points.push(await sweepPoint(ctx, { historyWindow: window }, window, describeWindow(window), `history window ${String(window)}`));
  return { parameter: 'historyWindow', points };
}

export async function labelRateSweep(ctx: SweepContext): Promise<SettingSweep> {
  const points: SweepPoint[] = [];
  for (const rate of LABEL_RATE_SWEEP)
    points.push(await sweepPoint(ctx, { labelRate: rate }, rate, `${Math.round(rate * 100)}% of labels`, `label rate ${rate}`));
  return { parameter: 'labelRate', points };
}
