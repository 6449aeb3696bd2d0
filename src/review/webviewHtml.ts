// The review panel's HTML. Nothing inline: one script (with a nonce), one stylesheet, both from
// the extension's media/dist folders; the layout worker is a blob: URL, hence worker-src blob:.
// vscode-elements' components style themselves with constructed stylesheets, which the policy
// does not govern, so style-src needs no 'unsafe-inline'.

export interface ReviewHtmlParts {
  /** webview.asWebviewUri(dist/webview/webview.js).toString() */
  scriptUri: string;
  /** webview.asWebviewUri(media/review.css).toString() */
  styleUri: string;
  /** webview.cspSource */
  cspSource: string;
  /** Fresh per render: see newNonce. */
  nonce: string;
  title?: string;
}

const escapeAttribute = (value: string) => value.replace(/&/g, '&amp;').replace(/"/g, '&quot;').replace(/</g, '&lt;').replace(/>/g, '&gt;');

/** 32 random characters from [A-Za-z0-9], from crypto.getRandomValues. */
export function newNonce(): string {
  const alphabet = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789';
  const bytes = new Uint8Array(32);
  globalThis.crypto.getRandomValues(bytes);
  return Array.from(bytes, (b) => alphabet[b % alphabet.length]).join('');
}

export function contentSecurityPolicy(cspSource: string, nonce: string): string {
  return [
    "default-src 'none'",
    `img-src ${cspSource} data:`,
    `style-src ${cspSource}`,
    `font-src ${cspSource}`,
    `script-src 'nonce-${nonce}'`,
    'worker-src blob:',
  ].join('; ');
}

export function reviewPanelHtml(parts: ReviewHtmlParts): string {
  if (!/^[A-Za-z0-9+/=_-]{16,}$/.test(parts.nonce))
    throw new Error('reviewPanelHtml: the nonce must be at least 16 characters of [A-Za-z0-9+/=_-]');
  const title = escapeAttribute(parts.title ?? 'Review candidates');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="UTF-8">
<meta http-equiv="Content-Security-Policy" content="${escapeAttribute(contentSecurityPolicy(parts.cspSource, parts.nonce))}">
<meta name="viewport" content="width=device-width, initial-scale=1.0">
<link rel="stylesheet" href="${escapeAttribute(parts.styleUri)}">
<title>${title}</title>
</head>
<body>
<div id="review-root" class="review-root" aria-live="polite"><p class="review-loading">Loading review…</p></div>
<script nonce="${escapeAttribute(parts.nonce)}" src="${escapeAttribute(parts.scriptUri)}"></script>
</body>
</html>
`;
}
