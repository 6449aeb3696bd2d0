// Routes the review panel's messages, free of vscode. Every message from the webview is checked
// with the protocol's validator first (a webview is a web page: its messages are untrusted).
// Review work (the session, its undo and redo, snapshots, threshold previews) runs in the engine
// worker; exporting, applying and opening a node are the host's, because they need editors,
// dialogs and files.
import type { DecisionsFile } from '../../engine/decisions/types';
import {
  describeRefusedMessage,
  isWebviewToHostMessage,
  type HostToWebviewMessage,
  type WebviewToHostMessage,
} from '../../protocol/webview';
import type {
  OpenReviewOutcome,
  OpenReviewParams,
  ReviewMessageOutcome,
  ReviewSessionJson,
  SecondLookOutcome,
} from '../../protocol/worker';

export interface ReviewEngine {
  openReview(params: OpenReviewParams): Promise<OpenReviewOutcome>;
  message(reviewId: number, message: WebviewToHostMessage): Promise<ReviewMessageOutcome>;
  decisions(reviewId: number): Promise<DecisionsFile>;
  close(reviewId: number): Promise<unknown>;
  /** Computes the doubtful labels and label-next suggestions of the review's run into its session (with progress and cancel). */
  secondLook?(reviewId: number): Promise<SecondLookOutcome>;
}

export interface ReviewRelayHost {
  post(message: HostToWebviewMessage): unknown;
  /** Keeps the session where a window reload finds it (workspace state). */
  saveSession(session: ReviewSessionJson): unknown;
  exportDecisions(file: DecisionsFile): Promise<string>;
  applyDecisions(file: DecisionsFile): Promise<string>;
  openNode(nodeId: string): unknown;
  log(line: string): void;
}

/** Messages the host answers itself instead of passing them to the worker's session. */
export const hostHandledTypes: ReadonlySet<WebviewToHostMessage['type']> = new Set([
  'exportDecisions',
  'applyDecisions',
  'openNode',
  'loadSecondLook',
]);

export class ReviewRelay {
  private opened: Promise<OpenReviewOutcome> | null = null;
  private disposed = false;
  /** Messages are answered in the order they came, also across a reopen. */
  private queue: Promise<unknown> = Promise.resolve();

  constructor(
    private readonly engine: ReviewEngine,
    private readonly host: ReviewRelayHost,
    private readonly params: OpenReviewParams,
    /** The newest session this relay saw, given again to the worker when it must reopen the review. */
    private latestSession: ReviewSessionJson | undefined = undefined,
  ) {}

  get folder(): string {
    return this.params.folder;
  }

  get runId(): string {
    return this.params.runId;
  }

  /** Opens the review in the worker (once); later calls share the same outcome. */
  open(): Promise<OpenReviewOutcome> {
    if (!this.opened) {
      const saved = this.latestSession ?? this.params.saved;
      this.opened = this.engine.openReview({ ...this.params, ...(saved === undefined ? {} : { saved }) }).then((outcome) => {
        this.latestSession = outcome.session;
        this.host.saveSession(outcome.session);
        if (outcome.previewProblem)
          this.host.log(`review of run ${this.params.runId}: threshold previews are off: ${outcome.previewProblem}`);
        if (outcome.restoreProblem)
          this.host.log(`review of run ${this.params.runId}: the saved pending decisions could not be restored: ${outcome.restoreProblem}`);
        return outcome;
      });
      this.opened.catch(() => {
        this.opened = null;
      });
    }
    return this.opened;
  }

  /** Handles one message from the webview; never throws (failures go back to the panel as `error`). */
  receive(message: unknown): Promise<void> {
    const handled = this.queue.then(() => this.handle(message));
    this.queue = handled;
    return handled;
  }

  /** Shows a candidate, as if the curator had picked it in the panel (the tree's candidates). */
  select(candidateId: string): Promise<void> {
    return this.receive({ type: 'selectCandidate', candidateId });
  }

  async dispose(): Promise<void> {
    if (this.disposed) return;
    this.disposed = true;
    const opened = this.opened;
    this.opened = null;
    if (!opened) return;
    try {
      await this.engine.close((await opened).reviewId);
    } catch {
      // the worker may be gone already; the review went with it
    }
  }

  private async handle(message: unknown): Promise<void> {
    if (this.disposed) return;
    if (!isWebviewToHostMessage(message)) {
      const why = describeRefusedMessage(message);
      this.host.log(why);
      this.host.post({ type: 'error', message: why });
      return;
    }
    const requestId = 'requestId' in message ? message.requestId : undefined;
    try {
      if (hostHandledTypes.has(message.type)) await this.handleOnHost(message);
      else await this.forward(message);
    } catch (error) {
      const text = error instanceof Error ? error.message : String(error);
      this.host.log(`review: ${message.type} failed: ${text}`);
      this.host.post(requestId === undefined ? { type: 'error', message: text } : { type: 'error', requestId, message: text });
    }
  }

  private async handleOnHost(message: WebviewToHostMessage): Promise<void> {
    switch (message.type) {
      case 'openNode':
        await this.host.openNode(message.nodeId);
        return;
      case 'exportDecisions': {
        const file = await this.withReview((reviewId) => this.engine.decisions(reviewId));
        this.host.post({ type: 'done', requestId: message.requestId, message: await this.host.exportDecisions(file) });
        return;
      }
      case 'applyDecisions': {
        const file = await this.withReview((reviewId) => this.engine.decisions(reviewId));
        if (file.decisions.length === 0) throw new Error('no pending decisions to apply');
        this.host.post({ type: 'done', requestId: message.requestId, message: await this.host.applyDecisions(file) });
        return;
      }
      case 'loadSecondLook':
        this.host.post({ type: 'done', requestId: message.requestId, message: await this.secondLook() });
        return;
      default:
        throw new Error(`"${message.type}" is not handled by the host`);
    }
  }

  private async forward(message: WebviewToHostMessage): Promise<void> {
    const outcome = await this.withReview((reviewId) => this.engine.message(reviewId, message));
    if (outcome.session) {
      this.latestSession = outcome.session;
      this.host.saveSession(outcome.session);
    }
    for (const post of outcome.posts) this.host.post(post);
  }

  /** Computes the second-look queues into the session and sends the panel the new state; resolves to a summary line. */
  private async secondLook(): Promise<string> {
    const engine = this.engine;
    if (!engine.secondLook) throw new Error('this review cannot compute doubtful labels and suggestions');
    const outcome: SecondLookOutcome = await this.withReview((reviewId) => engine.secondLook!(reviewId));
    if (outcome.session) {
      this.latestSession = outcome.session;
      this.host.saveSession(outcome.session);
    }
    for (const post of outcome.posts) this.host.post(post);
    return outcome.summary;
  }

  /** The current pending decisions as a decisions file (for the Apply and Export commands). */
  decisions(): Promise<DecisionsFile> {
    return this.withReview((reviewId) => this.engine.decisions(reviewId));
  }

  /**
   * Runs `action` on the open review. A worker that restarted (after a crash or a cancelled
   * scoring run) has forgotten the review: it is opened again from the newest session, once.
   */
  private async withReview<T>(action: (reviewId: number) => Promise<T>): Promise<T> {
    const { reviewId } = await this.open();
    try {
      return await action(reviewId);
    } catch (error) {
      if (!isForgottenReview(error)) throw error;
      this.opened = null;
      this.host.log(`review of run ${this.params.runId}: the engine worker restarted; reopening the review`);
      const reopened = await this.open();
      return action(reopened.reviewId);
    }
  }
}

/** The worker no longer knows the review (its error message) or the worker itself stopped. */
export function isForgottenReview(error: unknown): boolean {
  if (!(error instanceof Error)) return false;
  return /is not open in the engine worker/.test(error.message) || error.name === 'WorkerExitedError';
}
