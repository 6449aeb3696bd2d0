// The document of the quality report panel: the parts the worker rendered (a <style> and the body
// markup with its tooltip <script>, both carrying the nonce) wrapped in a page whose CSP allows
// nothing but those two elements. vscode-free, so the page is tested without VS Code.
import { escapeHtml } from './overviewHtml';

export interface ReportPanelParts {
  head: string;
  body: string;
  nonce: string;
  title: string;
}

export function reportContentSecurityPolicy(nonce: string): string {
  return `default-src 'none'; style-src 'nonce-${nonce}'; script-src 'nonce-${nonce}'`;
}

export function reportPanelHtml(parts: ReportPanelParts): string {
  if (!/^[A-Za-z0-9]{16,}$/.test(parts.nonce)) throw new Error('the report panel nonce must be at least 16 letters and digits');
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    `<meta http-equiv="Content-Security-Policy" content="${reportContentSecurityPolicy(parts.nonce)}">`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${escapeHtml(parts.title)}</title>`,
    parts.head,
    '</head>',
    '<body>',
    parts.body,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
