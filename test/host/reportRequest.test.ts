// The quality report as the extension asks for it: the real engine worker bundle builds the report
// of a small generated dataset and renders it for a webview; the host wraps it in a CSP page.
import * as assert from 'node:assert/strict';
import { existsSync, promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { generateDemoDataset } from '../../demo-data/generator/writeDataset';
import { DEFAULT_DEMO_OPTIONS } from '../../demo-data/generator/options';
import { reportCacheFolder } from '../../src/engine/report/reportCache';
import { defaultRunSettings, type RunSettings } from '../../src/engine/pipeline/runSettings';
import { RequestCancelledError } from '../../src/host/engineErrors';
import { reportPanelHtml } from '../../src/host/reportPanelHtml';
import { WorkerConnection } from '../../src/host/workerConnection';
import type { DatasetSummary, ReportOutcome } from '../../src/protocol/worker';
import { newNonce } from '../../src/review/webviewHtml';
import { buildNodeBundle } from './fixtures/buildBundle';

const fastSettings: RunSettings = { ...defaultRunSettings, epochs: 20, thresholdFolds: 0 };

/** The rows of the table with this caption, each as its cells' text. */
function tableRows(html: string, caption: string): string[][] {
  const start = html.indexOf(`<caption>${caption}</caption>`);
  assert.ok(start >= 0, `no table captioned "${caption}"`);
  const table = html.slice(start, html.indexOf('</table>', start));
  const body = table.slice(table.indexOf('<tbody>'));
  return [...body.matchAll(/<tr>(.*?)<\/tr>/g)].map((row) =>
    [...row[1].matchAll(/<t[dh][^>]*>(.*?)<\/t[dh]>/g)].map((cell) => cell[1].replace(/<[^>]+>/g, '')),
  );
}

describe('quality report through the engine worker (real bundle)', function () {
  this.timeout(300_000);
  let workerScript: string;
  let root: string;
  let folder: string;
  let connection: WorkerConnection;
  let summary: DatasetSummary;
  let outcome: ReportOutcome;
  const nonce = newNonce();
  const progress: string[] = [];

  before(async () => {
    workerScript = (await buildNodeBundle('src/engine/worker/engineWorker.ts', 'engine-worker.js')).outfile;
    root = await fs.mkdtemp(path.join(os.tmpdir(), 'report-request-'));
    folder = path.join(root, 'wind-farm');
    await generateDemoDataset({ ...DEFAULT_DEMO_OPTIONS, nodes: 300, out: folder });
    connection = new WorkerConnection({ workerScript });
    summary = await connection.request('summary', { folder });
    outcome = await connection.request(
      'report',
      { folder, settings: fastSettings, truthFile: null, quick: true, nonce },
      { onProgress: (stage) => progress.push(stage) },
    );
  });

  after(async () => {
    await connection.dispose();
    await fs.rm(root, { recursive: true, force: true });
  });

  it('returns the per-slice accuracy table, one row per slice of the dataset', () => {
    const rows = tableRows(outcome.body, 'Accuracy per slice');
    assert.deepEqual(
      rows.map((row) => row[0]),
      summary.slices.map((slice) => slice.key),
    );
    for (const row of rows) {
      assert.equal(row.length, 5, JSON.stringify(row));
      // Graph and MLP accuracy: a figure in [0, 1] or a dash where a slice has no test nodes.
      for (const cell of row.slice(3)) assert.ok(cell === '—' || (Number(cell) >= 0 && Number(cell) <= 1), `accuracy cell "${cell}"`);
    }
    assert.ok(
      rows.some((row) => row[3] !== '—'),
      'at least one slice has a graph-model accuracy',
    );
    assert.equal(outcome.summary.slices, summary.slices.length);
    assert.equal(outcome.summary.dataset, summary.name);
  });

  it('carries the caution that model suggestions are not decisions', () => {
    assert.match(outcome.body, /Model suggestions are not decisions/);
  });

  it('is rendered for a webview: the given nonce on <style> and <script>, theme colours only', () => {
    assert.match(outcome.head, new RegExp(`^<style nonce="${nonce}">`));
    assert.match(outcome.body, new RegExp(`<script nonce="${nonce}">`));
    assert.doesNotMatch(outcome.head, /#[0-9a-f]{3,8}\b|rgb\(|prefers-color-scheme/i);
    assert.match(outcome.head, /var\(--vscode-/);
  });

  it('reports progress, computes the first time and reads the cache the second time', async () => {
    assert.ok(
      progress.some((stage) => stage.startsWith('warm start')),
      progress.slice(0, 5).join(', '),
    );
    assert.equal(outcome.summary.fromCache, false);
    assert.ok(existsSync(reportCacheFolder(folder)), 'the report is cached under runs/');
    const again = await connection.request('report', { folder, settings: fastSettings, quick: true, nonce });
    assert.equal(again.summary.fromCache, true);
    assert.equal(again.summary.createdAt, outcome.summary.createdAt);
    assert.equal(again.body, outcome.body);
  });

  it('stops with a cancellation error when the request is cancelled', async () => {
    const abort = new AbortController();
    const pending = connection.request(
      'report',
      { folder, settings: fastSettings, quick: false, nonce, useCache: false },
      { signal: abort.signal, onProgress: () => abort.abort() },
    );
    await assert.rejects(pending, RequestCancelledError);
  });

  it('wraps the parts in a page whose CSP allows only the nonce-tagged style and script', () => {
    const html = reportPanelHtml({ head: outcome.head, body: outcome.body, nonce, title: 'Quality: wind-farm' });
    assert.ok(
      html.includes(`content="default-src 'none'; style-src 'nonce-${nonce}'; script-src 'nonce-${nonce}'"`),
      'the CSP meta element',
    );
    const tagged = [...html.matchAll(/<(style|script)\b([^>]*)>/g)];
    assert.equal(tagged.length, 2);
    for (const tag of tagged) assert.match(tag[2], new RegExp(`nonce="${nonce}"`));
    assert.doesNotMatch(html, /<link\b|\bsrc=|@import|url\(/i);
    assert.throws(() => reportPanelHtml({ head: '', body: '', nonce: 'x"y', title: 't' }), /nonce/);
  });
});
