// Tables beside the charts, holding the same numbers. Numeric cells carry data-value with the
// exact figure so that scripts and tests read numbers, not rounded text.
import { escapeHtml, exact } from './format';

export interface TableCell {
  text: string;
  /** Exact number behind the text (omitted for labels). */
  value?: number | null;
  /** Stable name for this figure, e.g. "acc-graph" (data-metric attribute). */
  metric?: string;
}

export type CellInput = TableCell | string;

function cellOf(input: CellInput): TableCell {
  return typeof input === 'string' ? { text: input } : input;
}

export function htmlTable(caption: string, headers: string[], rows: CellInput[][], className = ''): string {
  const head = `<thead><tr>${headers.map((h) => `<th scope="col">${escapeHtml(h)}</th>`).join('')}</tr></thead>`;
  const body = rows
    .map((row) => {
      const cells = row.map((input, k) => {
        const cell = cellOf(input);
        const attributes = [
          cell.value !== undefined ? ` data-value="${exact(cell.value)}"` : '',
          cell.metric ? ` data-metric="${escapeHtml(cell.metric)}"` : '',
        ].join('');
        return k === 0 ? `<th scope="row"${attributes}>${escapeHtml(cell.text)}</th>` : `<td${attributes}>${escapeHtml(cell.text)}</td>`;
      });
      return `<tr>${cells.join('')}</tr>`;
    })
    .join('');
  return `<table${className ? ` class="${className}"` : ''}><caption>${escapeHtml(caption)}</caption>${head}<tbody>${body}</tbody></table>`;
}
