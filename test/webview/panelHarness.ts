// Runs the review panel's webview in Debian's Chromium against a stubbed host: the page gets a
// fake acquireVsCodeApi whose postMessage goes to a real ReviewController (over a real
// ReviewSession built from a synthetic scenario) running here in Node, and the controller's
// replies come back as window message events, as VS Code delivers them. The page is served
// with the same HTML and Content-Security-Policy the extension uses (src/review/webviewHtml.ts).
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import * as path from 'node:path';
import * as esbuild from 'esbuild';
import { chromium, type Browser, type Page } from 'playwright-core';
import type { HostToWebviewMessage, ThresholdPreviewResult, ThresholdSetting } from '../../src/protocol/webview';
import { ReviewController } from '../../src/review/reviewController';
import type { ReviewCandidate } from '../../src/review/reviewCandidate';
import type { ReviewContext } from '../../src/review/reviewContext';
import { ReviewSession } from '../../src/review/reviewSession';
import { reviewPanelHtml } from '../../src/review/webviewHtml';
import type { Theme } from './themes';
import { chromiumFlags } from '../chromiumFlags';

export const chromiumPath = '/usr/bin/chromium';
export const projectRoot = path.resolve(__dirname, '..', '..');
export const screenshotFolder = path.join(projectRoot, 'test-output', 'webview-screenshots');
const bundleFolder = path.join(projectRoot, 'test-output', 'webview-test');
const origin = 'https://webview.test';

export function requireChromium(): void {
  if (!existsSync(chromiumPath)) {
    throw new Error(
      `${chromiumPath} is missing: the webview tests drive Debian's Chromium. Run scripts/e2e/setup.sh (or apt-get install -y chromium) first.`,
    );
  }
}

let bundle: string | null = null;

/** Bundles webview/main.ts with the options esbuild.mjs uses for dist/webview/webview.js, so the test sees the current source. */
export async function webviewBundle(): Promise<string> {
  if (bundle) return bundle;
  mkdirSync(bundleFolder, { recursive: true });
  const outfile = path.join(bundleFolder, 'webview.js');
  await esbuild.build({
    entryPoints: [path.join(projectRoot, 'webview', 'main.ts')],
    outfile,
    bundle: true,
    platform: 'browser',
    target: 'chrome120',
    format: 'iife',
    logLevel: 'warning',
  });
  bundle = readFileSync(outfile, 'utf8');
  return bundle;
}

export async function launchBrowser(): Promise<Browser> {
  requireChromium();
  return chromium.launch({ executablePath: chromiumPath, args: [...chromiumFlags] });
}

export interface PanelOptions {
  context: ReviewContext;
  candidates: ReviewCandidate[];
  theme: Theme;
  themeKind?: 'light' | 'dark';
  /** What getState() returns at start (a restored panel). */
  savedState?: unknown;
  /** Stubs canvas WebGL contexts away, as in a VS Code without WebGL. */
  withoutWebgl?: boolean;
  previewThreshold?: (setting: ThresholdSetting) => ThresholdPreviewResult;
  baseline?: ThresholdPreviewResult | null;
  viewport?: { width: number; height: number };
  /** What the host does on loadSecondLook: put queues into the session; returns the message shown. */
  loadSecondLook?: (session: ReviewSession) => string;
}

export interface Panel {
  page: Page;
  session: ReviewSession;
  /** Every message the webview posted, in order (as the host received them). */
  posted: unknown[];
  /** Every message the host sent back. */
  sent: HostToWebviewMessage[];
  exported: unknown[];
  opened: string[];
  /** The first message posted at index `from` or later that matches; fails after 10 s saying what was posted. */
  nextPosted(from: number, predicate: (message: Record<string, unknown>) => boolean, what: string): Promise<Record<string, unknown>>;
  /** Uncaught errors and console errors of the page. */
  pageErrors: string[];
  /** Content-Security-Policy violations the page reported. */
  violations(): Promise<string[]>;
  close(): Promise<void>;
}

export async function openPanel(browser: Browser, options: PanelOptions): Promise<Panel> {
  const script = await webviewBundle();
  const css = readFileSync(path.join(projectRoot, 'media', 'review.css'), 'utf8');
  const html = reviewPanelHtml({
    scriptUri: `${origin}/dist/webview/webview.js`,
    styleUri: `${origin}/media/review.css`,
    cspSource: origin,
    nonce: 'testNonce0123456789abcdef',
  });
  const context = await browser.newContext({ viewport: options.viewport ?? { width: 1400, height: 900 }, deviceScaleFactor: 1 });
  const page = await context.newPage();
  await page.route(`${origin}/**`, (route) => {
    const url = new URL(route.request().url());
    if (url.pathname === '/index.html') return route.fulfill({ contentType: 'text/html', body: html });
    if (url.pathname === '/dist/webview/webview.js') return route.fulfill({ contentType: 'text/javascript', body: script });
    if (url.pathname === '/media/review.css') return route.fulfill({ contentType: 'text/css', body: css });
    return route.fulfill({ status: 404, body: 'not found' });
  });
  const pageErrors: string[] = [];
  page.on('pageerror', (error) => pageErrors.push(error.message));
  page.on('console', (message) => {
    if (message.type() === 'error' || message.type() === 'warning') pageErrors.push(message.text());
  });
  const session = new ReviewSession(options.context, options.candidates, () => new Date(Date.UTC(2024, 11, 1, 9, 0, 0)));
  const posted: unknown[] = [];
  const sent: HostToWebviewMessage[] = [];
  const exported: unknown[] = [];
  const opened: string[] = [];
  const controller = new ReviewController(
    session,
    {
      post: (message) => {
        sent.push(message);
        // As a JSON string: Playwright rebuilds an object argument value by value in the page, which
        // takes seconds for the snapshot of a candidate of thousands of members.
        void page.evaluate((json) => window.postMessage(JSON.parse(json), '*'), JSON.stringify(message)).catch(() => undefined);
      },
      previewThreshold: options.previewThreshold,
      exportDecisions: (file) => {
        exported.push(file);
        return Promise.resolve(`wrote ${file.decisions.length} decisions`);
      },
      applyDecisions: (file) => Promise.resolve(`applied ${file.decisions.length} decisions`),
      openNode: (nodeId) => opened.push(nodeId),
      ...(options.loadSecondLook ? { loadSecondLook: () => Promise.resolve(options.loadSecondLook!(session)) } : {}),
    },
    options.baseline ?? null,
  );
  await page.exposeFunction('__toHost', async (message: unknown) => {
    posted.push(message);
    await controller.receive(message);
  });
  // A script string rather than a function: tsx would wrap a function's inner functions in a
  // helper (__name) that does not exist in the page.
  await page.addInitScript(`(() => {
    const savedState = ${JSON.stringify(options.savedState ?? null)};
    const withoutWebgl = ${JSON.stringify(options.withoutWebgl ?? false)};
    window.__cspViolations = [];
    document.addEventListener('securitypolicyviolation', (event) => window.__cspViolations.push(event.violatedDirective + ': ' + event.blockedURI));
    let state = savedState;
    window.__state = () => state;
    window.acquireVsCodeApi = () => ({
      postMessage: (message) => window.__toHost(JSON.parse(JSON.stringify(message))),
      getState: () => state,
      setState: (next) => { state = next; },
    });
    if (withoutWebgl) {
      const original = HTMLCanvasElement.prototype.getContext;
      HTMLCanvasElement.prototype.getContext = function (kind, ...rest) {
        if (kind === 'webgl' || kind === 'webgl2' || kind === 'experimental-webgl') return null;
        return original.call(this, kind, ...rest);
      };
    }
  })();`);
  await page.goto(`${origin}/index.html`);
  await page.evaluate(
    ({ theme, kind }) => {
      for (const [name, value] of Object.entries(theme)) document.documentElement.style.setProperty(name, value);
      document.body.classList.add(kind === 'dark' ? 'vscode-dark' : 'vscode-light');
    },
    { theme: options.theme, kind: options.themeKind ?? 'light' },
  );
  const panel: Panel = {
    page,
    session,
    posted,
    sent,
    exported,
    opened,
    pageErrors,
    nextPosted: async (from, predicate, what) => {
      const deadline = Date.now() + 10_000;
      for (;;) {
        const hit = posted.slice(from).find((m) => predicate(m as Record<string, unknown>));
        if (hit) return hit as Record<string, unknown>;
        if (Date.now() > deadline)
          throw new Error(
            `the webview did not post ${what}; after #${from} it posted ${JSON.stringify(posted.slice(from))}; page errors: ${JSON.stringify(pageErrors)}`,
          );
        await new Promise((r) => setTimeout(r, 20));
      }
    },
    violations: () => page.evaluate(() => (window as unknown as { __cspViolations: string[] }).__cspViolations),
    close: () => context.close(),
  };
  await panel.nextPosted(0, (m) => m.type === 'ready', 'ready');
  await page.locator('#candidate-title, #no-candidate').first().waitFor();
  return panel;
}
