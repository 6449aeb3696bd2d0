// The quality-over-time report as HTML. Two entry points:
// - renderReportParts: the <style> and the body (markup + script), each tagged with the CSP
//   nonce, for a host that wraps them in its own document (a VS Code webview panel);
// - renderReportDocument: one self-contained file (all CSS and JS inline, no network), with a
//   Content-Security-Policy that forbids loading anything.
// Charts are SVG drawn here, so the figures are in the file even with scripts off.
import { randomBytes } from 'node:crypto';
import type { QualityReport } from '../engine/report/reportTypes';
import { escapeHtml } from './format';
import { REPORT_SCRIPT } from './reportScript';
import { headerSection, matrixSections, perSliceSections, summarySection, sweepSections, warmColdSection } from './reportSections';
import { reportCss, type ReportMode } from './reportStyles';

export type { ReportMode } from './reportStyles';

export interface RenderOptions {
  /** 'webview': colours only from --vscode-* variables; 'standalone': own light/dark/high-contrast CSS. */
  mode: ReportMode;
  /** Nonce for the <style> and <script> elements (the page's CSP must allow it). */
  nonce: string;
}

export interface ReportParts {
  /** A <style> element for the document head. */
  head: string;
  /** Markup and the tooltip <script>, for the document body. */
  body: string;
}

export function renderReportParts(report: QualityReport, options: RenderOptions): ReportParts {
  const nonce = escapeHtml(options.nonce);
  const sections = [
    headerSection(report),
    summarySection(report),
    perSliceSections(report),
    matrixSections(report),
    warmColdSection(report),
    sweepSections(report),
  ].join('\n');
  const footer = `<footer>Report format ${report.formatVersion}. Figures from evaluateSlices on ${escapeHtml(report.dataset.name)}; hover a mark for its exact values.</footer>`;
  return {
    head: `<style nonce="${nonce}">${reportCss(options.mode)}</style>`,
    body: `<main>${sections}${footer}</main><div id="report-tooltip" class="tooltip" role="tooltip" hidden></div><script nonce="${nonce}">${REPORT_SCRIPT}</script>`,
  };
}

export function newNonce(): string {
  return randomBytes(16)
    .toString('base64')
    .replace(/[^A-Za-z0-9]/g, '');
}

/** A whole HTML file that opens offline in any browser. */
export function renderReportDocument(report: QualityReport, options: Partial<RenderOptions> = {}): string {
  const nonce = options.nonce ?? newNonce();
  const parts = renderReportParts(report, { mode: options.mode ?? 'standalone', nonce });
  const csp = `default-src 'none'; style-src 'nonce-${nonce}'; script-src 'nonce-${nonce}'; img-src data:`;
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    `<meta http-equiv="Content-Security-Policy" content="${csp}">`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>Quality over time: ${escapeHtml(report.dataset.name)}</title>`,
    parts.head,
    '</head>',
    '<body>',
    parts.body,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
