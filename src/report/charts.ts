// SVG charts of the report, rendered to strings (in Node or a browser alike). Theme colours come
// from CSS classes (series-*, axis, grid) so one SVG serves light, dark and high-contrast themes;
// every data mark carries a <title> and a data-tip for the hover tooltip.
import { scaleBand, scaleLinear, scalePoint, type ScaleLinear } from 'd3-scale';
import { line } from 'd3-shape';
import { escapeHtml, tickLabel } from './format';
import { textColourOn, viridis } from './palette';

export type Marker = 'circle' | 'square' | 'triangle' | 'diamond';

export interface ChartPoint {
  x: number;
  y: number | null;
  /** Hover text with the exact values. */
  tip: string;
  /** Short text printed beside the point (e.g. the swept setting). */
  label?: string;
}

export interface LineSeries {
  name: string;
  /** CSS class giving the series its colour: series-graph, series-baseline, series-third, series-fourth. */
  className: string;
  marker: Marker;
  dashed?: boolean;
  points: ChartPoint[];
}

export interface AxisSpec {
  label: string;
  /** Categorical axis: point i sits in the middle of band i. */
  categories?: string[];
  domain?: [number, number];
  format?: (value: number) => string;
}

export interface LineChartSpec {
  title: string;
  x: AxisSpec;
  y: AxisSpec;
  series: LineSeries[];
}

const WIDTH = 640;
const HEIGHT = 300;
const MARGIN = { left: 58, right: 18, top: 14, bottom: 46 };

function num(value: number): string {
  return String(Math.round(value * 10) / 10);
}

function svgOpen(title: string, height: number): string {
  return `<svg class="chart" viewBox="0 0 ${WIDTH} ${height}" role="img" aria-label="${escapeHtml(title)}" xmlns="http://www.w3.org/2000/svg"><title>${escapeHtml(title)}</title>`;
}

export function markerPath(marker: Marker, x: number, y: number, size = 4.5): string {
  switch (marker) {
    case 'circle':
      return `<circle class="marker" cx="${num(x)}" cy="${num(y)}" r="${size}"/>`;
    case 'square':
      return `<rect class="marker" x="${num(x - size)}" y="${num(y - size)}" width="${2 * size}" height="${2 * size}"/>`;
    case 'triangle':
      return `<path class="marker" d="M${num(x)},${num(y - size * 1.2)}L${num(x + size * 1.1)},${num(y + size * 0.8)}L${num(x - size * 1.1)},${num(y + size * 0.8)}Z"/>`;
    case 'diamond':
      return `<path class="marker" d="M${num(x)},${num(y - size * 1.3)}L${num(x + size)},${num(y)}L${num(x)},${num(y + size * 1.3)}L${num(x - size)},${num(y)}Z"/>`;
  }
}

interface Frame {
  x: (value: number) => number;
  y: ScaleLinear<number, number>;
  bottom: number;
  svgHeight: number;
  parts: string[];
}

/** Axes, grid lines and labels; returns the scales for the marks. */
function frame(spec: { title: string; x: AxisSpec; y: AxisSpec }, xValues: number[], yValues: number[]): Frame {
  const categories = spec.x.categories;
  const rotate = categories !== undefined && categories.length > 8;
  const bottomMargin = rotate ? MARGIN.bottom + 26 : MARGIN.bottom;
  const svgHeight = HEIGHT + (rotate ? 26 : 0);
  const bottom = svgHeight - bottomMargin;
  const right = WIDTH - MARGIN.right;
  const parts: string[] = [svgOpen(spec.title, svgHeight)];

  const y = scaleLinear().range([bottom, MARGIN.top]);
  if (spec.y.domain) y.domain(spec.y.domain);
  else y.domain([Math.min(0, ...yValues), Math.max(...yValues, 1e-9)]).nice(5);
  const yDomain = y.domain();
  const yFormat = spec.y.format ?? tickLabel;
  for (const t of y.ticks(5)) {
    parts.push(`<line class="grid" x1="${MARGIN.left}" x2="${right}" y1="${num(y(t))}" y2="${num(y(t))}"/>`);
    parts.push(`<text class="tick" x="${MARGIN.left - 6}" y="${num(y(t) + 4)}" text-anchor="end">${escapeHtml(yFormat(t))}</text>`);
  }
  if (yDomain[0] < 0 && yDomain[1] > 0)
    parts.push(`<line class="zero" x1="${MARGIN.left}" x2="${right}" y1="${num(y(0))}" y2="${num(y(0))}"/>`);

  let x: (value: number) => number;
  if (categories) {
    // Point i sits in the middle of band i: half a step of padding at either end.
    const point = scalePoint<number>()
      .domain(categories.map((_, i) => i))
      .range([MARGIN.left, right])
      .padding(0.5);
    x = (i: number) => point(i) ?? NaN;
    const every = Math.ceil(categories.length / 30);
    categories.forEach((c, i) => {
      if (i % every !== 0) return;
      const label = escapeHtml(c);
      parts.push(
        rotate
          ? `<text class="tick" transform="translate(${num(x(i) + 3)},${bottom + 10}) rotate(-45)" text-anchor="end">${label}</text>`
          : `<text class="tick" x="${num(x(i))}" y="${bottom + 16}" text-anchor="middle">${label}</text>`,
      );
    });
  } else {
    const xDomain =
      spec.x.domain ??
      scaleLinear()
        .domain([Math.min(...xValues), Math.max(...xValues)])
        .nice(6)
        .domain();
    const scale = scaleLinear()
      .domain(xDomain[0] === xDomain[1] ? [xDomain[0] - 1, xDomain[1] + 1] : xDomain)
      .range([MARGIN.left + 10, right - 10]);
    x = scale;
    const xFormat = spec.x.format ?? tickLabel;
    for (const t of scale.ticks(6)) {
      parts.push(`<line class="grid" x1="${num(scale(t))}" x2="${num(scale(t))}" y1="${MARGIN.top}" y2="${bottom}"/>`);
      parts.push(`<text class="tick" x="${num(scale(t))}" y="${bottom + 16}" text-anchor="middle">${escapeHtml(xFormat(t))}</text>`);
    }
  }
  parts.push(`<line class="axis" x1="${MARGIN.left}" x2="${right}" y1="${bottom}" y2="${bottom}"/>`);
  parts.push(`<line class="axis" x1="${MARGIN.left}" x2="${MARGIN.left}" y1="${MARGIN.top}" y2="${bottom}"/>`);
  parts.push(
    `<text class="axis-label" x="${(MARGIN.left + right) / 2}" y="${svgHeight - 6}" text-anchor="middle">${escapeHtml(spec.x.label)}</text>`,
  );
  parts.push(
    `<text class="axis-label" transform="translate(14,${(MARGIN.top + bottom) / 2}) rotate(-90)" text-anchor="middle">${escapeHtml(spec.y.label)}</text>`,
  );
  return { x, y, bottom, svgHeight, parts };
}

/** Lines with markers; a null value breaks the line. */
export function lineChart(spec: LineChartSpec): string {
  const all = spec.series.flatMap((s) => s.points);
  const f = frame(
    spec,
    all.map((p) => p.x),
    all.filter((p) => p.y !== null).map((p) => p.y as number),
  );
  // One decimal in path coordinates, as for every other mark; a null value starts a new subpath.
  const path = line<ChartPoint>()
    .defined((p) => p.y !== null)
    .x((p) => f.x(p.x))
    .y((p) => f.y(p.y as number))
    .digits(1);
  for (const series of spec.series) {
    const d = path(series.points);
    // Points at the same place (e.g. two history windows replaying the same nodes) share one label.
    const labels = new Map<string, { x: number; y: number; text: string[] }>();
    const marks = series.points
      .filter((p) => p.y !== null)
      .map((p) => {
        const px = f.x(p.x);
        const py = f.y(p.y as number);
        if (p.label) {
          const at = `${Math.round(px / 4)},${Math.round(py / 4)}`;
          const entry = labels.get(at) ?? { x: px, y: py, text: [] };
          entry.text.push(p.label);
          labels.set(at, entry);
        }
        return `<g class="pt" data-tip="${escapeHtml(p.tip)}"><title>${escapeHtml(p.tip)}</title>${markerPath(series.marker, px, py)}</g>`;
      });
    for (const l of labels.values())
      marks.push(`<text class="point-label" x="${num(l.x + 7)}" y="${num(l.y - 7)}">${escapeHtml(l.text.join(', '))}</text>`);
    f.parts.push(
      `<g class="series ${series.className}${series.dashed ? ' dashed' : ''}">${d ? `<path class="line" d="${d}"/>` : ''}${marks.join('')}</g>`,
    );
  }
  f.parts.push('</svg>');
  return f.parts.join('');
}

export interface BarSeries {
  name: string;
  className: string;
  values: (number | null)[];
  tips: string[];
}

export interface BarChartSpec {
  title: string;
  x: AxisSpec & { categories: string[] };
  y: AxisSpec;
  series: BarSeries[];
}

/** Bars grouped by category, one bar per series; bars grow from zero (up or down). */
export function groupedBarChart(spec: BarChartSpec): string {
  const values = spec.series.flatMap((s) => s.values.filter((v): v is number => v !== null));
  const f = frame(spec, [], values.length ? values : [0]);
  // Each category's bars fill the middle 80% of its band, centred under the category's tick.
  const band = scaleBand<number>()
    .domain(spec.x.categories.map((_, i) => i))
    .range([MARGIN.left, WIDTH - MARGIN.right])
    .paddingInner(0.2)
    .paddingOuter(0.1);
  const barWidth = Math.max(2, band.bandwidth() / spec.series.length);
  const [y0, y1] = f.y.domain();
  const zero = f.y(Math.max(y0, Math.min(0, y1)));
  spec.series.forEach((series, s) => {
    const bars = series.values.map((v, i) => {
      if (v === null) return '';
      const x = (band(i) ?? NaN) + s * barWidth;
      const top = Math.min(zero, f.y(v));
      const height = Math.max(1, Math.abs(f.y(v) - zero));
      return `<g class="pt" data-tip="${escapeHtml(series.tips[i])}"><title>${escapeHtml(series.tips[i])}</title><rect class="bar" x="${num(x)}" y="${num(top)}" width="${num(barWidth - 1)}" height="${num(height)}"/></g>`;
    });
    f.parts.push(`<g class="series ${series.className}">${bars.join('')}</g>`);
  });
  f.parts.push('</svg>');
  return f.parts.join('');
}

export interface HeatMapSpec {
  title: string;
  rowLabel: string;
  columnLabel: string;
  rows: string[];
  columns: string[];
  values: (number | null)[][];
  tip: (row: number, column: number, value: number | null) => string;
}

/** Cells coloured by value in [0, 1] (viridis), with the value printed when the cells are large enough. */
export function heatMap(spec: HeatMapSpec): string {
  const n = Math.max(spec.rows.length, spec.columns.length, 1);
  const left = 78;
  const top = 12;
  const legendWidth = 64;
  const cell = Math.min(44, (WIDTH - left - legendWidth - 10) / n);
  const gridHeight = cell * spec.rows.length;
  const rotate = spec.columns.length > 6;
  const labelSpace = rotate ? 62 : 24;
  const height = Math.max(top + gridHeight + labelSpace + 22, 200);
  const parts: string[] = [svgOpen(spec.title, height)];
  const every = Math.ceil(n / 30);
  const showValues = cell >= 30;
  spec.rows.forEach((rowKey, i) => {
    if (i % every === 0)
      parts.push(
        `<text class="tick" x="${left - 6}" y="${num(top + (i + 0.5) * cell + 4)}" text-anchor="end">${escapeHtml(rowKey)}</text>`,
      );
    spec.columns.forEach((_, j) => {
      const value = spec.values[i]?.[j] ?? null;
      const x = left + j * cell;
      const y = top + i * cell;
      const tip = escapeHtml(spec.tip(i, j, value));
      if (value === null) {
        parts.push(
          `<g class="pt" data-tip="${tip}"><title>${tip}</title><rect class="cell-empty" x="${num(x + 0.5)}" y="${num(y + 0.5)}" width="${num(cell - 1)}" height="${num(cell - 1)}"/></g>`,
        );
        return;
      }
      const fill = viridis(value);
      const text = showValues
        ? `<text class="cell-value" x="${num(x + cell / 2)}" y="${num(y + cell / 2 + 4)}" text-anchor="middle" fill="${textColourOn(fill)}">${value.toFixed(2)}</text>`
        : '';
      parts.push(
        `<g class="pt" data-tip="${tip}"><title>${tip}</title><rect class="cell" x="${num(x)}" y="${num(y)}" width="${num(cell)}" height="${num(cell)}" fill="${fill}"/>${text}</g>`,
      );
    });
  });
  const labelY = top + gridHeight + 8;
  spec.columns.forEach((columnKey, j) => {
    if (j % every !== 0) return;
    const cx = left + (j + 0.5) * cell;
    parts.push(
      rotate
        ? `<text class="tick" transform="translate(${num(cx + 3)},${num(labelY + 2)}) rotate(-45)" text-anchor="end">${escapeHtml(columnKey)}</text>`
        : `<text class="tick" x="${num(cx)}" y="${num(labelY + 10)}" text-anchor="middle">${escapeHtml(columnKey)}</text>`,
    );
  });
  parts.push(
    `<text class="axis-label" x="${num(left + (cell * spec.columns.length) / 2)}" y="${num(height - 6)}" text-anchor="middle">${escapeHtml(spec.columnLabel)}</text>`,
  );
  parts.push(
    `<text class="axis-label" transform="translate(14,${num(top + gridHeight / 2)}) rotate(-90)" text-anchor="middle">${escapeHtml(spec.rowLabel)}</text>`,
  );
  // Colour key: 0 at the bottom, 1 at the top.
  const keyX = left + cell * spec.columns.length + 24;
  const keyHeight = Math.max(100, Math.min(gridHeight, 200));
  const steps = 20;
  for (let k = 0; k < steps; k++) {
    const t0 = k / steps;
    parts.push(
      `<rect x="${keyX}" y="${num(top + keyHeight * (1 - (k + 1) / steps))}" width="12" height="${num(keyHeight / steps + 0.5)}" fill="${viridis(t0 + 0.5 / steps)}"/>`,
    );
  }
  for (const t of [0, 0.5, 1]) parts.push(`<text class="tick" x="${keyX + 16}" y="${num(top + keyHeight * (1 - t) + 4)}">${t}</text>`);
  parts.push('</svg>');
  return parts.join('');
}

export interface LegendEntry {
  name: string;
  className: string;
  marker?: Marker;
  dashed?: boolean;
  kind: 'line' | 'bar';
}

/** An HTML legend whose swatches use the same classes as the chart. */
export function legend(entries: LegendEntry[]): string {
  const items = entries.map((e) => {
    const swatch =
      e.kind === 'bar'
        ? `<rect class="bar" x="4" y="3" width="18" height="10"/>`
        : `<path class="line" d="M2,8L24,8"/>${markerPath(e.marker ?? 'circle', 13, 8, 3.5)}`;
    return `<span class="legend-item"><svg width="26" height="16" aria-hidden="true"><g class="series ${e.className}${e.dashed ? ' dashed' : ''}">${swatch}</g></svg>${escapeHtml(e.name)}</span>`;
  });
  return `<div class="legend">${items.join('')}</div>`;
}
