// Decision controls: one button per decision, and a small form for the decisions that need a
// name or a choice. The panel only says what the curator chose; the host's session works out
// the rest (members, ids, split parts).
import type { ClassView, DecisionRequest, QueueEntry } from '../src/protocol/webview';
import { el, onFormKeys, replaceChildren } from './dom';
import { shortcutLabel, type Action } from './shortcuts';

type Field = HTMLElement & { value: string };
export type FormKind = 'name' | 'mergeInto' | 'mergeWith' | 'split' | 'move';
const newClassOption = '__new-class__';

export interface DecisionPanelEvents {
  /** False when it was not sent (the previous decision is still being recorded). */
  decide(decision: DecisionRequest): boolean;
  undo(): void;
  redo(): void;
  selectedMembers(): string[];
}

function button(id: string, label: string, action: Action | null, handler: () => void, secondary = false): HTMLElement {
  const key = action ? shortcutLabel(action) : '';
  const element = el(
    'vscode-button',
    { id, secondary, title: key ? `${label} (${key})` : label },
    label,
    key ? el('kbd', { class: 'key-hint' }, key) : null,
  );
  element.addEventListener('click', () => {
    if (!element.hasAttribute('disabled')) handler();
  });
  return element;
}

function focusField(field: HTMLElement): void {
  const inner = field.shadowRoot?.querySelector<HTMLElement>('input, textarea, [tabindex]');
  (inner ?? field).focus();
}

export class DecisionPanel {
  readonly element: HTMLElement;
  private readonly form = el('div', { class: 'decision-form', id: 'decision-form', hidden: true });
  private readonly buttons: Record<string, HTMLElement> = {};
  private candidateId: string | null = null;
  private classes: ClassView[] = [];
  private queue: QueueEntry[] = [];
  private openForm: FormKind | null = null;

  constructor(private readonly events: DecisionPanelEvents) {
    const add = (id: string, label: string, action: Action | null, handler: () => void, secondary = false) =>
      (this.buttons[id] = button(id, label, action, handler, secondary));
    const row = el(
      'div',
      { class: 'decision-buttons', role: 'toolbar', 'aria-label': 'Decisions' },
      add('decide-name', 'Name new class', 'name', () => this.show('name')),
      add('decide-merge-into', 'Merge into class', 'mergeInto', () => this.show('mergeInto')),
      add('decide-merge-with', 'Merge with candidate', 'mergeWith', () => this.show('mergeWith')),
      add('decide-split', 'Split', 'split', () => this.show('split')),
      add('decide-move', 'Move selected', 'move', () => this.show('move')),
      add('decide-dismiss', 'Dismiss as noise', 'dismiss', () => this.simple('dismiss'), true),
      add('decide-skip', 'Skip', 'skip', () => this.simple('skip'), true),
      el('span', { class: 'toolbar-gap' }),
      add('undo', 'Undo', 'undo', () => this.events.undo(), true),
      add('redo', 'Redo', 'redo', () => this.events.redo(), true),
    );
    onFormKeys(
      this.form,
      () => this.confirm(),
      () => this.close(),
    );
    this.element = el('section', { class: 'decisions', 'aria-label': 'Decide' }, row, this.form);
  }

  update(
    candidateId: string | null,
    candidateOpen: boolean,
    classes: ClassView[],
    queue: QueueEntry[],
    canUndo: boolean,
    canRedo: boolean,
  ): void {
    const changedCandidate = candidateId !== this.candidateId;
    this.candidateId = candidateId;
    this.classes = classes;
    this.queue = queue;
    for (const id of ['decide-name', 'decide-merge-into', 'decide-merge-with', 'decide-split', 'decide-dismiss', 'decide-skip'])
      this.buttons[id].toggleAttribute('disabled', !candidateOpen);
    this.buttons['decide-merge-with'].toggleAttribute('disabled', !candidateOpen || queue.filter((q) => q.status === 'open').length < 2);
    this.buttons['undo'].toggleAttribute('disabled', !canUndo);
    this.buttons['redo'].toggleAttribute('disabled', !canRedo);
    if (changedCandidate || !candidateOpen) this.close();
    else if (this.openForm) this.show(this.openForm);
  }

  selectionChanged(count: number): void {
    this.buttons['decide-move'].toggleAttribute('disabled', count === 0);
    if (this.openForm === 'move') this.show('move');
  }

  get formOpen(): FormKind | null {
    return this.openForm;
  }

  /** Runs a decision action from the keyboard. */
  run(action: Action): boolean {
    switch (action) {
      case 'name':
        return this.whenEnabled('decide-name', () => this.show('name'));
      case 'mergeInto':
        return this.whenEnabled('decide-merge-into', () => this.show('mergeInto'));
      case 'mergeWith':
        return this.whenEnabled('decide-merge-with', () => this.show('mergeWith'));
      case 'move':
        return this.whenEnabled('decide-move', () => this.show('move'));
      case 'split':
        return this.whenEnabled('decide-split', () => this.show('split'));
      case 'dismiss':
        return this.whenEnabled('decide-dismiss', () => this.simple('dismiss'));
      case 'skip':
        return this.whenEnabled('decide-skip', () => this.simple('skip'));
      case 'undo':
        return this.whenEnabled('undo', () => this.events.undo());
      case 'redo':
        return this.whenEnabled('redo', () => this.events.redo());
      default:
        return false;
    }
  }

  close(): void {
    this.openForm = null;
    this.form.hidden = true;
    this.form.replaceChildren();
  }

  private whenEnabled(id: string, run: () => void): boolean {
    if (this.buttons[id].hasAttribute('disabled')) return false;
    run();
    return true;
  }

  private simple(kind: 'dismiss' | 'skip'): void {
    if (this.candidateId) this.events.decide({ kind, candidateId: this.candidateId });
  }

  private classSelect(id: string, withNew: boolean): Field {
    const usable = this.classes.filter((c) => c.status !== 'merged');
    const select = el(
      'vscode-single-select',
      { id, 'aria-label': 'Class' },
      ...usable.map((c) => el('vscode-option', { value: c.name }, c.name)),
      withNew ? el('vscode-option', { value: newClassOption }, 'New class…') : null,
    ) as Field;
    return select;
  }

  private textField(id: string, placeholder: string): Field {
    return el('vscode-textfield', { id, placeholder, 'aria-label': placeholder });
  }

  show(kind: FormKind): void {
    const previous = this.openForm === kind ? this.saveValues() : {};
    this.openForm = kind;
    this.form.hidden = false;
    const confirm = button(`confirm-${kind}`, 'Confirm', null, () => this.confirm());
    const cancel = button(`cancel-${kind}`, 'Cancel', null, () => this.close(), true);
    let first: HTMLElement;
    switch (kind) {
      case 'name': {
        const name = this.textField('new-class-name', 'Class name');
        const description = this.textField('new-class-description', 'Description');
        first = name;
        replaceChildren(
          this.form,
          el('span', { class: 'form-title' }, `Name ${this.candidateId} as a new class`),
          name,
          description,
          confirm,
          cancel,
        );
        break;
      }
      case 'mergeInto': {
        const select = this.classSelect('merge-class', false);
        first = select;
        replaceChildren(this.form, el('span', { class: 'form-title' }, `Merge ${this.candidateId} into`), select, confirm, cancel);
        break;
      }
      case 'mergeWith': {
        const others = this.queue.filter((q) => q.status === 'open' && q.id !== this.candidateId);
        const select = el(
          'vscode-single-select',
          { id: 'merge-candidate', 'aria-label': 'Candidate' },
          ...others.map((q) => el('vscode-option', { value: q.id }, `${q.id} (${q.size}) ${q.topTerms.join(' · ')}`)),
        ) as Field;
        first = select;
        replaceChildren(this.form, el('span', { class: 'form-title' }, `Merge ${this.candidateId} with`), select, confirm, cancel);
        break;
      }
      case 'split': {
        // Into 2 … 20 parts (the session's limit), never more parts than members.
        const size = this.queue.find((q) => q.id === this.candidateId)?.size ?? 2;
        const most = Math.max(2, Math.min(20, size));
        const select = el(
          'vscode-single-select',
          { id: 'split-parts', 'aria-label': 'Parts' },
          ...Array.from({ length: most - 1 }, (_, k) => el('vscode-option', { value: String(k + 2) }, `${k + 2} parts`)),
        ) as Field;
        first = select;
        replaceChildren(
          this.form,
          el('span', { class: 'form-title' }, `Split ${this.candidateId} (re-group its members) into`),
          select,
          confirm,
          cancel,
        );
        break;
      }
      case 'move': {
        const count = this.events.selectedMembers().length;
        const select = this.classSelect('move-class', true);
        const name = this.textField('move-new-name', 'New class name');
        const description = this.textField('move-new-description', 'Description');
        const newFields = el('span', { class: 'new-class-fields', id: 'move-new-fields', hidden: true }, name, description);
        select.addEventListener('change', () => {
          newFields.hidden = select.value !== newClassOption;
        });
        first = select;
        replaceChildren(
          this.form,
          el(
            'span',
            { class: 'form-title' },
            count ? `Move ${count} selected member${count === 1 ? '' : 's'} to` : 'Select members in the table first',
          ),
          select,
          newFields,
          confirm,
          cancel,
        );
        break;
      }
    }
    this.restoreValues(previous);
    requestAnimationFrame(() => focusField(first));
  }

  private saveValues(): Record<string, string> {
    const values: Record<string, string> = {};
    this.form.querySelectorAll<Field>('vscode-textfield, vscode-single-select').forEach((f) => (values[f.id] = f.value));
    return values;
  }

  private restoreValues(values: Record<string, string>): void {
    for (const [id, value] of Object.entries(values)) {
      const field = this.form.querySelector<Field>(`#${id}`);
      if (field && value) field.value = value;
    }
    const newFields = this.form.querySelector<HTMLElement>('#move-new-fields');
    if (newFields) newFields.hidden = values['move-class'] !== newClassOption;
  }

  private value(id: string): string {
    return (this.form.querySelector<Field>(`#${id}`)?.value ?? '').trim();
  }

  private invalid(id: string): void {
    this.form.querySelector(`#${id}`)?.setAttribute('invalid', '');
  }

  confirm(): void {
    const candidateId = this.candidateId;
    if (!candidateId || !this.openForm) return;
    let decision: DecisionRequest | null = null;
    switch (this.openForm) {
      case 'name': {
        const className = this.value('new-class-name');
        if (!className) return this.invalid('new-class-name');
        decision = { kind: 'name-new-class', candidateId, className, description: this.value('new-class-description') };
        break;
      }
      case 'mergeInto': {
        const className = this.value('merge-class');
        if (!className) return this.invalid('merge-class');
        decision = { kind: 'merge-into-class', candidateId, className };
        break;
      }
      case 'mergeWith': {
        const other = this.value('merge-candidate');
        if (!other) return this.invalid('merge-candidate');
        decision = { kind: 'merge-candidates', candidateIds: [candidateId, other] };
        break;
      }
      case 'split':
        decision = { kind: 'split-candidate', candidateId, parts: Number(this.value('split-parts')) || 2 };
        break;
      case 'move': {
        const members = this.events.selectedMembers();
        if (members.length === 0) return;
        const chosen = this.value('move-class');
        if (!chosen) return this.invalid('move-class');
        if (chosen === newClassOption) {
          const className = this.value('move-new-name');
          if (!className) return this.invalid('move-new-name');
          decision = { kind: 'move-members', members, className, description: this.value('move-new-description') };
        } else decision = { kind: 'move-members', members, className: chosen };
        break;
      }
    }
    // The form stays, with what was typed, when the decision could not be sent yet.
    if (this.events.decide(decision)) this.close();
  }
}
