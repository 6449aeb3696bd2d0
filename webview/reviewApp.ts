// The review panel: lays out the parts, routes host messages to them, turns keys into actions,
// and keeps the view state (candidate, scroll, search, sort, rejection setting) with the webview
// API so that a hidden and restored panel comes back as it was.
import type { HostToWebviewMessage, ReviewSnapshot, SecondLookQueueKind } from '../src/protocol/webview';
import { DecisionPanel } from './decisionPanel';
import { el, isTyping, replaceChildren } from './dom';
import { GraphView } from './graphView';
import type { HostBridge } from './hostBridge';
import { MemberTable } from './memberTable';
import { QueueView } from './queueView';
import { queueTitles, SecondLookPanel } from './secondLookView';
import { actionOfKey, shortcuts, type Action } from './shortcuts';
import { SummaryView } from './summaryView';
import { ThresholdControls } from './thresholdControls';

type QueueTab = 'candidates' | SecondLookQueueKind;
const queueTabs: QueueTab[] = ['candidates', 'doubts', 'labelNext'];
const tabTitle = (tab: QueueTab) => (tab === 'candidates' ? 'Candidates' : queueTitles[tab]);

export class ReviewApp {
  private snapshot: ReviewSnapshot | null = null;
  private readonly title = el('h1', { class: 'panel-title', id: 'panel-title' }, 'Review candidates');
  private readonly status = el('div', { class: 'status-line', id: 'status-line', role: 'status' });
  private readonly help: HTMLElement;
  private readonly queue: QueueView;
  private readonly summary = new SummaryView();
  /** A decision, undo or redo was posted and the host has not answered yet. */
  private changing = false;
  private readonly graph: GraphView;
  private readonly table: MemberTable;
  private readonly decisions: DecisionPanel;
  private readonly threshold: ThresholdControls;
  private restoredCandidate = false;
  private readonly secondLook: SecondLookPanel;
  private readonly tabs = el('nav', { class: 'queue-tabs', role: 'tablist', 'aria-label': 'Queues' });
  private readonly body = el('main', { class: 'panel-body' });
  private tab: QueueTab = 'candidates';

  constructor(
    private readonly root: HTMLElement,
    private readonly host: HostBridge,
  ) {
    this.queue = new QueueView((candidateId) => this.select(candidateId));
    this.graph = new GraphView({ openNode: (nodeId) => this.host.post({ type: 'openNode', nodeId }) });
    this.table = new MemberTable({
      selectionChanged: (ids) => this.decisions?.selectionChanged(ids.length),
      openNode: (nodeId) => this.host.post({ type: 'openNode', nodeId }),
      focusNode: (position) => this.graph.showTooltip(position),
      viewChanged: (view) =>
        this.host.updateState({
          search: view.search,
          sortColumn: view.sortColumn,
          sortDescending: view.sortDescending,
          tableScroll: view.scroll,
        }),
    });
    this.decisions = new DecisionPanel({
      decide: (decision) => this.change(() => this.host.post({ type: 'decide', decision }), 'Recording decision…'),
      undo: () => void this.change(() => this.host.post({ type: 'undo' }), 'Undoing…'),
      redo: () => void this.change(() => this.host.post({ type: 'redo' }), 'Redoing…'),
      selectedMembers: () => this.table.selectedIds(),
    });
    this.secondLook = new SecondLookPanel(
      {
        // Each of these names its own node and the queue moves on at once: never held back.
        decide: (decision) => this.busy(this.host.post({ type: 'decide', decision }), 'Recording decision…'),
        load: () => this.loadSecondLook(),
        undo: () => void this.change(() => this.host.post({ type: 'undo' }), 'Undoing…'),
        redo: () => void this.change(() => this.host.post({ type: 'redo' }), 'Redoing…'),
        currentChanged: (kind, node) =>
          this.host.updateState({ secondLookNode: { ...this.host.state.secondLookNode, [kind]: node ?? undefined } }),
      },
      this.host.state.secondLookNode,
    );
    this.threshold = new ThresholdControls(
      (setting) => this.host.post({ type: 'previewThreshold', setting }),
      (setting) => this.host.updateState({ threshold: setting }),
      (preview) => this.queue.showPreview(preview?.candidates ?? null),
    );
    this.help = el(
      'div',
      { class: 'help-overlay', id: 'help-overlay', role: 'dialog', 'aria-label': 'Keyboard shortcuts', hidden: true },
      el('h2', {}, 'Keyboard shortcuts'),
      el('dl', {}, ...shortcuts.flatMap((s) => [el('dt', {}, el('kbd', {}, s.label)), el('dd', {}, s.description)])),
      el(
        'p',
        { class: 'help-table-keys' },
        'In the member table: ↑ ↓, Page Up, Page Down, Home and End move; Space selects; Shift with an arrow extends the selection; Enter shows the node in the graph’s box.',
      ),
      el('p', { class: 'muted' }, 'Shift-click rows to select a range; double-click a row or a graph node to open it.'),
    );
    const helpStrip = el(
      'footer',
      { class: 'help-strip', id: 'help-strip' },
      ...shortcuts.filter((s) => s.action !== 'close').map((s) => el('span', {}, el('kbd', {}, s.label), ` ${s.description}`)),
    );
    const exportButton = el(
      'vscode-button',
      { id: 'export-decisions', secondary: true, title: 'Write the pending decisions to a decisions file' },
      'Export decisions',
    );
    exportButton.addEventListener('click', () => this.busy(this.host.post({ type: 'exportDecisions' }), 'Exporting…'));
    const applyButton = el(
      'vscode-button',
      { id: 'apply-decisions', title: 'Apply the pending decisions to the label files' },
      'Apply decisions',
    );
    applyButton.addEventListener('click', () => {
      if (!applyButton.hasAttribute('disabled')) this.busy(this.host.post({ type: 'applyDecisions' }), 'Applying…');
    });
    const helpButton = el('vscode-button', { id: 'help-button', secondary: true, title: 'Keyboard shortcuts (?)' }, '?');
    helpButton.addEventListener('click', () => this.toggleHelp());
    replaceChildren(
      root,
      el(
        'header',
        { class: 'panel-header' },
        this.title,
        this.threshold.element,
        el('span', { class: 'header-actions' }, exportButton, applyButton, helpButton),
      ),
      this.status,
      this.tabs,
      this.body,
      helpStrip,
      this.help,
    );
    replaceChildren(
      this.body,
      this.queue.element,
      el(
        'div',
        { class: 'centre' },
        this.summary.element,
        this.decisions.element,
        el('div', { class: 'views' }, this.graph.element, this.table.element),
      ),
      this.secondLook.element,
    );
    const saved = this.host.state;
    // View state comes back from the webview API as it was stored; a tab this version lacks falls back.
    this.switchTab(queueTabs.find((tab) => tab === saved.queueTab) ?? 'candidates');
    this.table.restoreView(saved);
    if (saved.helpOpen) this.help.hidden = false;
    document.addEventListener('keydown', (event) => this.onKey(event));
  }

  start(): void {
    this.host.onMessage((message) => this.receive(message));
    this.host.post({ type: 'ready' });
  }

  private receive(message: HostToWebviewMessage): void {
    switch (message.type) {
      case 'snapshot':
        this.changing = false;
        this.show(message.snapshot);
        this.setStatus('');
        return;
      case 'thresholdPreview':
        this.threshold.receive(message.requestId, message.preview);
        return;
      case 'done':
        this.changing = false;
        this.setStatus(message.message);
        return;
      case 'error':
        this.changing = false;
        if (message.requestId !== undefined) this.threshold.failed(message.requestId);
        this.setStatus(message.message, true);
        return;
    }
  }

  private show(snapshot: ReviewSnapshot): void {
    const saved = this.host.state;
    // After a restore, return to the candidate the curator had in view (when it is still open).
    if (!this.restoredCandidate) {
      this.restoredCandidate = true;
      const wanted = saved.candidateId;
      if (wanted && wanted !== snapshot.current?.id && snapshot.queue.some((q) => q.id === wanted)) {
        this.select(wanted);
      }
    }
    const previous = this.snapshot;
    this.snapshot = snapshot;
    const current = snapshot.current;
    this.title.textContent = `Review · ${snapshot.dataset} · slice ${snapshot.slice}${snapshot.runId ? ` · run ${snapshot.runId}` : ''}`;
    const openCount = snapshot.queue.filter((q) => q.status === 'open').length;
    this.queue.show(snapshot.queue, current?.id ?? null, snapshot.pending);
    this.summary.show(current, openCount);
    const scroll = previous === null && saved.candidateId === current?.id ? saved.tableScroll : undefined;
    this.table.setData(current?.graph ?? null, snapshot.classes, current?.id ?? null, scroll);
    this.graph.show(current?.graph ?? null, snapshot.classes, current?.id ?? null);
    this.decisions.update(
      current?.id ?? null,
      current?.status === 'open',
      snapshot.classes,
      snapshot.queue,
      snapshot.canUndo,
      snapshot.canRedo,
    );
    this.decisions.selectionChanged(this.table.selectedIds().length);
    this.threshold.setBaseline(snapshot.threshold, saved.threshold, snapshot.previewsOff);
    this.root.querySelector('#apply-decisions')?.toggleAttribute('disabled', snapshot.pending.length === 0);
    this.host.updateState({ candidateId: current?.id });
    // Newly computed queues (the command or the button) come into view.
    const computed = snapshot.secondLook?.computedAt;
    if (previous && computed && computed !== previous.secondLook?.computedAt && this.tab === 'candidates') this.switchTab('doubts');
    else this.showSecondLook();
  }

  private showSecondLook(): void {
    const snapshot = this.snapshot;
    const view = snapshot?.secondLook ?? null;
    const openCount = snapshot?.queue.filter((q) => q.status === 'open').length;
    const counts: Record<QueueTab, number | undefined> = {
      candidates: openCount,
      doubts: view?.doubts.openCount,
      labelNext: view?.labelNext.openCount,
    };
    replaceChildren(
      this.tabs,
      ...queueTabs.map((tab) => {
        const selected = tab === this.tab;
        const button = el(
          'button',
          {
            class: `queue-tab${selected ? ' selected' : ''}`,
            id: `tab-${tab}`,
            role: 'tab',
            'aria-selected': selected ? 'true' : 'false',
            title: `${tabTitle(tab)} (${queueTabs.indexOf(tab) + 1})`,
          },
          tabTitle(tab),
          counts[tab] === undefined ? null : el('span', { class: 'badge' }, String(counts[tab])),
        );
        button.addEventListener('click', () => this.switchTab(tab));
        return button;
      }),
    );
    if (this.tab !== 'candidates' && snapshot) this.secondLook.show(this.tab, view, snapshot.classes, snapshot.canUndo, snapshot.canRedo);
  }

  private switchTab(tab: QueueTab): void {
    this.tab = tab;
    this.body.setAttribute('data-tab', tab);
    this.secondLook.element.hidden = tab === 'candidates';
    if (tab === 'candidates') {
      this.secondLook.closeForm();
      this.graph.becameVisible();
    }
    this.host.updateState({ queueTab: tab });
    this.showSecondLook();
  }

  private loadSecondLook(): void {
    this.busy(this.host.post({ type: 'loadSecondLook' }), 'Checking labels and ranking what to label next… (progress in the notification)');
  }

  private select(candidateId: string): void {
    this.host.post({ type: 'selectCandidate', candidateId });
  }

  private step(direction: 1 | -1): void {
    const snapshot = this.snapshot;
    if (!snapshot) return;
    const open = snapshot.queue.filter((q) => q.status === 'open').map((q) => q.id);
    if (open.length === 0) return;
    const at = snapshot.current ? open.indexOf(snapshot.current.id) : -1;
    const next = at < 0 ? open[direction === 1 ? 0 : open.length - 1] : open[(at + direction + open.length) % open.length];
    if (next !== snapshot.current?.id) this.select(next);
  }

  private busy(requestId: number, message: string): void {
    void requestId;
    this.setStatus(message);
  }

  /**
   * A candidate decision, undo or redo: one at a time. A second one before the host's answer (a
   * double press) would act on the state the first one changes: it is not sent (false).
   */
  private change(post: () => number, message: string): boolean {
    if (this.changing) {
      this.setStatus('Still recording the previous decision…');
      return false;
    }
    this.changing = true;
    this.busy(post(), message);
    return true;
  }

  private setStatus(message: string, isError = false): void {
    this.status.textContent = message;
    this.status.classList.toggle('error', isError);
    this.status.setAttribute('role', isError ? 'alert' : 'status');
  }

  private toggleHelp(open = this.help.hidden): void {
    this.help.hidden = !open;
    this.host.updateState({ helpOpen: open });
  }

  private onKey(event: KeyboardEvent): void {
    if (isTyping(event) && event.key !== 'Escape') return;
    const action: Action | null = actionOfKey(event);
    if (!action) return;
    let handled = true;
    const tabOfAction: Partial<Record<Action, QueueTab>> = {
      showCandidates: 'candidates',
      showDoubts: 'doubts',
      showLabelNext: 'labelNext',
    };
    const tab = tabOfAction[action];
    if (tab) {
      this.switchTab(tab);
      event.preventDefault();
      return;
    }
    if (this.tab !== 'candidates') {
      // In a second-look queue the candidate decisions are out of view and do not apply.
      if (action === 'undo' || action === 'redo') handled = this.decisions.run(action);
      else if (action === 'help') this.toggleHelp();
      else if (action === 'close') {
        if (!this.help.hidden) this.toggleHelp(false);
        else if (this.secondLook.formOpen) this.secondLook.closeForm();
        else handled = false;
      } else handled = this.secondLook.run(action);
      if (handled) event.preventDefault();
      return;
    }
    switch (action) {
      case 'next':
        this.step(1);
        break;
      case 'previous':
        this.step(-1);
        break;
      case 'fit':
        this.graph.zoomToFit();
        break;
      case 'search':
        this.table.focusSearch();
        break;
      case 'help':
        this.toggleHelp();
        break;
      case 'close':
        if (!this.help.hidden) this.toggleHelp(false);
        else if (this.decisions.formOpen) this.decisions.close();
        else handled = false;
        break;
      default:
        handled = this.decisions.run(action);
    }
    if (handled) event.preventDefault();
  }
}
