// The review sessions open in the worker. The session and its candidates (k-means for splits,
// c-TF-IDF for merged candidates) are engine computation, so they live here; the host relays the
// webview's messages and gets back what to post to the webview and the session to keep.
// Messages of one review are handled one at a time, in the order they came.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import type { Dataset } from '../dataset/types';
import { writeFileAtomic } from '../io/atomicWrite';
import type { PrefixFit } from '../pipeline/modelOnPrefix';
import type { RunRecord } from '../pipeline/runStore';
import type { RunSettings } from '../pipeline/runSettings';
import type { DecisionsFile } from '../decisions/types';
import type { HostToWebviewMessage, ThresholdPreviewResult } from '../../protocol/webview';
import type { OpenReviewOutcome, ReviewMessageOutcome, ReviewSessionJson } from '../../protocol/worker';
import { ReviewController } from '../../review/reviewController';
import { withAppliedMarked } from '../../review/appliedSession';
import { ReviewSession } from '../../review/reviewSession';
import type { SecondLookQueues } from '../../review/secondLookQueues';
import {
  createThresholdPreviewer,
  thresholdPreviewInputOf,
  thresholdSettingOf,
  type ThresholdPreviewer,
} from '../../review/thresholdPreview';
import { readRunForReview, type RunForReview } from './runForReview';
import { savedPreviewerOf } from './savedPreview';

/** The fit of the run scored last in this worker, kept for threshold previews. */
export interface RememberedFit {
  folder: string;
  runId: string;
  dataset: Dataset;
  fit: PrefixFit;
  settings: RunSettings;
}

interface OpenReview {
  /** Dataset folder and run record of the reviewed run (second-look queues are computed for it). */
  folder: string;
  record: RunRecord;
  session: ReviewSession;
  controller: ReviewController;
  /** Posts collected while one message is handled. */
  outbox: HostToWebviewMessage[];
  changed: ReviewSessionJson | null;
  persistPath: string | null;
  /** The queue of this review's messages (and of its file writes). */
  queue: Promise<unknown>;
}

export interface OpenReviewRequest {
  folder: string;
  runId: string;
  saved?: unknown;
  persistPath: string | null;
  appliedIds?: string[];
}

export class ReviewRegistry {
  private readonly reviews = new Map<number, OpenReview>();
  private nextId = 1;
  private rememberedFit: RememberedFit | null = null;

  /** Keeps one fit (the newest): a 100k-node fit holds a few hundred MB of arrays. */
  rememberFit(fit: RememberedFit): void {
    this.rememberedFit = fit;
  }

  get openCount(): number {
    return this.reviews.size;
  }

  async open(request: OpenReviewRequest, loadDataset: (folder: string) => Promise<Dataset>): Promise<OpenReviewOutcome> {
    const remembered =
      this.rememberedFit && this.rememberedFit.folder === path.resolve(request.folder) && this.rememberedFit.runId === request.runId
        ? this.rememberedFit
        : null;
    // After an apply the labels on disk changed: read them again rather than the scoring-time copy
    // (the remembered fit still serves the threshold previews: nodes and graph are unchanged).
    const dataset = remembered && !request.appliedIds ? remembered.dataset : await loadDataset(request.folder);
    const run = await readRunForReview(dataset, request.runId);
    const { session, restoredFrom, restoreProblem } = await restoreSession(run, request);
    const { previewer, problem: previewProblem } = remembered
      ? { previewer: previewerOf(remembered, run) }
      : await savedPreviewerOf(dataset, run);
    const baseline = previewer ? previewer(thresholdSettingOf(run.record.settings)) : baselineOf(run);
    const review: OpenReview = {
      folder: request.folder,
      record: run.record,
      session,
      outbox: [],
      changed: null,
      persistPath: request.persistPath,
      queue: Promise.resolve(),
      controller: undefined as unknown as ReviewController,
    };
    review.controller = new ReviewController(
      session,
      {
        post: (message) => review.outbox.push(message),
        persist: (json) => {
          review.changed = json;
        },
        ...(previewer ? { previewThreshold: previewer } : {}),
        ...(previewProblem ? { previewUnavailable: previewProblem } : {}),
        // The host answers these itself (file dialogs, the apply preview, opening an editor).
        exportDecisions: () => Promise.reject(new Error('exporting decisions is done by the extension host')),
        applyDecisions: () => Promise.reject(new Error('applying decisions is done by the extension host')),
        openNode: () => undefined,
      },
      baseline,
    );
    const reviewId = this.nextId++;
    this.reviews.set(reviewId, review);
    // Decisions just applied: the session on disk says so from now on.
    if (request.appliedIds && request.persistPath && session.appliedDecisions().length > 0)
      await writeSession(request.persistPath, session.toJSON());
    return {
      reviewId,
      restoredFrom,
      ...(restoreProblem ? { restoreProblem } : {}),
      session: session.toJSON(),
      dataset: run.record.dataset,
      slice: run.record.slice,
      previewAvailable: previewer !== null,
      ...(previewProblem ? { previewProblem } : {}),
    };
  }

  message(reviewId: number, message: unknown): Promise<ReviewMessageOutcome> {
    const review = this.get(reviewId);
    return this.inTurn(review, () => review.controller.receive(message));
  }

  /** The dataset folder and run record of an open review. */
  runOf(reviewId: number): { folder: string; record: RunRecord } {
    const review = this.get(reviewId);
    return { folder: review.folder, record: review.record };
  }

  /** Replaces the review's second-look queues, in turn with its messages; saved and posted like a decision. */
  attachSecondLook(reviewId: number, queues: SecondLookQueues): Promise<ReviewMessageOutcome> {
    const review = this.get(reviewId);
    return this.inTurn(review, () => {
      review.session.setSecondLook(queues);
      review.controller.sessionChanged();
    });
  }

  /** Runs `change` after the review's earlier messages, collecting its posts and writing the session it leaves. */
  private inTurn(review: OpenReview, change: () => unknown): Promise<ReviewMessageOutcome> {
    const handled = review.queue.then(async (): Promise<ReviewMessageOutcome> => {
      review.outbox = [];
      review.changed = null;
      await change();
      const outcome = { posts: review.outbox, session: review.changed };
      if (review.changed && review.persistPath) await writeSession(review.persistPath, review.changed);
      return outcome;
    });
    review.queue = handled.catch(() => undefined);
    return handled;
  }

  decisions(reviewId: number): DecisionsFile {
    return this.get(reviewId).session.exportDecisions();
  }

  close(reviewId: number): boolean {
    return this.reviews.delete(reviewId);
  }

  private get(reviewId: number): OpenReview {
    const review = this.reviews.get(reviewId);
    if (!review) throw new Error(`review ${reviewId} is not open in the engine worker (it restarted?); reopen the review panel`);
    return review;
  }
}

async function writeSession(file: string, json: ReviewSessionJson): Promise<void> {
  await fs.mkdir(path.dirname(file), { recursive: true });
  await writeFileAtomic(file, JSON.stringify(json, null, 2) + '\n');
}

async function readJson(file: string): Promise<unknown> {
  try {
    return JSON.parse(await fs.readFile(file, 'utf8')) as unknown;
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return undefined;
    throw new Error(`${file}: ${(error as Error).message}`);
  }
}

/** The saved session in the run folder wins; the host's copy (workspace state) is the fallback. */
async function restoreSession(
  run: RunForReview,
  request: OpenReviewRequest,
): Promise<{ session: ReviewSession; restoredFrom: OpenReviewOutcome['restoredFrom']; restoreProblem?: string }> {
  const problems: string[] = [];
  const sources: { from: 'file' | 'state'; read: () => Promise<unknown> }[] = [];
  if (request.persistPath) sources.push({ from: 'file', read: () => readJson(request.persistPath as string) });
  if (request.saved !== undefined && request.saved !== null) sources.push({ from: 'state', read: () => Promise.resolve(request.saved) });
  for (const source of sources) {
    try {
      const read = await source.read();
      if (read === undefined) continue;
      const json = request.appliedIds ? withAppliedMarked(read, request.appliedIds) : read;
      return { session: ReviewSession.fromJSON(json, run.context, run.candidates), restoredFrom: source.from };
    } catch (error) {
      problems.push((error as Error).message);
    }
  }
  const fresh = new ReviewSession(run.context, run.candidates);
  return problems.length > 0
    ? { session: fresh, restoredFrom: 'none', restoreProblem: problems.join('; ') }
    : { session: fresh, restoredFrom: 'none' };
}

function previewerOf(remembered: RememberedFit, run: RunForReview): ThresholdPreviewer {
  return createThresholdPreviewer(thresholdPreviewInputOf(remembered.dataset, remembered.fit, remembered.settings, run.candidates));
}

/** Without the fit, the panel still shows the run's own setting and counts. */
function baselineOf(run: RunForReview): ThresholdPreviewResult {
  const inCandidates = run.candidates.reduce((sum, c) => sum + c.members.length, 0);
  return {
    setting: thresholdSettingOf(run.record.settings),
    rejected: run.record.counts.rejected,
    scored: run.record.counts.scored,
    candidatesKept: run.candidates.length,
    ungroupedRejected: Math.max(0, run.record.counts.rejected - inCandidates),
  };
}
