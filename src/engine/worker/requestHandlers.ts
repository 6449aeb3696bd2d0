// What the engine worker does for each request kind. Each handler reports progress and polls the
// cancel signal through the engine functions it calls.
import type { RequestParams, RequestResults, RequestType } from '../../protocol/worker';
import type { CancelSignal, ProgressSink } from '../util/progress';
import { throwIfCancelled } from '../util/progress';
import { validateDatasetFolder } from '../dataset/validate';
import { loadDataset } from '../dataset/load';
import { summarizeDataset } from '../dataset/summary';

export interface RequestContext {
  progress: ProgressSink;
  cancel: CancelSignal;
}

export type RequestHandlers = { [K in RequestType]: (params: RequestParams[K], context: RequestContext) => Promise<RequestResults[K]> };

export const requestHandlers: RequestHandlers = {
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

  // score: added by the lead.
};
