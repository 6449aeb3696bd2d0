// The review panel: one WebviewPanel showing one run's candidates. Its HTML comes from the review
// module's builder (CSP with a nonce, worker-src blob:), local files only from dist/ and media/,
// no retainContextWhenHidden: the webview keeps its view state with setState, the session is kept
// by the worker in runs/<runId>/pending-decisions.json and by the host in workspace state, and a
// serializer brings the panel back after a window reload.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { DecisionsFile } from '../../engine/decisions/types';
import type { HostToWebviewMessage } from '../../protocol/webview';
import type { ReviewSessionJson } from '../../protocol/worker';
import { newNonce, reviewPanelHtml } from '../../review/webviewHtml';
import type { ApplyOutcome, DecisionApplier } from '../apply/applyDecisions';
import type { HostServices } from '../hostServices';
import { pendingDecisionsPath } from '../runFiles';
import { ReviewRelay, type ReviewEngine } from './reviewRelay';
import { reviewPanelStateKey, reviewSessionStateKey, type ReviewTarget, isReviewTarget } from './reviewState';

export const reviewViewType = 'graphCurator.review';

export class ReviewPanels implements vscode.Disposable {
  private panel: vscode.WebviewPanel | undefined;
  private relay: ReviewRelay | undefined;
  private panelDisposables: vscode.Disposable[] = [];
  private readonly disposables: vscode.Disposable[] = [];
  /** Set while the extension shuts down (e.g. a window reload), when the panel must stay restorable. */
  private shuttingDown = false;

  constructor(
    private readonly services: HostServices,
    private readonly context: vscode.ExtensionContext,
    private readonly applier: DecisionApplier,
    private readonly exportDecisions: (folder: string, file: DecisionsFile) => Promise<string>,
  ) {
    this.disposables.push(
      vscode.window.registerWebviewPanelSerializer(reviewViewType, {
        deserializeWebviewPanel: (panel) => {
          const target = this.context.workspaceState.get<unknown>(reviewPanelStateKey);
          if (isReviewTarget(target)) this.attach(panel, target);
          else panel.dispose();
          return Promise.resolve();
        },
      }),
      // Trusted now: reopen the review so that its session is also written to the run folder.
      vscode.workspace.onDidGrantWorkspaceTrust(() => {
        const target = this.current;
        if (target && this.panel) void this.switchTo(target);
      }),
    );
  }

  get current(): ReviewTarget | undefined {
    return this.relay ? { folder: this.relay.folder, runId: this.relay.runId } : undefined;
  }

  /** The open panel's pending decisions, if a panel is open. */
  async currentDecisions(): Promise<{ target: ReviewTarget; decisions: DecisionsFile } | undefined> {
    const relay = this.relay;
    if (!relay) return undefined;
    return { target: { folder: relay.folder, runId: relay.runId }, decisions: await relay.decisions() };
  }

  /** Opens (or reveals) the panel on a run, at a candidate if given. */
  async show(target: ReviewTarget, candidateId?: string): Promise<void> {
    const same = this.relay && this.relay.folder === target.folder && this.relay.runId === target.runId;
    if (this.panel && same) {
      this.panel.reveal(undefined, false);
    } else if (this.panel) {
      this.panel.reveal(undefined, false);
      await this.switchTo(target);
    } else {
      const panel = vscode.window.createWebviewPanel(
        reviewViewType,
        'Review',
        { viewColumn: vscode.ViewColumn.Active, preserveFocus: false },
        this.panelOptions(),
      );
      this.attach(panel, target);
    }
    const relay = this.relay;
    if (!relay) return;
    try {
      await relay.open();
    } catch (error) {
      this.reportOpenFailure(target, error);
      return;
    }
    if (candidateId) await relay.select(candidateId);
  }

  private panelOptions(): vscode.WebviewPanelOptions & vscode.WebviewOptions {
    const root = this.context.extensionUri;
    return {
      enableScripts: true,
      enableFindWidget: true,
      // The webview bundle's own folder and the stylesheet's: nothing else of the extension.
      localResourceRoots: [vscode.Uri.joinPath(root, 'dist', 'webview'), vscode.Uri.joinPath(root, 'media')],
    };
  }

  private attach(panel: vscode.WebviewPanel, target: ReviewTarget): void {
    this.panel = panel;
    panel.webview.options = this.panelOptions();
    panel.webview.html = this.html(panel.webview, target);
    this.panelDisposables.push(
      panel.webview.onDidReceiveMessage((message: unknown) => {
        void this.relay?.receive(message);
      }),
      panel.onDidDispose(() => this.onPanelClosed(panel)),
    );
    this.startRelay(target);
  }

  private html(webview: vscode.Webview, target: ReviewTarget): string {
    const root = this.context.extensionUri;
    return reviewPanelHtml({
      scriptUri: webview.asWebviewUri(vscode.Uri.joinPath(root, 'dist', 'webview', 'webview.js')).toString(),
      styleUri: webview.asWebviewUri(vscode.Uri.joinPath(root, 'media', 'review.css')).toString(),
      cspSource: webview.cspSource,
      nonce: newNonce(),
      title: `Review ${path.basename(target.folder)}`,
    });
  }

  private startRelay(target: ReviewTarget, appliedIds?: string[]): void {
    const state = this.context.workspaceState;
    void state.update(reviewPanelStateKey, target);
    const trusted = vscode.workspace.isTrusted;
    const sessionKey = reviewSessionStateKey(target.folder, target.runId);
    this.relay = new ReviewRelay(
      this.engine(),
      {
        post: (message) => this.post(message),
        saveSession: (session: ReviewSessionJson) => {
          void state.update(sessionKey, session);
          if (this.panel)
            this.panel.title = `Review ${session.dataset} ${session.slice}${session.decisions.length ? ` (${session.decisions.length} pending)` : ''}`;
        },
        exportDecisions: (file) => this.exportDecisions(target.folder, file),
        applyDecisions: async (file) => (await this.applyFor(target, file)).message,
        openNode: (nodeId) => revealNode(target.folder, nodeId),
        log: (line) => this.services.output.appendLine(line),
      },
      {
        folder: target.folder,
        runId: target.runId,
        persistPath: trusted ? pendingDecisionsPath(target.folder, target.runId) : null,
        ...(appliedIds?.length ? { appliedIds } : {}),
        saved: state.get<unknown>(sessionKey),
      },
    );
  }

  /** Computes the open panel's second-look queues (the panel shows the outcome); false when no panel is open. */
  async loadSecondLook(): Promise<boolean> {
    const relay = this.relay;
    if (!relay) return false;
    this.panel?.reveal(undefined, false);
    await relay.receive({ type: 'loadSecondLook', requestId: 0 });
    return true;
  }

  /** Applies the open panel's pending decisions; false when no panel is open or nothing is pending. */
  async applyFromPanel(): Promise<boolean> {
    const relay = this.relay;
    if (!relay) return false;
    const decisions = await relay.decisions();
    if (decisions.decisions.length === 0) return false;
    await this.applyFor({ folder: relay.folder, runId: relay.runId }, decisions);
    return true;
  }

  private async applyFor(target: ReviewTarget, decisions: DecisionsFile): Promise<ApplyOutcome> {
    const outcome = await this.applier.run({ folder: target.folder, decisions, source: `review of run ${target.runId}` });
    if (outcome.batch)
      this.afterApply(
        target,
        outcome,
        decisions.decisions.map((d) => d.id),
      );
    return outcome;
  }

  private engine(): ReviewEngine {
    const client = this.services.client;
    return {
      openReview: async (params) =>
        await vscode.window.withProgress({ location: vscode.ProgressLocation.Window, title: 'Opening the review' }, (progress) =>
          client.request('openReview', params, { progress }),
        ),
      message: (reviewId, message) => client.request('reviewMessage', { reviewId, message }),
      decisions: (reviewId) => client.request('reviewDecisions', { reviewId }),
      close: (reviewId) => client.request('closeReview', { reviewId }),
      secondLook: async (reviewId) =>
        await vscode.window.withProgress(
          { location: vscode.ProgressLocation.Notification, title: 'Checking labels and ranking what to label next', cancellable: true },
          (progress, token) => client.request('secondLook', { reviewId }, { progress, token }),
        ),
    };
  }

  private async switchTo(target: ReviewTarget): Promise<void> {
    await this.relay?.dispose();
    this.startRelay(target);
    if (this.panel) this.panel.webview.html = this.html(this.panel.webview, target);
  }

  /**
   * The applied decisions are in the label files now: a copy of the session is kept beside the run
   * (applied-<batch>.json), the saved session marks them applied, and the review reopens on the new
   * labels with their candidates done (closed, not undoable) and the rest as they were.
   */
  private afterApply(target: ReviewTarget, outcome: ApplyOutcome, appliedIds: string[] = []): void {
    void (async () => {
      const relay = this.relay;
      if (!relay || relay.folder !== target.folder || relay.runId !== target.runId) return;
      // Let the relay answer the apply message first.
      await new Promise((resolve) => setTimeout(resolve, 0));
      await relay.dispose();
      const pending = pendingDecisionsPath(target.folder, target.runId);
      await fs.copyFile(pending, path.join(path.dirname(pending), `applied-${outcome.batch}.json`)).catch(() => undefined);
      await this.context.workspaceState.update(reviewSessionStateKey(target.folder, target.runId), undefined);
      if (this.relay !== relay) return;
      this.startRelay(target, appliedIds);
      await this.relay?.receive({ type: 'ready' });
    })();
  }

  private post(message: HostToWebviewMessage): void {
    void this.panel?.webview.postMessage(message);
  }

  private reportOpenFailure(target: ReviewTarget, error: unknown): void {
    const text = error instanceof Error ? error.message : String(error);
    this.services.output.appendLine(`Opening the review of run ${target.runId} failed: ${text}`);
    this.post({ type: 'error', message: `The review could not be opened: ${text}` });
    void vscode.window.showErrorMessage(`The review of run ${target.runId} could not be opened: ${text}`);
  }

  private onPanelClosed(panel: vscode.WebviewPanel): void {
    if (this.panel !== panel) return;
    this.panel = undefined;
    const relay = this.relay;
    this.relay = undefined;
    for (const d of this.panelDisposables.splice(0)) d.dispose();
    void relay?.dispose();
    // Closed on purpose: a reload should not bring it back (the pending decisions stay saved).
    if (!this.shuttingDown) void this.context.workspaceState.update(reviewPanelStateKey, undefined);
  }

  dispose(): void {
    this.shuttingDown = true;
    for (const d of this.panelDisposables.splice(0)) d.dispose();
    for (const d of this.disposables.splice(0)) d.dispose();
    this.panel?.dispose();
    void this.relay?.dispose();
  }
}

/** Opens nodes.csv (as dataset.json names it) at the node's line. */
async function revealNode(folder: string, nodeId: string): Promise<void> {
  let nodesFile = 'nodes.csv';
  try {
    const manifest = JSON.parse(await fs.readFile(path.join(folder, 'dataset.json'), 'utf8')) as { files?: { nodes?: unknown } };
    if (typeof manifest.files?.nodes === 'string') nodesFile = manifest.files.nodes;
  } catch {
    // the default name
  }
  const document = await vscode.workspace.openTextDocument(vscode.Uri.file(path.join(folder, nodesFile)));
  const text = document.getText();
  const quoted = `"${nodeId.replace(/"/g, '""')}"`;
  const offset = [`\n${nodeId},`, `\n${quoted},`, `,${nodeId},`, `,${nodeId}\n`]
    .map((needle) => text.indexOf(needle))
    .find((at) => at >= 0);
  const position = offset === undefined ? new vscode.Position(0, 0) : document.positionAt(offset + 1);
  const line = document.lineAt(position.line).range;
  await vscode.window.showTextDocument(document, {
    selection: new vscode.Range(line.start, line.end),
    viewColumn: vscode.ViewColumn.Beside,
    preview: true,
  });
}
