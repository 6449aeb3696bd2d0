// The candidate queue (open ones largest first, skipped ones last, decided ones below) and the
// list of pending decisions. While the rejection setting is moved, each open candidate of the run
// shows how many of its members that setting still rejects, and whether it would go.
import type { CandidatePreview, PendingDecisionView, QueueEntry } from '../src/protocol/webview';
import { el, replaceChildren } from './dom';

export class QueueView {
  readonly element: HTMLElement;
  private readonly list = el('ol', { class: 'queue-list', id: 'queue-list', 'aria-label': 'Candidate queue' });
  private readonly pending = el('ol', { class: 'pending-list', id: 'pending-list', 'aria-label': 'Pending decisions' });
  private readonly pendingTitle = el('h3', {}, 'Pending decisions');
  private preview = new Map<string, CandidatePreview>();
  private shown: { queue: QueueEntry[]; currentId: string | null; pending: PendingDecisionView[] } = {
    queue: [],
    currentId: null,
    pending: [],
  };

  constructor(private readonly select: (candidateId: string) => void) {
    this.element = el('aside', { class: 'queue' }, el('h3', {}, 'Candidates'), this.list, this.pendingTitle, this.pending);
  }

  /** The candidates at a previewed setting; null when the controls show the run's own setting. */
  showPreview(candidates: CandidatePreview[] | null): void {
    this.preview = new Map((candidates ?? []).map((c) => [c.id, c]));
    this.show(this.shown.queue, this.shown.currentId, this.shown.pending);
  }

  private previewMark(entry: QueueEntry): HTMLElement | null {
    const preview = this.preview.get(entry.id);
    if (!preview || entry.status !== 'open') return null;
    return el(
      'span',
      {
        class: `queue-preview${preview.kept ? '' : ' drops'}`,
        title: `At the previewed setting ${preview.stillRejected} of its ${preview.members} members stay rejected${preview.kept ? '' : ': too few, the candidate would go'}`,
      },
      `→ ${preview.stillRejected} of ${preview.members} still rejected${preview.kept ? '' : ': would go'}`,
    );
  }

  show(queue: QueueEntry[], currentId: string | null, pending: PendingDecisionView[]): void {
    this.shown = { queue, currentId, pending };
    // The list is built anew: the focus goes back to the same candidate's button.
    const focused = this.list.contains(document.activeElement) ? (document.activeElement as HTMLElement).dataset.candidate : undefined;
    replaceChildren(
      this.list,
      ...queue.map((entry) => {
        const button = el(
          'button',
          {
            class: `queue-item status-${entry.status}${entry.applied ? ' applied' : ''}${entry.id === currentId ? ' current' : ''}`,
            'data-candidate': entry.id,
            'aria-current': entry.id === currentId ? 'true' : undefined,
            title: entry.topTerms.join(', '),
          },
          el('span', { class: 'queue-size' }, String(entry.size)),
          el('span', { class: 'queue-id' }, entry.id),
          el(
            'span',
            { class: 'queue-terms' },
            entry.status === 'open' ? entry.topTerms.join(' · ') : entry.applied ? `${entry.status} · applied` : entry.status,
          ),
          entry.looksLikeDrift && entry.status === 'open' ? el('span', { class: 'queue-drift', title: 'looks like drift' }, '≈') : null,
          entry.skips > 0 && entry.status === 'open' ? el('span', { class: 'queue-skips', title: `skipped ${entry.skips}×` }, '↷') : null,
          this.previewMark(entry),
        );
        button.addEventListener('click', () => this.select(entry.id));
        return el('li', {}, button);
      }),
    );
    if (focused !== undefined) this.list.querySelector<HTMLElement>(`[data-candidate="${CSS.escape(focused)}"]`)?.focus();
    this.pendingTitle.textContent = `Pending decisions (${pending.length})`;
    replaceChildren(
      this.pending,
      ...(pending.length
        ? pending.map((p) => el('li', { 'data-decision': p.id }, el('span', { class: 'decision-id' }, p.id), ' ', p.summary))
        : [el('li', { class: 'muted' }, 'None yet.')]),
    );
  }
}
