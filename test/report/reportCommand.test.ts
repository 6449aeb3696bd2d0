// End to end through the CLI: the report's figures are those of `evaluate --json` with the same
// settings, the HTML stands alone, a second run comes from the cache, and the cache key follows
// labels.csv. Screenshots in light and dark go to test-output/report-screenshots/.
import * as assert from 'node:assert/strict';
import { existsSync, promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { chromium } from 'playwright-core';
import { DEFAULT_DEMO_OPTIONS } from '../../demo-data/generator/options';
import { generateDemoDataset } from '../../demo-data/generator/writeDataset';
import { run as runEvaluate } from '../../src/cli/commands/evaluate';
import { run as runReport } from '../../src/cli/commands/report';
import { collectingIo } from '../../src/cli/io';
import { loadDataset } from '../../src/engine/dataset/load';
import { defaultRunSettings } from '../../src/engine/pipeline/runSettings';
import type { EvaluationReport } from '../../src/engine/pipeline/evaluateSlices';
import { reportCacheFolder, reportCacheKey } from '../../src/engine/report/reportCache';
import type { QualityReport } from '../../src/engine/report/reportTypes';
import { metricCell } from './reportFixture';
import { chromiumFlags } from '../chromiumFlags';

const SCREENSHOTS = path.resolve(__dirname, '../../test-output/report-screenshots');
const CHROMIUM = '/usr/bin/chromium';

/** Training times differ from run to run; every other figure must match exactly. */
function withoutTimings(value: unknown): unknown {
  return JSON.parse(JSON.stringify(value, (key, v: unknown) => (key === 'trainSeconds' ? undefined : v)));
}

describe('graph-curator report', function () {
  this.timeout(300_000);
  let parent = '';
  let folder = '';
  let truth = '';
  // Small and fast: 300 nodes, yearly slices (6 instead of 24 quarters), 30 epochs, no cross-fitting.
  const settingFlags = ['--epochs', '30', '--threshold-folds', '0', '--warm'];
  let evaluation: EvaluationReport;
  let report: QualityReport;
  let html = '';

  before(async () => {
    parent = await fs.mkdtemp(path.join(os.tmpdir(), 'report-test-'));
    folder = path.join(parent, 'wind-farm');
    const summary = await generateDemoDataset({ ...DEFAULT_DEMO_OPTIONS, nodes: 300, out: folder });
    truth = summary.truthFile;
    const manifestFile = path.join(folder, 'dataset.json');
    const manifest = JSON.parse(await fs.readFile(manifestFile, 'utf8')) as { time: { granularity: string } };
    manifest.time.granularity = 'year';
    await fs.writeFile(manifestFile, JSON.stringify(manifest, null, 2));

    const evaluateIo = collectingIo();
    assert.equal(await runEvaluate([folder, '--truth', truth, '--json', ...settingFlags], evaluateIo), 0, evaluateIo.err);
    evaluation = JSON.parse(evaluateIo.out) as EvaluationReport;

    const reportIo = collectingIo();
    const htmlFile = path.join(parent, 'report.html');
    const jsonFile = path.join(parent, 'report.json');
    assert.equal(
      await runReport([folder, '--truth', truth, '--html', htmlFile, '--json', jsonFile, '--quick', ...settingFlags], reportIo),
      0,
      reportIo.err,
    );
    assert.match(reportIo.out, /computed in/);
    report = JSON.parse(await fs.readFile(jsonFile, 'utf8')) as QualityReport;
    html = await fs.readFile(htmlFile, 'utf8');
  });

  after(async () => {
    if (parent) await fs.rm(parent, { recursive: true, force: true });
  });

  it('reports the figures of evaluate --json for the same settings', () => {
    assert.equal(evaluation.slices.length, 6);
    assert.deepEqual(withoutTimings(report.evaluation), withoutTimings(evaluation));
    // The report's own GEM summaries agree with evaluateSlices' ACC and BWT.
    assert.equal(report.continual.graph.averageAccuracy, evaluation.graphModel.averageAccuracy);
    assert.equal(report.continual.graph.backwardTransfer, evaluation.graphModel.backwardTransfer);
    assert.equal(report.continual.baseline.averageAccuracy, evaluation.baseline.averageAccuracy);
    assert.equal(report.warmAgainstCold.meanDifference.graph, evaluation.graphModel.forwardTransfer);
  });

  it('prints those figures in the HTML tables', () => {
    for (const m of evaluation.graphModel.perSlice) {
      const cell = metricCell(html, `accuracy-graph-${m.slice}`);
      if (m.accuracy === null) assert.ok(Number.isNaN(cell.value));
      else assert.equal(cell.value, m.accuracy);
    }
    evaluation.baseline.perSlice.forEach((m, i) => {
      const cell = metricCell(html, `warm-cold-baseline-${m.slice}`);
      const expected = evaluation.baseline.warmMinusCold?.[i] ?? null;
      if (expected === null) assert.ok(Number.isNaN(cell.value));
      else assert.ok(Math.abs(cell.value - expected) < 1e-12);
    });
    assert.equal(metricCell(html, 'acc-graph').value, evaluation.graphModel.averageAccuracy);
    assert.equal(metricCell(html, 'bwt-baseline').value, evaluation.baseline.backwardTransfer);
  });

  it('sweeps the history window and the label rate on the quick plan, and says so', () => {
    assert.deepEqual(report.sweepPlan.slices, evaluation.slices.slice(-3));
    assert.equal(report.sweepPlan.epochs, 30);
    assert.deepEqual(
      report.historySweep.points.map((p) => p.setting),
      [1, 2, 3, 5, 'all'],
    );
    assert.deepEqual(
      report.labelRateSweep.points.map((p) => p.setting),
      [0.1, 0.3, 0.5, 0.7, 0.9],
    );
    // A longer history replays at least as many labelled nodes; a higher label rate trains on more.
    const replayed = report.historySweep.points.map((p) => p.graph.meanTrainingNodes);
    for (let k = 1; k < replayed.length; k++)
      assert.ok(replayed[k] >= replayed[k - 1], `history sweep training nodes ${replayed.join(', ')}`);
    const trained = report.labelRateSweep.points.map((p) => p.graph.meanTrainingNodes);
    for (let k = 1; k < trained.length; k++)
      assert.ok(trained[k] > trained[k - 1], `label-rate sweep training nodes ${trained.join(', ')}`);
    assert.match(html, /quick: slices 2022, 2023, 2024; 30 epochs/);
  });

  it('writes a self-contained HTML file', () => {
    assert.doesNotMatch(html, /\b(?:src|href)\s*=\s*["']?\s*(?:https?:)?\/\//i);
    assert.doesNotMatch(html, /<link\b|<script\b[^>]*\bsrc=|@import|url\(/i);
    assert.match(html, /Model suggestions are not decisions/);
    assert.ok(html.includes(truth), 'the reference file is named');
  });

  it('reads a second run with the same inputs from the cache', async () => {
    const io = collectingIo();
    const htmlFile = path.join(parent, 'again.html');
    assert.equal(await runReport([folder, '--truth', truth, '--html', htmlFile, '--quick', ...settingFlags], io), 0, io.err);
    assert.match(io.out, /from the cache/);
    assert.ok(existsSync(path.join(reportCacheFolder(folder), `${report.cacheKey}.json`)));
    assert.match(await fs.readFile(htmlFile, 'utf8'), new RegExp(`cache key ${report.cacheKey}`));
  });

  it('changes the cache key when labels.csv changes', async () => {
    const settings = { ...defaultRunSettings, epochs: 30, thresholdFolds: 0, warmStart: true };
    const keyOf = async () =>
      reportCacheKey({ contentHashes: (await loadDataset(folder)).contentHashes, settings, referenceSha256: null, quick: true });
    const before = await keyOf();
    assert.equal(await keyOf(), before);
    const labelsFile = path.join(folder, 'labels.csv');
    const lines = (await fs.readFile(labelsFile, 'utf8')).split('\n');
    await fs.writeFile(labelsFile, [lines[0], ...lines.slice(2)].join('\n'));
    assert.notEqual(await keyOf(), before);
    assert.notEqual(
      reportCacheKey({ contentHashes: {}, settings, referenceSha256: 'a', quick: true }),
      reportCacheKey({ contentHashes: {}, settings, referenceSha256: 'b', quick: true }),
    );
  });

  it('renders in headless Chromium in light and dark, with hover values', async function () {
    assert.ok(existsSync(CHROMIUM), `${CHROMIUM} is needed for the screenshots`);
    await fs.mkdir(SCREENSHOTS, { recursive: true });
    const htmlFile = path.join(SCREENSHOTS, 'report.html');
    await fs.writeFile(htmlFile, html);
    const browser = await chromium.launch({
      executablePath: CHROMIUM,
      args: [...chromiumFlags],
    });
    try {
      const backgrounds: string[] = [];
      for (const colorScheme of ['light', 'dark'] as const) {
        const page = await browser.newPage({ colorScheme, viewport: { width: 1280, height: 900 } });
        const problems: string[] = [];
        page.on('pageerror', (error) => problems.push(String(error)));
        page.on('console', (message) => message.type() === 'error' && problems.push(message.text()));
        page.on('request', (request) => !request.url().startsWith('file:') && problems.push(`request ${request.url()}`));
        await page.goto(`file://${htmlFile}`);
        backgrounds.push(await page.evaluate(() => getComputedStyle(document.body).backgroundColor));
        await page.screenshot({ path: path.join(SCREENSHOTS, `report-${colorScheme}.png`), fullPage: true });
        const point = page.locator('#accuracy .series-graph .pt').last();
        await point.hover();
        const tooltip = page.locator('#report-tooltip');
        await tooltip.waitFor({ state: 'visible' });
        const last = evaluation.graphModel.perSlice[evaluation.graphModel.perSlice.length - 1];
        assert.match(
          (await tooltip.textContent()) ?? '',
          new RegExp(`slice ${last.slice}: accuracy ${(last.accuracy as number).toFixed(3)}`),
        );
        await page.screenshot({ path: path.join(SCREENSHOTS, `report-${colorScheme}-hover.png`) });
        assert.deepEqual(problems, []);
        await page.close();
      }
      assert.notEqual(backgrounds[0], backgrounds[1], 'light and dark backgrounds differ');
    } finally {
      await browser.close();
    }
  });
});
