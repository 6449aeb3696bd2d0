// Flags that work for Debian's Chromium on these machines (headless, root, no GPU, no network),
// as FIELD-NOTES.md records them; WebGL still works (in software) with --disable-gpu. Shared by
// the webview, report and end-to-end tests.
export const chromiumFlags: readonly string[] = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
  '--disable-quic',
];
