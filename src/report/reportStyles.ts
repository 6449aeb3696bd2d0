// The report's CSS. Two colour sources: standalone files follow the reader's system theme
// (prefers-color-scheme, prefers-contrast, forced-colors); inside a VS Code webview every colour
// comes from --vscode-* variables so the editor's theme, high contrast included, applies.

export type ReportMode = 'standalone' | 'webview';

// Okabe–Ito hues for the series: distinguishable with the common colour-vision deficiencies.
const STANDALONE_THEME = `
:root {
  color-scheme: light dark;
  --rc-fg: #1f2328; --rc-bg: #ffffff; --rc-muted: #57606a; --rc-grid: #d8dee4; --rc-axis: #57606a;
  --rc-graph: #0072b2; --rc-baseline: #d55e00; --rc-third: #009e73; --rc-fourth: #cc79a7;
  --rc-panel: #f6f8fa; --rc-border: #d0d7de; --rc-tip-bg: #1f2328; --rc-tip-fg: #ffffff; --rc-tip-border: #1f2328;
  --rc-notice-bg: #fff8e1; --rc-notice-border: #b58100; --rc-link: #0969da;
  font-family: system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", sans-serif; font-size: 14px;
}
@media (prefers-color-scheme: dark) {
  :root {
    --rc-fg: #e6edf3; --rc-bg: #0d1117; --rc-muted: #9da7b3; --rc-grid: #2d333b; --rc-axis: #9da7b3;
    --rc-graph: #56b4e9; --rc-baseline: #e69f00; --rc-third: #2fc59a; --rc-fourth: #e394c4;
    --rc-panel: #161b22; --rc-border: #30363d; --rc-tip-bg: #e6edf3; --rc-tip-fg: #0d1117; --rc-tip-border: #e6edf3;
    --rc-notice-bg: #2b2111; --rc-notice-border: #d29922; --rc-link: #58a6ff;
  }
}
@media (prefers-contrast: more) {
  :root { --rc-muted: var(--rc-fg); --rc-grid: var(--rc-muted); --rc-border: var(--rc-fg); }
  .series .line { stroke-width: 3; }
}
@media (forced-colors: active) {
  :root {
    --rc-fg: CanvasText; --rc-bg: Canvas; --rc-muted: CanvasText; --rc-grid: GrayText; --rc-axis: CanvasText;
    --rc-graph: CanvasText; --rc-baseline: Highlight; --rc-third: LinkText; --rc-fourth: GrayText;
    --rc-panel: Canvas; --rc-border: CanvasText; --rc-tip-bg: Canvas; --rc-tip-fg: CanvasText; --rc-tip-border: CanvasText;
    --rc-notice-bg: Canvas; --rc-notice-border: CanvasText; --rc-link: LinkText;
  }
  svg { forced-color-adjust: none; }
}`;

const WEBVIEW_THEME = `
:root {
  --rc-fg: var(--vscode-editor-foreground); --rc-bg: var(--vscode-editor-background);
  --rc-muted: var(--vscode-descriptionForeground); --rc-grid: var(--vscode-charts-lines); --rc-axis: var(--vscode-charts-foreground);
  --rc-graph: var(--vscode-charts-blue); --rc-baseline: var(--vscode-charts-orange);
  --rc-third: var(--vscode-charts-green); --rc-fourth: var(--vscode-charts-purple);
  --rc-panel: var(--vscode-editorWidget-background); --rc-border: var(--vscode-editorWidget-border, var(--vscode-contrastBorder));
  --rc-tip-bg: var(--vscode-editorHoverWidget-background); --rc-tip-fg: var(--vscode-editorHoverWidget-foreground);
  --rc-tip-border: var(--vscode-editorHoverWidget-border);
  --rc-notice-bg: var(--vscode-textBlockQuote-background); --rc-notice-border: var(--vscode-textBlockQuote-border);
  --rc-link: var(--vscode-textLink-foreground);
  font-family: var(--vscode-font-family); font-size: var(--vscode-font-size);
}
body.vscode-high-contrast .series .line, body.vscode-high-contrast-light .series .line { stroke-width: 3; }
body.vscode-high-contrast td, body.vscode-high-contrast th { border-color: var(--vscode-contrastBorder); }`;

const LAYOUT = `
body { margin: 0; padding: 16px 24px 48px; background: var(--rc-bg); color: var(--rc-fg); line-height: 1.45; }
h1 { font-size: 1.5em; margin: 0.2em 0 0.4em; }
h2 { font-size: 1.2em; margin: 1.8em 0 0.3em; border-bottom: 1px solid var(--rc-border); padding-bottom: 0.2em; }
p.lead, p.explain { color: var(--rc-muted); margin: 0.2em 0 0.6em; max-width: 70em; }
.notice { border-left: 4px solid var(--rc-notice-border); background: var(--rc-notice-bg); padding: 8px 12px; margin: 12px 0; max-width: 70em; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 2px 16px; margin: 8px 0; }
dl.facts dt { color: var(--rc-muted); } dl.facts dd { margin: 0; overflow-wrap: anywhere; }
code { font-family: ui-monospace, SFMono-Regular, Menlo, Consolas, monospace; font-size: 0.92em; }
.figure { display: grid; grid-template-columns: minmax(300px, 640px) minmax(260px, 1fr); gap: 12px 24px; align-items: start; margin: 8px 0 4px; }
@media (max-width: 960px) { .figure { grid-template-columns: minmax(0, 1fr); } }
.chart-box { min-width: 0; }
.table-box { max-height: 440px; overflow: auto; border: 1px solid var(--rc-border); border-radius: 4px; }
svg.chart { width: 100%; height: auto; display: block; font-family: inherit; }
.grid { stroke: var(--rc-grid); stroke-width: 1; }
.axis, .zero { stroke: var(--rc-axis); stroke-width: 1; }
.tick { fill: var(--rc-muted); font-size: 11px; }
.axis-label { fill: var(--rc-fg); font-size: 12px; }
.point-label { fill: var(--rc-muted); font-size: 10px; }
.series-graph { --series: var(--rc-graph); } .series-baseline { --series: var(--rc-baseline); }
.series-third { --series: var(--rc-third); } .series-fourth { --series: var(--rc-fourth); }
.series .line { fill: none; stroke: var(--series); stroke-width: 2; }
.series.dashed .line { stroke-dasharray: 6 4; }
.series .marker { fill: var(--series); stroke: var(--rc-bg); stroke-width: 1; }
.series.dashed .marker { fill: var(--rc-bg); stroke: var(--series); stroke-width: 2; }
.series .bar { fill: var(--series); }
.pt:hover .marker, .pt:hover .bar, .pt:hover .cell { stroke: var(--rc-fg); stroke-width: 2; }
.cell-empty { fill: none; stroke: var(--rc-grid); stroke-dasharray: 2 2; }
.cell-value { font-size: 11px; pointer-events: none; }
.legend { display: flex; flex-wrap: wrap; gap: 4px 18px; font-size: 12px; margin: 2px 0 4px; }
.legend-item { display: inline-flex; align-items: center; gap: 4px; }
table { border-collapse: collapse; font-variant-numeric: tabular-nums; font-size: 12px; width: 100%; }
caption { text-align: left; font-weight: 600; padding: 6px 8px; color: var(--rc-fg); }
th, td { padding: 3px 6px; border-bottom: 1px solid var(--rc-border); text-align: right; white-space: nowrap; }
thead th { position: sticky; top: 0; background: var(--rc-panel); } th { font-weight: 600; }
th:first-child, td:first-child { text-align: left; }
table.summary { width: auto; } table.summary td, table.summary th { padding: 4px 12px; }
.tooltip { position: fixed; z-index: 10; pointer-events: none; background: var(--rc-tip-bg); color: var(--rc-tip-fg); border: 1px solid var(--rc-tip-border); border-radius: 3px; padding: 4px 8px; font-size: 12px; max-width: 340px; white-space: pre-line; }
.tooltip[hidden] { display: none; }
footer { margin-top: 2em; color: var(--rc-muted); font-size: 12px; }`;

export function reportCss(mode: ReportMode): string {
  return (mode === 'webview' ? WEBVIEW_THEME : STANDALONE_THEME) + LAYOUT;
}
