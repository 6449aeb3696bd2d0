// Glue between the review panel's webview and a ReviewSession, free of vscode: the host passes
// every message it receives to receive() and supplies the few things only it can do (post to
// the webview, write files, run apply, reveal a node) as callbacks.
import type { DecisionsFile } from '../engine/decisions/types';
import {
  describeRefusedMessage,
  isWebviewToHostMessage,
  type HostToWebviewMessage,
  type ThresholdPreviewResult,
  type ThresholdSetting,
  type WebviewToHostMessage,
} from '../protocol/webview';
import { ReviewError, type ReviewSession, type ReviewSessionJson } from './reviewSession';
import { buildSnapshot } from './snapshot';

export interface ReviewHostActions {
  post(message: HostToWebviewMessage): unknown;
  /** Called after every change with the session to keep (run folder file, webview state). */
  persist?(session: ReviewSessionJson): unknown;
  /** Absent when the run's scores are not at hand: the panel then says previews are unavailable. */
  previewThreshold?(setting: ThresholdSetting): ThresholdPreviewResult | Promise<ThresholdPreviewResult>;
  /** Why previews are off, when the host knows (e.g. the saved fit is damaged). */
  previewUnavailable?: string;
  /** Writes the decisions file (asking where); resolves to the message shown, e.g. the path. */
  exportDecisions(file: DecisionsFile): Promise<string>;
  /** Runs the apply path on the decisions; resolves to the message shown. */
  applyDecisions(file: DecisionsFile): Promise<string>;
  openNode(nodeId: string): unknown;
  /**
   * Computes the second-look queues and puts them in the session (session.setSecondLook);
   * resolves to the message shown. Absent where the queues are computed elsewhere.
   */
  loadSecondLook?(): Promise<string>;
  /** Refused messages and failures, for the host's log. */
  log?(message: string): void;
}

export class ReviewController {
  constructor(
    private readonly session: ReviewSession,
    private readonly actions: ReviewHostActions,
    /** The run's own setting and counts, shown until the curator moves a control. */
    private readonly baseline: ThresholdPreviewResult | null = null,
  ) {}

  /** Handles one message from the webview; never throws (failures go back as `error`). */
  async receive(message: unknown): Promise<void> {
    if (!isWebviewToHostMessage(message)) {
      const why = describeRefusedMessage(message);
      this.actions.log?.(why);
      this.actions.post({ type: 'error', message: why });
      return;
    }
    const requestId = 'requestId' in message ? message.requestId : undefined;
    try {
      await this.handle(message);
    } catch (error) {
      const text = error instanceof Error ? error.message : String(error);
      if (!(error instanceof ReviewError)) this.actions.log?.(`review: ${message.type} failed: ${text}`);
      this.actions.post(requestId === undefined ? { type: 'error', message: text } : { type: 'error', requestId, message: text });
    }
  }

  /** Sends the whole state, e.g. after the host itself changed the session. */
  postSnapshot(): void {
    this.actions.post({ type: 'snapshot', snapshot: buildSnapshot(this.session, this.baseline, this.previewsOff()) });
  }

  /** Persists and re-sends the session after the host changed it (e.g. new second-look queues). */
  sessionChanged(): void {
    this.changed();
  }

  /** Why previews cannot be made here; undefined when they can. */
  private previewsOff(): string | undefined {
    if (this.actions.previewThreshold) return undefined;
    return this.actions.previewUnavailable
      ? `threshold previews are off: ${this.actions.previewUnavailable}; score the slice again to use them`
      : 'threshold previews need the run’s scores; score the slice again to use them';
  }

  private changed(): void {
    this.actions.persist?.(this.session.toJSON());
    this.postSnapshot();
  }

  private async handle(message: WebviewToHostMessage): Promise<void> {
    switch (message.type) {
      case 'ready':
        this.postSnapshot();
        return;
      case 'selectCandidate':
        this.session.select(message.candidateId);
        this.changed();
        return;
      case 'decide':
        this.session.decide(message.decision);
        this.changed();
        return;
      case 'undo':
        if (!this.session.undo()) throw new ReviewError('nothing to undo');
        this.changed();
        return;
      case 'redo':
        if (!this.session.redo()) throw new ReviewError('nothing to redo');
        this.changed();
        return;
      case 'previewThreshold': {
        if (!this.actions.previewThreshold) throw new ReviewError(this.previewsOff() as string);
        const preview = await this.actions.previewThreshold(message.setting);
        this.actions.post({ type: 'thresholdPreview', requestId: message.requestId, preview });
        return;
      }
      case 'exportDecisions':
        this.actions.post({
          type: 'done',
          requestId: message.requestId,
          message: await this.actions.exportDecisions(this.session.exportDecisions()),
        });
        return;
      case 'applyDecisions':
        if (this.session.pendingDecisions().length === 0) throw new ReviewError('no pending decisions to apply');
        this.actions.post({
          type: 'done',
          requestId: message.requestId,
          message: await this.actions.applyDecisions(this.session.exportDecisions()),
        });
        return;
      case 'openNode':
        await this.actions.openNode(message.nodeId);
        return;
      case 'loadSecondLook': {
        if (!this.actions.loadSecondLook) throw new ReviewError('doubtful labels and suggestions are computed by the extension host');
        const done = await this.actions.loadSecondLook();
        this.changed();
        this.actions.post({ type: 'done', requestId: message.requestId, message: done });
        return;
      }
    }
  }
}
