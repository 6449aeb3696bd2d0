// Text helpers shared by the report's charts and tables.

export function escapeHtml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

/** A metric in [0, 1] (or a difference of two) to three decimals; "—" when undefined. */
export function figure(value: number | null | undefined, digits = 3): string {
  return value === null || value === undefined || Number.isNaN(value) ? '—' : value.toFixed(digits);
}

export function percent(value: number | null | undefined, digits = 1): string {
  return value === null || value === undefined || Number.isNaN(value) ? '—' : `${(100 * value).toFixed(digits)}%`;
}

export function seconds(value: number): string {
  return value < 10 ? `${value.toFixed(2)} s` : `${value.toFixed(1)} s`;
}

/** Full-precision value for a data-value attribute (empty when undefined), so tests and scripts read exact numbers. */
export function exact(value: number | null | undefined): string {
  return value === null || value === undefined || Number.isNaN(value) ? '' : String(value);
}

/** Short numbers for axis ticks: no trailing zeros. */
export function tickLabel(value: number): string {
  if (Math.abs(value) >= 1000) return `${Math.round(value / 100) / 10}k`;
  return String(Number(value.toPrecision(4)));
}
