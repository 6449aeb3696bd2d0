// What the engine worker does for each request kind. Each handler reports progress and polls the
// cancel signal through the engine functions it calls. State that outlives a request (open review
// sessions, the last fit for threshold previews) lives in one ReviewRegistry per worker.
import type { RequestParams, RequestResults, RequestType } from '../../protocol/worker';
import type { CancelSignal, ProgressSink } from '../util/progress';
import { throwIfCancelled } from '../util/progress';
import { validateDatasetFolder } from '../dataset/validate';
import { loadDataset } from '../dataset/load';
import { summarizeDataset } from '../dataset/summary';
import { commitLabels, planDecisions, writePlan } from './applyRequests';
import { datasetOverview } from './overviewRequest';
import { writeFileAtomic } from '../io/atomicWrite';
import { ReviewRegistry } from './reviewRegistry';
import { buildReportForWebview } from './reportRequest';
import { scoreAndSave } from './scoreRequest';
import { secondLookForReview } from './secondLookRequest';

export interface RequestContext {
  progress: ProgressSink;
  cancel: CancelSignal;
}

export type RequestHandlers = { [K in RequestType]: (params: RequestParams[K], context: RequestContext) => Promise<RequestResults[K]> };

export function createRequestHandlers(reviews = new ReviewRegistry()): RequestHandlers {
  return {
    async validate({ folder }, { progress, cancel }) {
      const problems = await validateDatasetFolder(folder, { progress, cancel });
      throwIfCancelled(cancel);
      return problems;
    },

    async summary({ folder }, { progress, cancel }) {
      const dataset = await loadDataset(folder, { progress, cancel });
      throwIfCancelled(cancel);
      progress.report('summarize', 0);
      const summary = summarizeDataset(dataset);
      progress.report('summarize', 1);
      return summary;
    },

    overview: ({ folder }, context) => datasetOverview(folder, context),

    score: (params, context) => scoreAndSave(params, context, (fit) => reviews.rememberFit(fit)),

    openReview: (params, { progress, cancel }) => reviews.open(params, (folder) => loadDataset(folder, { progress, cancel })),

    reviewMessage: ({ reviewId, message }) => reviews.message(reviewId, message),

    reviewDecisions: ({ reviewId }) => Promise.resolve(reviews.decisions(reviewId)),

    closeReview: ({ reviewId }) => Promise.resolve(reviews.close(reviewId)),

    planApply: ({ folder, decisions, source, rebase }) => planDecisions(folder, decisions, source, rebase),

    applyPlan: ({ plan }) => writePlan(plan),

    async exportDecisions({ file, decisions }) {
      await writeFileAtomic(file, JSON.stringify(decisions, null, 2) + '\n');
      return file;
    },

    commitLabels: ({ folder, message, initialise }) => commitLabels(folder, message, initialise),

    report: (params, context) => buildReportForWebview(params, context),

    secondLook: (params, context) => secondLookForReview(reviews, params, context),
  };
}

export const requestHandlers: RequestHandlers = createRequestHandlers();
