// Builds the quality-over-time report of a dataset: the evaluation of the chosen settings (graph
// model beside the MLP baseline), warm against cold start, GEM-style summaries, and the history
// window and label-rate sweeps. Whole reports are cached on disk by their inputs.
import * as path from 'node:path';
import type { Dataset } from '../dataset/types';
import type { CancelSignal, ProgressSink } from '../util/progress';
import { throwIfCancelled } from '../util/progress';
import {
  evaluateSlices,
  referenceFromLabels,
  type EvaluationReport,
  type ModelEvaluation,
  type PrefixCache,
  type ReferenceLabels,
} from '../pipeline/evaluateSlices';
import { readTruthFile } from '../pipeline/referenceLabels';
import { settingsHash, type RunSettings } from '../pipeline/runSettings';
import { continualSummary } from './continualSummary';
import { readCachedReport, reportCacheFolder, reportCacheKey, sha256OfFile, writeCachedReport } from './reportCache';
import { REPORT_FORMAT_VERSION, type QualityReport, type WarmAgainstCold, type WarmColdRow } from './reportTypes';
import { historyWindowSweep, labelRateSweep, sweepPlanFor, type SweepContext } from './settingSweeps';

export interface BuildReportOptions {
  settings: RunSettings;
  /** Held-out true labels (id,label); without one each slice is tested on its own curated labels. */
  truthFile?: string | null;
  /** Sweeps on the newest few slices with fewer epochs (see sweepPlanFor); the main evaluation is unchanged. */
  quick?: boolean;
  /** Read and write <dataset>/runs/report-cache (default true). */
  useCache?: boolean;
  /** Where cached reports live (default <dataset>/runs/report-cache). */
  cacheFolder?: string;
  progress?: ProgressSink;
  cancel?: CancelSignal;
}

export interface BuiltReport {
  report: QualityReport;
  fromCache: boolean;
}

function warmColdRows(warm: ModelEvaluation, cold: ModelEvaluation): WarmColdRow[] {
  return warm.perSlice.map((w, i) => {
    const c = cold.perSlice[i].accuracy;
    return { slice: w.slice, warm: w.accuracy, cold: c, difference: w.accuracy !== null && c !== null ? w.accuracy - c : null };
  });
}

function meanDifference(rows: WarmColdRow[]): number | null {
  const defined = rows.map((r) => r.difference).filter((v): v is number => v !== null);
  return defined.length ? defined.reduce((a, b) => a + b, 0) / defined.length : null;
}

/** The warm evaluation as evaluateSlices reports it with compareColdStart: warm minus cold filled in from the cold chain. */
function withColdComparison(warm: ModelEvaluation, rows: WarmColdRow[]): ModelEvaluation {
  const warmMinusCold = rows.map((r) => r.difference);
  return { ...warm, warmMinusCold, forwardTransfer: meanDifference(rows) };
}

function stagePrefix(progress: ProgressSink | undefined, prefix: string): ProgressSink | undefined {
  return progress && { report: (stage, fraction) => progress.report(`${prefix}: ${stage}`, fraction) };
}

export async function buildReport(dataset: Dataset, options: BuildReportOptions): Promise<BuiltReport> {
  const started = performance.now();
  const { settings, progress, cancel } = options;
  const quick = options.quick ?? false;
  const truthFile = options.truthFile ?? null;
  const referenceSha256 = truthFile === null ? null : await sha256OfFile(truthFile);
  const cacheKey = reportCacheKey({ contentHashes: dataset.contentHashes, settings, referenceSha256, quick });
  const cacheFolder = options.cacheFolder ?? reportCacheFolder(dataset.folder);
  const useCache = options.useCache ?? true;
  if (useCache) {
    const cached = await readCachedReport(cacheFolder, cacheKey);
    if (cached) return { report: cached, fromCache: true };
  }

  const reference: ReferenceLabels | null = truthFile === null ? null : await readTruthFile(dataset, truthFile);
  const cache: PrefixCache = { propagated: new Map() };
  const evaluate = (changed: Partial<RunSettings>, stage: string): Promise<EvaluationReport> => {
    throwIfCancelled(cancel);
    return evaluateSlices(
      dataset,
      { ...settings, ...changed },
      { reference, compareColdStart: false, cache, progress: stagePrefix(progress, stage), cancel },
    );
  };
  // The warm and cold chains are the two halves of `evaluate --warm`; fitting them separately
  // gives the cold figures in full, at the same cost.
  const warm = await evaluate({ warmStart: true }, 'warm start');
  const cold = await evaluate({ warmStart: false }, 'cold start');
  const untrained = await evaluate({ warmStart: false, epochs: 0, thresholdFolds: 0 }, 'untrained model');
  const graphRows = warmColdRows(warm.graphModel, cold.graphModel);
  const baselineRows = warmColdRows(warm.baseline, cold.baseline);
  const warmAgainstCold: WarmAgainstCold = {
    graph: graphRows,
    baseline: baselineRows,
    meanDifference: { graph: meanDifference(graphRows), baseline: meanDifference(baselineRows) },
  };
  const evaluation: EvaluationReport = settings.warmStart
    ? {
        ...warm,
        settings,
        graphModel: withColdComparison(warm.graphModel, graphRows),
        baseline: withColdComparison(warm.baseline, baselineRows),
      }
    : { ...cold, settings };

  const plan = sweepPlanFor(dataset, settings, quick);
  const sweepContext: SweepContext = { dataset, settings, plan, reference, cache, progress, cancel };
  const historySweep = await historyWindowSweep(sweepContext);
  const labelRates = await labelRateSweep(sweepContext);

  const sliceKeys = evaluation.slices;
  const untrainedOf = (m: ModelEvaluation) => m.perSlice.map((s) => s.accuracy);
  const labelled = dataset.labels.reduce((count, label) => count + (label >= 0 ? 1 : 0), 0);
  const report: QualityReport = {
    formatVersion: REPORT_FORMAT_VERSION,
    createdAt: new Date().toISOString(),
    cacheKey,
    computeSeconds: (performance.now() - started) / 1000,
    dataset: {
      name: dataset.manifest.name,
      folder: path.resolve(dataset.folder),
      nodes: dataset.nodeIds.length,
      labelled,
      slices: dataset.slices.map((s) => ({ key: s.key, nodeCount: s.nodeCount })),
      contentHashes: dataset.contentHashes,
    },
    reference: { source: reference?.source ?? referenceFromLabels(dataset).source, sha256: referenceSha256 },
    settings,
    settingsHash: settingsHash(settings),
    evaluation,
    continual: {
      graph: continualSummary(evaluation.graphModel.accuracyMatrix, sliceKeys, untrainedOf(untrained.graphModel)),
      baseline: continualSummary(evaluation.baseline.accuracyMatrix, sliceKeys, untrainedOf(untrained.baseline)),
    },
    warmAgainstCold,
    sweepPlan: plan,
    historySweep,
    labelRateSweep: labelRates,
  };
  if (useCache) await writeCachedReport(cacheFolder, report);
  return { report, fromCache: false };
}
