// A scored run on a small generated dataset (the demo generator at 300 nodes) for the second-look
// tests: the dataset folder, the engine worker's request handlers run in this process, and the
// run's review context, candidates and second-look queues as the engine computes them.
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { DEFAULT_DEMO_OPTIONS } from '../../demo-data/generator/options';
import { generateDemoDataset } from '../../demo-data/generator/writeDataset';
import { loadDataset } from '../../src/engine/dataset/load';
import { defaultRunSettings, type RunSettings } from '../../src/engine/pipeline/runSettings';
import { findDoubtfulLabels } from '../../src/engine/secondLook/doubts';
import { suggestLabelNext } from '../../src/engine/secondLook/labelNext';
import { createRequestHandlers, type RequestContext, type RequestHandlers } from '../../src/engine/worker/requestHandlers';
import { readRunForReview } from '../../src/engine/worker/runForReview';
import { sliceIndexOf } from '../../src/engine/worker/scoreRequest';
import { CancelFlag } from '../../src/engine/util/progress';
import type { ScoreOutcome } from '../../src/protocol/worker';
import type { ReviewCandidate } from '../../src/review/reviewCandidate';
import type { ReviewContext } from '../../src/review/reviewContext';
import { secondLookQueuesOf, type SecondLookQueues } from '../../src/review/secondLookQueues';

/** Few epochs and no threshold cross-fitting: the tests check the review path, not the model. */
export const secondLookSettings: RunSettings = { ...defaultRunSettings, epochs: 20, thresholdFolds: 0 };
export const secondLookFolds = 3;
export const secondLookCount = 10;

export interface SecondLookRun {
  root: string;
  folder: string;
  handlers: RequestHandlers;
  scored: ScoreOutcome;
  remove(): Promise<void>;
}

export function requestContext(stages?: Set<string>): RequestContext {
  return { progress: { report: (stage) => stages?.add(stage) }, cancel: new CancelFlag() };
}

export async function scoreSecondLookRun(prefix: string): Promise<SecondLookRun> {
  const root = await fs.mkdtemp(path.join(os.tmpdir(), prefix));
  const folder = path.join(root, 'wind-farm');
  await generateDemoDataset({ ...DEFAULT_DEMO_OPTIONS, nodes: 300, out: folder });
  const handlers = createRequestHandlers();
  const scored = await handlers.score({ folder, settings: secondLookSettings }, requestContext());
  return { root, folder, handlers, scored, remove: () => fs.rm(root, { recursive: true, force: true }) };
}

/** What a review session of the run is built from, and the queues the secondLook request would give it. */
export async function reviewInputsOf(
  run: SecondLookRun,
): Promise<{ context: ReviewContext; candidates: ReviewCandidate[]; queues: SecondLookQueues }> {
  const dataset = await loadDataset(run.folder);
  const { context, candidates, record } = await readRunForReview(dataset, run.scored.runId);
  const slice = sliceIndexOf(dataset, record.slice);
  const queues = secondLookQueuesOf({
    doubts: await findDoubtfulLabels(dataset, record.settings, { slice, folds: secondLookFolds }),
    labelNext: await suggestLabelNext(dataset, record.settings, { slice, count: secondLookCount }),
    computedAt: new Date(Date.UTC(2024, 11, 1, 9, 0, 0)),
  });
  return { context, candidates, queues };
}
