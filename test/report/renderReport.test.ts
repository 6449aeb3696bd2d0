import * as assert from 'node:assert/strict';
import { continualSummary, completeSliceSet } from '../../src/engine/report/continualSummary';
import { renderReportDocument, renderReportParts } from '../../src/report/renderReport';
import { reportCss } from '../../src/report/reportStyles';
import { handMadeReport, metricCell, SLICES } from './reportFixture';

// A 3-slice accuracy matrix worked by hand with the definitions of Lopez-Paz & Ranzato 2017
// (Gradient Episodic Memory, section 2.1), R[i][j] = accuracy on slice j after training through i:
//   ACC = (R20 + R21 + R22) / 3            = (0.6 + 0.8 + 0.95) / 3        = 0.783333…
//   BWT = ((R20 − R00) + (R21 − R11)) / 2  = ((0.6 − 0.8) + (0.8 − 0.9)) / 2 = −0.15
//   FWT = ((R01 − b1) + (R12 − b2)) / 2    = ((0.3 − 0.2) + (0.4 − 0.25)) / 2 = 0.125
const R = [
  [0.8, 0.3, 0.2],
  [0.7, 0.9, 0.4],
  [0.6, 0.8, 0.95],
];
const UNTRAINED = [0.1, 0.2, 0.25];
const HAND = { acc: 2.35 / 3, bwt: -0.15, fwt: 0.125 };

describe('report rendering', () => {
  it('shows ACC, BWT and FWT of a hand-worked accuracy matrix in the summary table', () => {
    const html = renderReportDocument(handMadeReport(R, UNTRAINED));
    for (const [metric, expected, text] of [
      ['acc-graph', HAND.acc, '0.783'],
      ['bwt-graph', HAND.bwt, '-0.150'],
      ['fwt-graph', HAND.fwt, '0.125'],
    ] as const) {
      const cell = metricCell(html, metric);
      assert.ok(Math.abs(cell.value - expected) < 1e-12, `${metric}: ${cell.value} vs ${expected}`);
      assert.equal(cell.text, text);
    }
    // The heat map's table holds the matrix itself.
    assert.equal(metricCell(html, 'matrix-graph-2-0').value, 0.6);
    assert.equal(metricCell(html, 'matrix-graph-0-2').text, '0.20');
  });

  it('summarises only the slices where the matrix is complete', () => {
    // Slice 0 has no test nodes (its row and column undefined): the summaries are those of the
    // remaining 3×3 block, the hand-worked matrix above.
    const withEmpty = [
      [null, null, null, null],
      [null, ...R[0]],
      [null, ...R[1]],
      [null, ...R[2]],
    ];
    assert.deepEqual(completeSliceSet(withEmpty), [1, 2, 3]);
    const summary = continualSummary(withEmpty, ['s0', ...SLICES], [null, ...UNTRAINED]);
    assert.deepEqual(summary.slicesUsed, SLICES);
    assert.ok(Math.abs((summary.averageAccuracy as number) - HAND.acc) < 1e-12);
    assert.ok(Math.abs((summary.backwardTransfer as number) - HAND.bwt) < 1e-12);
    assert.ok(Math.abs((summary.forwardTransfer as number) - HAND.fwt) < 1e-12);
    // Without the untrained accuracy of a kept slice, FWT is not defined.
    assert.equal(continualSummary(R, SLICES, [0.1, null, 0.25]).forwardTransfer, null);
  });

  it('is one self-contained file: nothing loaded from the network, a CSP that forbids loading', () => {
    const html = renderReportDocument(handMadeReport(R, UNTRAINED));
    assert.doesNotMatch(html, /\b(?:src|href)\s*=\s*["']?\s*(?:https?:)?\/\//i);
    assert.doesNotMatch(html, /<link\b|<script\b[^>]*\bsrc=|<img\b|@import|url\(/i);
    assert.match(html, /<meta http-equiv="Content-Security-Policy" content="default-src 'none';/);
    const nonce = /script-src 'nonce-([A-Za-z0-9]+)'/.exec(html)?.[1];
    assert.ok(nonce, 'the CSP names a script nonce');
    for (const tag of html.match(/<(?:script|style)\b[^>]*>/g) ?? [])
      assert.ok(tag.includes(`nonce="${nonce}"`), `${tag} carries the nonce`);
    assert.match(html, /Model suggestions are not decisions/);
    assert.match(html, /truth\.csv/);
  });

  it('gives every data mark a <title> and a hover text, and every chart a table', () => {
    const html = renderReportDocument(handMadeReport(R, UNTRAINED));
    const marks = html.match(/<g class="pt" data-tip="[^"]+"><title>[^<]+<\/title>/g) ?? [];
    // 4 per-slice charts × 2 models × 3 slices, 2 heat maps × 9 cells, warm − cold 2 × 3 bars,
    // history sweep 2 × 5 points and 2 × 5 bars, label-rate sweep 2 × 5 points.
    assert.equal(marks.length, 24 + 18 + 6 + 10 + 10 + 10);
    const charts = html.match(/<svg class="chart"/g) ?? [];
    const tables = html.match(/<div class="table-box"><table/g) ?? [];
    assert.equal(charts.length, 10);
    assert.equal(tables.length, charts.length);
  });

  it('in a webview takes every colour from --vscode-* variables and uses the given nonce', () => {
    const parts = renderReportParts(handMadeReport(R, UNTRAINED), { mode: 'webview', nonce: 'abc123' });
    assert.match(parts.head, /^<style nonce="abc123">/);
    assert.match(parts.body, /<script nonce="abc123">/);
    const css = reportCss('webview');
    assert.doesNotMatch(css, /#[0-9a-f]{3,8}\b|rgb\(|hsl\(|prefers-color-scheme/i);
    const variables = css.match(/var\(--[a-zA-Z0-9-]+/g) ?? [];
    assert.ok(variables.some((v) => v.startsWith('var(--vscode-')));
    assert.deepEqual(
      variables.filter((v) => !/^var\(--(vscode-|rc-|series\b)/.test(v)),
      [],
    );
    assert.match(reportCss('standalone'), /prefers-color-scheme: dark/);
  });
});
