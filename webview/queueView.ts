// The candidate queue (open ones largest first, skipped ones last, decided ones below) and the
// list of pending decisions.
import type { PendingDecisionView, QueueEntry } from '../src/protocol/webview';
import { el, replaceChildren } from './dom';

export class QueueView {
  readonly element: HTMLElement;
  private readonly list = el('ol', { class: 'queue-list', id: 'queue-list', 'aria-label': 'Candidate queue' });
  private readonly pending = el('ol', { class: 'pending-list', id: 'pending-list', 'aria-label': 'Pending decisions' });
  private readonly pendingTitle = el('h3', {}, 'Pending decisions');

  constructor(private readonly select: (candidateId: string) => void) {
    this.element = el('aside', { class: 'queue' }, el('h3', {}, 'Candidates'), this.list, this.pendingTitle, this.pending);
  }

  show(queue: QueueEntry[], currentId: string | null, pending: PendingDecisionView[]): void {
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
        );
        button.addEventListener('click', () => this.select(entry.id));
        return el('li', {}, button);
      }),
    );
    this.pendingTitle.textContent = `Pending decisions (${pending.length})`;
    replaceChildren(
      this.pending,
      ...(pending.length
        ? pending.map((p) => el('li', { 'data-decision': p.id }, el('span', { class: 'decision-id' }, p.id), ' ', p.summary))
        : [el('li', { class: 'muted' }, 'None yet.')]),
    );
  }
}
