// The `report` request: what `graph-curator report` does, inside the worker, rendered for a VS Code
// webview (colours from the editor theme, the panel's CSP nonce on <style> and <script>).
import { loadDataset } from '../dataset/load';
import { buildReport } from '../report/buildReport';
import { throwIfCancelled, type CancelSignal, type ProgressSink } from '../util/progress';
import { renderReportParts } from '../../report/renderReport';
import type { ReportOutcome, ReportParams } from '../../protocol/worker';

export async function buildReportForWebview(
  params: ReportParams,
  context: { progress: ProgressSink; cancel: CancelSignal },
): Promise<ReportOutcome> {
  const { progress, cancel } = context;
  const dataset = await loadDataset(params.folder, { progress, cancel });
  throwIfCancelled(cancel);
  const { report, fromCache } = await buildReport(dataset, {
    settings: params.settings,
    truthFile: params.truthFile ?? null,
    quick: params.quick,
    useCache: params.useCache ?? true,
    progress,
    cancel,
  });
  throwIfCancelled(cancel);
  const { head, body } = renderReportParts(report, { mode: 'webview', nonce: params.nonce });
  return {
    head,
    body,
    summary: {
      dataset: report.dataset.name,
      slices: report.evaluation.slices.length,
      fromCache,
      createdAt: report.createdAt,
      computeSeconds: report.computeSeconds,
    },
  };
}
