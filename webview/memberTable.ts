// The member table: search, sort, selection, and only the rows in view in the DOM, so that a
// candidate of thousands of members renders as fast as one of ten.
import type { ClassView, NeighbourhoodGraph } from '../src/protocol/webview';
import { el, replaceChildren } from './dom';

export const rowHeight = 24;
export const tableReadyMark = 'review:table-ready';
const overscanRows = 8;

/** Rows [first, last) to draw for a viewport over rowCount rows of fixed height. */
export function visibleRows(
  scrollTop: number,
  viewportHeight: number,
  rowCount: number,
  height = rowHeight,
  overscan = overscanRows,
): { first: number; last: number } {
  const first = Math.max(0, Math.floor(scrollTop / height) - overscan);
  const last = Math.min(rowCount, Math.ceil((scrollTop + Math.max(viewportHeight, height)) / height) + overscan);
  return { first, last: Math.max(first, last) };
}

interface Column {
  key: string;
  title: string;
  className: string;
  text(graph: NeighbourhoodGraph, i: number, classes: ClassView[]): string;
  sortValue(graph: NeighbourhoodGraph, i: number, classes: ClassView[]): string | number;
}

const className = (classes: ClassView[], index: number) => (index >= 0 ? (classes[index]?.name ?? '') : '');

const columns: Column[] = [
  { key: 'id', title: 'Node', className: 'col-id', text: (g, i) => g.nodes.ids[i], sortValue: (g, i) => g.nodes.ids[i] },
  {
    key: 'label',
    title: 'Label',
    className: 'col-class',
    text: (g, i, c) => className(c, g.nodes.label[i]),
    sortValue: (g, i, c) => className(c, g.nodes.label[i]),
  },
  {
    key: 'predicted',
    title: 'Predicted',
    className: 'col-class',
    text: (g, i, c) => className(c, g.nodes.predicted[i]) || 'rejected',
    sortValue: (g, i, c) => className(c, g.nodes.predicted[i]),
  },
  {
    key: 'pending',
    title: 'Pending',
    className: 'col-class',
    text: (g, i, c) => className(c, g.nodes.pending[i]),
    sortValue: (g, i, c) => className(c, g.nodes.pending[i]),
  },
  {
    key: 'novelty',
    title: 'Novelty',
    className: 'col-number',
    text: (g, i) => g.nodes.novelty[i].toFixed(3),
    sortValue: (g, i) => g.nodes.novelty[i],
  },
  {
    key: 'text',
    title: 'Text',
    className: 'col-text',
    text: (g, i) => g.nodes.texts[i],
    sortValue: (g, i) => g.nodes.texts[i].toLowerCase(),
  },
];

export interface MemberTableEvents {
  selectionChanged(selectedIds: string[]): void;
  openNode(nodeId: string): void;
  focusNode(position: number): void;
  viewChanged(view: { search: string; sortColumn: string; sortDescending: boolean; scroll: number }): void;
}

export class MemberTable {
  readonly element: HTMLElement;
  private readonly search: HTMLElement & { value: string };
  private readonly count: HTMLElement;
  private readonly header: HTMLElement;
  private readonly viewport: HTMLElement;
  private readonly spacer: HTMLElement;
  private readonly rows: HTMLElement;
  private readonly selectShown: HTMLInputElement;
  private graph: NeighbourhoodGraph | null = null;
  private classes: ClassView[] = [];
  private candidateId: string | null = null;
  /** Positions into graph.nodes of the rows shown, after search and sort. */
  private order: number[] = [];
  private selected = new Set<number>();
  private sortColumn = 'novelty';
  private sortDescending = true;
  private frame = 0;
  private lastClicked = -1;
  /** The row the arrow keys are on (a position in `order`), −1 before the first arrow key. */
  private active = -1;

  constructor(private readonly events: MemberTableEvents) {
    this.search = el('vscode-textfield', {
      id: 'member-search',
      placeholder: 'Search members (id or text)',
      'aria-label': 'Search members',
    });
    this.search.addEventListener('input', () => {
      this.refilter();
      this.emitView();
    });
    this.count = el('span', { class: 'member-count', id: 'member-count' });
    this.selectShown = el('input', { type: 'checkbox', id: 'select-shown', 'aria-label': 'Select all shown members' });
    this.selectShown.addEventListener('change', () => {
      if (this.selectShown.checked) for (const i of this.order) this.selected.add(i);
      else for (const i of this.order) this.selected.delete(i);
      this.selectionChanged();
    });
    this.header = el('div', { class: 'member-row member-header', role: 'row' });
    this.viewport = el('div', {
      class: 'member-viewport',
      id: 'member-viewport',
      role: 'rowgroup',
      tabindex: 0,
      title: 'Arrow keys, Page Up/Down, Home and End move through the members; Space selects (Shift+arrow extends); Enter shows the node',
    });
    this.viewport.addEventListener('keydown', (event) => this.onKey(event));
    this.spacer = el('div', { class: 'member-spacer' });
    this.rows = el('div', { class: 'member-rows' });
    this.spacer.append(this.rows);
    this.viewport.append(this.spacer);
    this.viewport.addEventListener('scroll', () => this.schedule());
    this.viewport.addEventListener('scrollend', () => this.emitView());
    new ResizeObserver(() => this.schedule()).observe(this.viewport);
    this.element = el(
      'section',
      { class: 'members', 'aria-label': 'Members' },
      el('div', { class: 'members-toolbar' }, this.search, this.count),
      el('div', { class: 'member-table', role: 'table' }, this.header, this.viewport),
    );
    this.renderHeader();
  }

  restoreView(view: { search?: string; sortColumn?: string; sortDescending?: boolean }): void {
    if (view.search !== undefined) this.search.value = view.search;
    if (view.sortColumn && columns.some((c) => c.key === view.sortColumn)) this.sortColumn = view.sortColumn;
    if (view.sortDescending !== undefined) this.sortDescending = view.sortDescending;
    this.renderHeader();
  }

  setData(graph: NeighbourhoodGraph | null, classes: ClassView[], candidateId: string | null, scroll?: number): void {
    if (candidateId !== this.candidateId) {
      this.selected.clear();
      this.lastClicked = -1;
      this.active = -1;
    } else if (graph !== this.graph) {
      // The same candidate with other members (a move, an undo): the selection follows the node
      // ids, not the row positions, and drops members that left.
      const keep = new Set(this.selectedIds());
      this.selected.clear();
      this.lastClicked = -1;
      for (let i = 0; i < (graph?.memberCount ?? 0); i++) if (keep.has((graph as NeighbourhoodGraph).nodes.ids[i])) this.selected.add(i);
    }
    this.graph = graph;
    this.classes = classes;
    const sameCandidate = candidateId === this.candidateId;
    this.candidateId = candidateId;
    this.refilter(sameCandidate ? undefined : (scroll ?? 0));
    this.selectionChanged();
    // Read by bench/reviewPanelScale.ts: when the rows of a newly shown candidate are in the DOM.
    performance.mark(tableReadyMark);
  }

  selectedIds(): string[] {
    const graph = this.graph;
    return graph ? [...this.selected].sort((a, b) => a - b).map((i) => graph.nodes.ids[i]) : [];
  }

  clearSelection(): void {
    this.selected.clear();
    this.selectionChanged();
  }

  focusSearch(): void {
    (this.search.shadowRoot?.querySelector('input') ?? this.search).focus();
  }

  private emitView(): void {
    this.events.viewChanged({
      search: this.search.value ?? '',
      sortColumn: this.sortColumn,
      sortDescending: this.sortDescending,
      scroll: this.viewport.scrollTop,
    });
  }

  private renderHeader(): void {
    const cells = columns.map((column) => {
      const active = column.key === this.sortColumn;
      const button = el(
        'button',
        {
          class: `sort-button ${column.className}`,
          'data-column': column.key,
          'aria-sort': active ? (this.sortDescending ? 'descending' : 'ascending') : 'none',
          title: `Sort by ${column.title.toLowerCase()}`,
        },
        column.title,
        active ? (this.sortDescending ? ' ▾' : ' ▴') : '',
      );
      button.addEventListener('click', () => {
        if (this.sortColumn === column.key) this.sortDescending = !this.sortDescending;
        else {
          this.sortColumn = column.key;
          this.sortDescending = column.key === 'novelty';
        }
        this.renderHeader();
        this.refilter();
        this.emitView();
      });
      return button;
    });
    replaceChildren(this.header, el('span', { class: 'col-select' }, this.selectShown), ...cells);
  }

  private refilter(scroll?: number): void {
    const graph = this.graph;
    if (!graph) {
      this.order = [];
    } else {
      const query = (this.search.value ?? '').trim().toLowerCase();
      const order: number[] = [];
      for (let i = 0; i < graph.memberCount; i++) {
        if (!query || graph.nodes.ids[i].toLowerCase().includes(query) || graph.nodes.texts[i].toLowerCase().includes(query)) order.push(i);
      }
      const column = columns.find((c) => c.key === this.sortColumn) ?? columns[0];
      const keys = new Map(order.map((i) => [i, column.sortValue(graph, i, this.classes)]));
      const direction = this.sortDescending ? -1 : 1;
      order.sort((a, b) => {
        const x = keys.get(a) as string | number;
        const y = keys.get(b) as string | number;
        return (x < y ? -1 : x > y ? 1 : 0) * direction || a - b;
      });
      this.order = order;
    }
    this.count.textContent = graph ? `${this.order.length} of ${graph.memberCount} members · ${this.selected.size} selected` : '';
    this.spacer.style.height = `${this.order.length * rowHeight}px`;
    if (scroll !== undefined) this.viewport.scrollTop = scroll;
    this.active = Math.min(this.active, this.order.length - 1);
    this.render();
  }

  /** Keyboard use of the table: move the active row, select, show its node. */
  private onKey(event: KeyboardEvent): void {
    // A row's own checkbox keeps its keys (Space ticks that row).
    if (event.target instanceof HTMLInputElement) return;
    if (event.ctrlKey || event.metaKey || event.altKey || this.order.length === 0) return;
    const page = Math.max(1, Math.floor(this.viewport.clientHeight / rowHeight) - 1);
    const moves: Record<string, number> = { ArrowDown: 1, ArrowUp: -1, PageDown: page, PageUp: -page };
    let next = this.active;
    if (event.key in moves) next = this.active < 0 ? 0 : this.active + moves[event.key];
    else if (event.key === 'Home') next = 0;
    else if (event.key === 'End') next = this.order.length - 1;
    else if (event.key === ' ' && this.active >= 0) {
      event.preventDefault();
      this.toggle(this.order[this.active], this.active, false);
      return;
    } else if (event.key === 'Enter' && this.active >= 0) {
      event.preventDefault();
      this.events.focusNode(this.order[this.active]);
      return;
    } else return;
    event.preventDefault();
    next = Math.max(0, Math.min(this.order.length - 1, next));
    if (event.shiftKey && this.active >= 0 && next !== this.active) {
      const [from, to] = this.active < next ? [this.active, next] : [next, this.active];
      for (let r = from; r <= to; r++) this.selected.add(this.order[r]);
      this.lastClicked = next;
      this.active = next;
      this.scrollToActive();
      this.selectionChanged();
      return;
    }
    this.active = next;
    this.scrollToActive();
    this.render();
  }

  private scrollToActive(): void {
    const top = this.active * rowHeight;
    if (top < this.viewport.scrollTop) this.viewport.scrollTop = top;
    else if (top + rowHeight > this.viewport.scrollTop + this.viewport.clientHeight)
      this.viewport.scrollTop = top + rowHeight - this.viewport.clientHeight;
  }

  private schedule(): void {
    if (this.frame) return;
    this.frame = requestAnimationFrame(() => {
      this.frame = 0;
      this.render();
    });
  }

  private selectionChanged(): void {
    const graph = this.graph;
    this.count.textContent = graph ? `${this.order.length} of ${graph.memberCount} members · ${this.selected.size} selected` : '';
    this.selectShown.checked = this.order.length > 0 && this.order.every((i) => this.selected.has(i));
    this.render();
    this.events.selectionChanged(this.selectedIds());
  }

  private render(): void {
    const graph = this.graph;
    if (!graph) {
      this.rows.replaceChildren();
      return;
    }
    const { first, last } = visibleRows(this.viewport.scrollTop, this.viewport.clientHeight, this.order.length);
    this.rows.style.transform = `translateY(${first * rowHeight}px)`;
    const fragment = document.createDocumentFragment();
    for (let r = first; r < last; r++) fragment.append(this.row(graph, this.order[r], r));
    this.rows.replaceChildren(fragment);
    if (this.active >= first && this.active < last) this.viewport.setAttribute('aria-activedescendant', `member-row-${this.active}`);
    else this.viewport.removeAttribute('aria-activedescendant');
  }

  private row(graph: NeighbourhoodGraph, i: number, rowIndex: number): HTMLElement {
    const checkbox = el('input', { type: 'checkbox', 'aria-label': `Select ${graph.nodes.ids[i]}` });
    checkbox.checked = this.selected.has(i);
    checkbox.addEventListener('click', (event) => {
      event.stopPropagation();
      this.toggle(i, rowIndex, (event as MouseEvent).shiftKey);
    });
    const row = el(
      'div',
      {
        class: `member-row${this.selected.has(i) ? ' selected' : ''}${rowIndex === this.active ? ' active' : ''}`,
        id: `member-row-${rowIndex}`,
        role: 'row',
        'data-node': graph.nodes.ids[i],
        'aria-rowindex': rowIndex + 1,
      },
      el('span', { class: 'col-select' }, checkbox),
    );
    for (const column of columns) {
      const text = column.text(graph, i, this.classes);
      row.append(el('span', { class: column.className, role: 'cell', title: column.key === 'text' ? text : undefined }, text));
    }
    row.addEventListener('click', (event) => {
      if ((event as MouseEvent).shiftKey || (event as MouseEvent).ctrlKey || (event as MouseEvent).metaKey)
        this.toggle(i, rowIndex, (event as MouseEvent).shiftKey);
      else this.events.focusNode(i);
    });
    row.addEventListener('dblclick', () => this.events.openNode(graph.nodes.ids[i]));
    return row;
  }

  private toggle(i: number, rowIndex: number, range: boolean): void {
    if (range && this.lastClicked >= 0) {
      const [from, to] = this.lastClicked < rowIndex ? [this.lastClicked, rowIndex] : [rowIndex, this.lastClicked];
      for (let r = from; r <= to; r++) this.selected.add(this.order[r]);
    } else if (this.selected.has(i)) this.selected.delete(i);
    else this.selected.add(i);
    this.lastClicked = rowIndex;
    this.selectionChanged();
  }
}
