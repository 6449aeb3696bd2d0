// The second-look queues: doubtful labels and what to label next. One queue is in view at a time;
// the curator goes through its items (J/K or a click) and keeps the label, gives the suggested
// class, or gives another class. Each of these is an ordinary decision sent to the host, so undo,
// redo, export and apply treat it like every other; the engine's ranking is only shown, never acted on.
import type {
  ClassView,
  DecisionRequest,
  SecondLookItemView,
  SecondLookQueueKind,
  SecondLookQueueView,
  SecondLookView,
} from '../src/protocol/webview';
import { el, onFormKeys, replaceChildren } from './dom';
import { shortcutLabel, type Action } from './shortcuts';

type Field = HTMLElement & { value: string };

export const suggestionsAreNotDecisions = 'Model suggestions are not decisions; you review every change.';

export const queueTitles: Record<SecondLookQueueKind, string> = { doubts: 'Doubtful labels', labelNext: 'Label next' };

export interface SecondLookEvents {
  decide(decision: DecisionRequest): void;
  /** Ask the host to compute (or recompute) the queues. */
  load(): void;
  undo(): void;
  redo(): void;
  currentChanged(kind: SecondLookQueueKind, node: string | null): void;
}

function button(id: string, label: string, action: Action | null, handler: () => void, secondary = false): HTMLElement {
  const key = action ? shortcutLabel(action) : '';
  const element = el(
    'vscode-button',
    { id, secondary, title: key ? `${label} (${key})` : label },
    el('span', { class: 'button-label' }, label),
    key ? el('kbd', { class: 'key-hint' }, key) : null,
  );
  element.addEventListener('click', () => {
    if (!element.hasAttribute('disabled')) handler();
  });
  return element;
}

export class SecondLookPanel {
  readonly element: HTMLElement;
  private readonly heading = el('h2', { id: 'second-look-title' });
  private readonly summary = el('p', { class: 'second-look-summary', id: 'second-look-summary' });
  private readonly problem = el('p', { class: 'second-look-problem', id: 'second-look-problem', role: 'alert', hidden: true });
  private readonly list = el('ol', { class: 'second-look-list', id: 'second-look-list' });
  private readonly form = el('div', { class: 'decision-form', id: 'second-look-form', hidden: true });
  private readonly buttons: Record<string, HTMLElement> = {};
  private kind: SecondLookQueueKind = 'doubts';
  private view: SecondLookView | null = null;
  private classes: ClassView[] = [];
  private readonly current: Record<SecondLookQueueKind, string | null>;

  constructor(
    private readonly events: SecondLookEvents,
    saved: { doubts?: string; labelNext?: string } = {},
  ) {
    this.current = { doubts: saved.doubts ?? null, labelNext: saved.labelNext ?? null };
    const add = (id: string, label: string, action: Action | null, handler: () => void, secondary = false) =>
      (this.buttons[id] = button(id, label, action, handler, secondary));
    const toolbar = el(
      'div',
      { class: 'decision-buttons', role: 'toolbar', 'aria-label': 'Second-look decisions' },
      add('second-look-keep', 'Keep label', 'keepLabel', () => this.keep()),
      add('second-look-accept', 'Give suggested class', 'acceptSuggestion', () => this.accept()),
      add('second-look-choose', 'Give another class…', 'chooseClass', () => this.openForm(), true),
      el('span', { class: 'toolbar-gap' }),
      add('second-look-undo', 'Undo', null, () => this.events.undo(), true),
      add('second-look-redo', 'Redo', null, () => this.events.redo(), true),
      add('second-look-load', 'Compute queues', null, () => this.events.load(), true),
    );
    onFormKeys(
      this.form,
      () => this.confirm(),
      () => this.closeForm(),
    );
    this.element = el(
      'section',
      { class: 'second-look', id: 'second-look', 'aria-labelledby': 'second-look-title', hidden: true },
      el('div', { class: 'summary-header' }, this.heading),
      this.summary,
      el('p', { class: 'second-look-note', id: 'second-look-note' }, suggestionsAreNotDecisions),
      this.problem,
      toolbar,
      this.form,
      this.list,
    );
  }

  get formOpen(): boolean {
    return !this.form.hidden;
  }

  show(kind: SecondLookQueueKind, view: SecondLookView | null, classes: ClassView[], canUndo: boolean, canRedo: boolean): void {
    const changedQueue = kind !== this.kind;
    this.kind = kind;
    this.view = view;
    this.classes = classes;
    const queue = this.queue();
    this.heading.textContent = queueTitles[kind];
    this.buttons['second-look-undo'].toggleAttribute('disabled', !canUndo);
    this.buttons['second-look-redo'].toggleAttribute('disabled', !canRedo);
    this.buttons['second-look-load'].querySelector('.button-label')!.textContent = view ? 'Recompute queues' : 'Compute queues';
    this.buttons['second-look-keep'].hidden = kind !== 'doubts';
    if (!queue) {
      this.summary.textContent =
        'Not computed yet. Compute the queues to check the curated labels of the run’s window and to rank the slice’s unlabelled nodes.';
      this.problem.hidden = true;
      replaceChildren(this.list);
    } else {
      this.summary.textContent = `${queue.summary} · ${queue.openCount} open · computed ${view?.computedAt.slice(0, 16).replace('T', ' ')}`;
      this.problem.hidden = queue.problem === null;
      this.problem.textContent = queue.problem ?? '';
      const current = this.currentItem() ?? queue.items.find((i) => i.status === 'open') ?? queue.items[0] ?? null;
      this.setCurrent(current?.node ?? null, false);
      this.render(queue);
    }
    this.updateButtons();
    if (changedQueue || !this.currentItem()) this.closeForm();
    else if (this.formOpen) this.openForm();
  }

  /** Keyboard actions of the queue in view; false when the action is not one of them (or not possible now). */
  run(action: Action): boolean {
    switch (action) {
      case 'next':
        return this.step(1);
      case 'previous':
        return this.step(-1);
      case 'keepLabel':
        return this.whenEnabled('second-look-keep', () => this.keep());
      case 'acceptSuggestion':
        return this.whenEnabled('second-look-accept', () => this.accept());
      case 'chooseClass':
        return this.whenEnabled('second-look-choose', () => this.openForm());
      default:
        return false;
    }
  }

  closeForm(): void {
    this.form.hidden = true;
    this.form.replaceChildren();
  }

  private queue(): SecondLookQueueView | null {
    return this.view ? this.view[this.kind] : null;
  }

  private currentItem(): SecondLookItemView | null {
    const node = this.current[this.kind];
    return this.queue()?.items.find((i) => i.node === node) ?? null;
  }

  private setCurrent(node: string | null, redraw = true): void {
    const changed = node !== this.current[this.kind];
    this.current[this.kind] = node;
    if (changed) this.events.currentChanged(this.kind, node);
    if (!redraw) return;
    const queue = this.queue();
    if (queue) this.render(queue);
    this.updateButtons();
    if (changed) this.closeForm();
  }

  private render(queue: SecondLookQueueView): void {
    const currentNode = this.current[this.kind];
    replaceChildren(
      this.list,
      ...(queue.items.length === 0
        ? [el('li', { class: 'muted' }, queue.problem ? 'Nothing to show.' : 'Nothing in this queue.')]
        : queue.items.map((item) => el('li', {}, this.row(item, item.node === currentNode)))),
    );
    this.list.querySelector<HTMLElement>('.second-look-item.current')?.scrollIntoView({ block: 'nearest' });
  }

  private row(item: SecondLookItemView, isCurrent: boolean): HTMLElement {
    const outcome =
      item.status === 'kept'
        ? `kept (${item.decisionId})`
        : item.status === 'changed'
          ? `→ ${item.pendingLabel ?? '?'} (${item.decisionId})`
          : 'open';
    const row = el(
      'button',
      {
        class: `second-look-item status-${item.status}${isCurrent ? ' current' : ''}`,
        'data-node': item.node,
        'data-status': item.status,
        'aria-current': isCurrent ? 'true' : undefined,
        title: item.evidence,
      },
      el('span', { class: 'sl-rank' }, `#${item.rank}`),
      el('span', { class: 'sl-node' }, item.node),
      el('span', { class: 'sl-slice' }, item.slice),
      el(
        'span',
        { class: 'sl-labels' },
        el('span', { class: 'sl-current' }, item.currentLabel ?? 'unlabelled'),
        ' → ',
        el('span', { class: 'sl-suggested' }, item.suggestedLabel),
      ),
      el('span', { class: 'sl-score', title: this.kind === 'doubts' ? 'disagreement score' : 'usefulness' }, item.score.toFixed(2)),
      el('span', { class: 'sl-outcome' }, outcome),
      el('span', { class: 'sl-text' }, item.text),
      el('span', { class: 'sl-evidence' }, item.evidence),
    );
    row.addEventListener('click', () => this.setCurrent(item.node));
    return row;
  }

  private updateButtons(): void {
    const item = this.currentItem();
    const usable = (name: string) => this.classes.some((c) => c.name === name && c.status !== 'merged');
    const keepable = this.kind === 'doubts' && item !== null && item.status === 'open';
    const acceptable =
      item !== null && usable(item.suggestedLabel) && !(item.status === 'changed' && item.pendingLabel === item.suggestedLabel);
    this.buttons['second-look-keep'].toggleAttribute('disabled', !keepable);
    this.buttons['second-look-accept'].toggleAttribute('disabled', !acceptable);
    this.buttons['second-look-choose'].toggleAttribute('disabled', item === null);
    const label = this.buttons['second-look-accept'].querySelector('.button-label');
    if (label) label.textContent = item ? `Give “${item.suggestedLabel}”` : 'Give suggested class';
  }

  private whenEnabled(id: string, run: () => void): boolean {
    if (this.buttons[id].hasAttribute('disabled') || this.buttons[id].hidden) return false;
    run();
    return true;
  }

  private step(direction: 1 | -1): boolean {
    const items = this.queue()?.items ?? [];
    if (items.length === 0) return false;
    const at = items.findIndex((i) => i.node === this.current[this.kind]);
    const next = at < 0 ? (direction === 1 ? 0 : items.length - 1) : (at + direction + items.length) % items.length;
    this.setCurrent(items[next].node);
    return true;
  }

  /** After a decision the next open item (in ranking order, wrapping) comes into view. */
  private advanceFrom(node: string): void {
    const items = this.queue()?.items ?? [];
    const at = items.findIndex((i) => i.node === node);
    for (let k = 1; k < items.length; k++) {
      const candidate = items[(at + k) % items.length];
      if (candidate.status === 'open') {
        this.setCurrent(candidate.node);
        return;
      }
    }
  }

  private note(item: SecondLookItemView): string {
    return this.kind === 'doubts'
      ? `second look: label doubted (score ${item.score.toFixed(2)}), suggested "${item.suggestedLabel}"`
      : `second look: suggested to label next (usefulness ${item.score.toFixed(2)})`;
  }

  private keep(): void {
    const item = this.currentItem();
    if (!item) return;
    this.events.decide({ kind: 'keep-label', node: item.node, note: this.note(item) });
    this.advanceFrom(item.node);
  }

  private accept(): void {
    const item = this.currentItem();
    if (!item) return;
    this.give(item, item.suggestedLabel);
  }

  private give(item: SecondLookItemView, className: string): void {
    this.events.decide({ kind: 'move-members', members: [item.node], className, note: this.note(item) });
    this.advanceFrom(item.node);
  }

  private openForm(): void {
    const item = this.currentItem();
    if (!item) return;
    const previous = this.form.hidden ? '' : (this.form.querySelector<Field>('#second-look-class')?.value ?? '');
    const choices = this.classes.filter((c) => c.status !== 'merged' && c.name !== item.currentLabel);
    const select = el(
      'vscode-single-select',
      { id: 'second-look-class', 'aria-label': 'Class' },
      ...choices.map((c) => el('vscode-option', { value: c.name, selected: c.name === (previous || item.suggestedLabel) }, c.name)),
    ) as Field;
    this.form.hidden = false;
    replaceChildren(
      this.form,
      el('span', { class: 'form-title' }, `Give ${item.node} the class`),
      select,
      button('second-look-confirm', 'Confirm', null, () => this.confirm()),
      button('second-look-cancel', 'Cancel', null, () => this.closeForm(), true),
    );
    requestAnimationFrame(() => {
      const inner = select.shadowRoot?.querySelector<HTMLElement>('[tabindex]');
      (inner ?? select).focus();
    });
  }

  private confirm(): void {
    const item = this.currentItem();
    const className = (this.form.querySelector<Field>('#second-look-class')?.value ?? '').trim();
    if (!item) return this.closeForm();
    if (!className) {
      this.form.querySelector('#second-look-class')?.setAttribute('invalid', '');
      return;
    }
    this.closeForm();
    this.give(item, className);
  }
}
