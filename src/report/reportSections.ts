// The sections of the quality-over-time report, each a chart with a table of the same numbers.
import type { ModelEvaluation, SliceMetrics } from '../engine/pipeline/evaluateSlices';
import type { ContinualSummary, QualityReport, SettingSweep, SweepModelFigures, WarmColdRow } from '../engine/report/reportTypes';
import { groupedBarChart, heatMap, legend, lineChart, type LegendEntry, type LineSeries, type Marker } from './charts';
import { escapeHtml, figure, percent, seconds } from './format';
import { htmlTable, type CellInput } from './htmlTable';

// Only types come from the engine: a host can render a report without loading engine code.
function describeWindow(window: number | 'all'): string {
  return window === 'all' ? 'all earlier slices' : `${window} earlier slice${window === 1 ? '' : 's'}`;
}

interface ModelStyle {
  name: string;
  className: string;
  marker: Marker;
  dashed: boolean;
}

function modelStyles(report: QualityReport): { graph: ModelStyle; baseline: ModelStyle } {
  return {
    graph: { name: `Graph model (${report.settings.model.toUpperCase()})`, className: 'series-graph', marker: 'circle', dashed: false },
    baseline: { name: 'Feature-only baseline (MLP)', className: 'series-baseline', marker: 'square', dashed: true },
  };
}

function legendOf(styles: ModelStyle[], kind: 'line' | 'bar' = 'line'): string {
  return legend(styles.map((s): LegendEntry => ({ name: s.name, className: s.className, marker: s.marker, dashed: s.dashed, kind })));
}

function figureBlock(id: string, heading: string, explain: string, chartHtml: string, tableHtml: string): string {
  return `<section id="${id}"><h2>${escapeHtml(heading)}</h2><p class="explain">${explain}</p><div class="figure"><div class="chart-box">${chartHtml}</div><div class="table-box">${tableHtml}</div></div></section>`;
}

function mean(values: (number | null)[]): number | null {
  const defined = values.filter((v): v is number => v !== null && !Number.isNaN(v));
  return defined.length ? defined.reduce((a, b) => a + b, 0) / defined.length : null;
}

function metricCell(value: number | null, metric?: string, format: (v: number | null) => string = figure): CellInput {
  return { text: format(value), value, metric };
}

export function headerSection(report: QualityReport): string {
  const s = report.settings;
  const slices = report.dataset.slices;
  const facts: [string, string][] = [
    ['Dataset', `${report.dataset.name} — ${report.dataset.folder}`],
    [
      'Size',
      `${report.dataset.nodes} nodes, ${report.dataset.labelled} with a curated label, ${slices.length} time slices (${slices[0]?.key ?? '—'} to ${slices[slices.length - 1]?.key ?? '—'})`,
    ],
    [
      'Reference',
      report.reference.sha256 ? `${report.reference.source} (sha256 ${report.reference.sha256.slice(0, 12)}…)` : report.reference.source,
    ],
    [
      'Settings',
      `model ${s.model}; history ${describeWindow(s.historyWindow)}; ${s.warmStart ? 'warm start' : 'cold start'}; label rate ${percent(s.labelRate, 0)}; ` +
        `${s.epochs} epochs, ${s.hiddenUnits} hidden units, learning rate ${s.learningRate}; novelty ${s.noveltyMethod}` +
        `${s.rejectQuantile !== null ? `, reject top ${percent(s.rejectQuantile, 0)}` : `, DOC α ${s.alpha}, ${s.thresholdFolds} threshold folds`}; ` +
        `smoothing λ ${s.smoothingWeight} × ${s.smoothingRounds} rounds; seed ${s.seed} (settings ${report.settingsHash})`,
    ],
    [
      'Sweeps',
      `${report.sweepPlan.quick ? 'quick: ' : ''}slices ${report.sweepPlan.slices.join(', ')}; ${report.sweepPlan.epochs} epochs; every slice fitted from a fresh start; DOC threshold cross-fitting off (no sweep figure depends on it)`,
    ],
    ['Computed', `${report.createdAt} in ${seconds(report.computeSeconds)} (cache key ${report.cacheKey})`],
  ];
  return (
    `<header><h1>Quality over time: ${escapeHtml(report.dataset.name)}</h1>` +
    `<p class="lead">How well the graph model's suggestions agree with the reference labels, slice by slice, beside a model that sees each node's own features only.</p>` +
    `<div class="notice" role="note"><strong>Model suggestions are not decisions.</strong> These figures measure how often the models' suggestions agree with the reference; every label change remains a curator's decision, reviewed and committed by a person.</div>` +
    `<dl class="facts">${facts.map(([k, v]) => `<dt>${escapeHtml(k)}</dt><dd>${escapeHtml(v)}</dd>`).join('')}</dl></header>`
  );
}

function summaryRow(
  name: string,
  key: string,
  evaluation: ModelEvaluation,
  continual: ContinualSummary,
  warmCold: number | null,
): CellInput[] {
  const slices = evaluation.perSlice;
  return [
    name,
    metricCell(mean(slices.map((m) => m.accuracy)), `mean-accuracy-${key}`),
    metricCell(mean(slices.map((m) => m.macroF1)), `mean-macro-f1-${key}`),
    metricCell(mean(slices.map((m) => m.openSetMacroF1)), `mean-open-set-f1-${key}`),
    metricCell(mean(slices.map((m) => m.noveltyAuroc)), `mean-auroc-${key}`),
    metricCell(mean(slices.filter((m) => m.trainingNodes > 0).map((m) => m.rejectionRate)), `mean-rejection-${key}`, (v) => percent(v)),
    metricCell(continual.averageAccuracy, `acc-${key}`),
    metricCell(continual.backwardTransfer, `bwt-${key}`),
    metricCell(continual.forwardTransfer, `fwt-${key}`),
    metricCell(warmCold, `warm-minus-cold-${key}`),
  ];
}

export function summarySection(report: QualityReport): string {
  const styles = modelStyles(report);
  const table = htmlTable(
    'Summary over all slices',
    ['Model', 'Mean accuracy', 'Mean macro-F1', 'Mean open-set F1', 'Mean AUROC', 'Mean rejected', 'ACC', 'BWT', 'FWT', 'Warm − cold'],
    [
      summaryRow(
        styles.graph.name,
        'graph',
        report.evaluation.graphModel,
        report.continual.graph,
        report.warmAgainstCold.meanDifference.graph,
      ),
      summaryRow(
        styles.baseline.name,
        'baseline',
        report.evaluation.baseline,
        report.continual.baseline,
        report.warmAgainstCold.meanDifference.baseline,
      ),
    ],
    'summary',
  );
  const used = report.continual.graph.slicesUsed;
  return (
    `<section id="summary"><h2>Summary</h2>${table}` +
    `<p class="explain">Accuracy and macro-F1 are closed-set (test nodes of classes the model knows); open-set F1 counts rejection as an extra class. ` +
    `From the accuracy matrix R (R[i][j]: model fitted through slice i, tested on slice j), over the ${used.length} slices where it is complete: ` +
    `ACC = mean of the last row; BWT = mean of R[T][i] − R[i][i] (negative means later training forgot earlier slices); ` +
    `FWT = mean of R[i−1][i] − b̄ᵢ, with b̄ᵢ the accuracy of the untrained (randomly initialised) model on slice i. ` +
    `Warm − cold: mean per-slice accuracy of a model started from the previous slice's weights minus one started afresh.</p></section>`
  );
}

function sliceLineChart(
  report: QualityReport,
  title: string,
  yLabel: string,
  pick: (m: SliceMetrics) => number | null,
  format: (v: number | null) => string,
  yDomain?: [number, number],
): string {
  const styles = modelStyles(report);
  const keys = report.evaluation.slices;
  const series = (style: ModelStyle, evaluation: ModelEvaluation): LineSeries => ({
    name: style.name,
    className: style.className,
    marker: style.marker,
    dashed: style.dashed,
    points: evaluation.perSlice.map((m, i) => ({
      x: i,
      y: pick(m),
      tip: `${style.name}\nslice ${m.slice}: ${yLabel.toLowerCase()} ${format(pick(m))}\n${m.testNodes} test nodes, ${m.trainingNodes} training nodes`,
    })),
  });
  return (
    legendOf([styles.graph, styles.baseline]) +
    lineChart({
      title,
      x: { label: 'Time slice', categories: keys },
      y: { label: yLabel, domain: yDomain ?? [0, 1], format: yDomain ? undefined : (v) => String(v) },
      series: [series(styles.graph, report.evaluation.graphModel), series(styles.baseline, report.evaluation.baseline)],
    })
  );
}

function perSliceTable(
  report: QualityReport,
  caption: string,
  metric: string,
  pick: (m: SliceMetrics) => number | null,
  format: (v: number | null) => string = figure,
): string {
  const g = report.evaluation.graphModel.perSlice;
  const b = report.evaluation.baseline.perSlice;
  return htmlTable(
    caption,
    ['Slice', 'Test nodes', 'Unseen', 'Graph', 'MLP'],
    g.map((m, i) => [
      m.slice,
      String(m.testNodes),
      String(m.unseenTestNodes),
      metricCell(pick(m), `${metric}-graph-${m.slice}`, format),
      metricCell(pick(b[i]), `${metric}-baseline-${m.slice}`, format),
    ]),
  );
}

export function perSliceSections(report: QualityReport): string {
  const rate = (m: SliceMetrics) => (m.trainingNodes > 0 ? m.rejectionRate : null);
  return [
    figureBlock(
      'accuracy',
      'Accuracy per slice',
      "Closed-set accuracy on each slice's test nodes whose class the model knows.",
      sliceLineChart(report, 'Accuracy per slice, graph model and MLP baseline', 'Accuracy', (m) => m.accuracy, figure),
      perSliceTable(report, 'Accuracy per slice', 'accuracy', (m) => m.accuracy),
    ),
    figureBlock(
      'macro-f1',
      'Macro-F1 per slice',
      'Closed-set macro-F1: every known class counts equally, however rare.',
      sliceLineChart(report, 'Macro-F1 per slice, graph model and MLP baseline', 'Macro-F1', (m) => m.macroF1, figure),
      perSliceTable(report, 'Macro-F1 per slice', 'macro-f1', (m) => m.macroF1),
    ),
    figureBlock(
      'auroc',
      'Novelty AUROC per slice',
      'How well the smoothed novelty score ranks test nodes of unseen classes above known ones (0.5 = chance; undefined where a slice has no unseen or no known test nodes).',
      sliceLineChart(report, 'Novelty AUROC per slice', 'Novelty AUROC', (m) => m.noveltyAuroc, figure),
      perSliceTable(report, 'Novelty AUROC per slice', 'auroc', (m) => m.noveltyAuroc),
    ),
    figureBlock(
      'rejection',
      'Rejection rate per slice',
      "Share of the slice's nodes the model rejects as fitting no known class (sent to review as possible new classes).",
      sliceLineChart(report, 'Rejection rate per slice', 'Rejected share', rate, (v) => percent(v)),
      perSliceTable(report, 'Rejection rate per slice', 'rejection', rate, (v) => percent(v)),
    ),
  ].join('');
}

function matrixTable(caption: string, keys: string[], matrix: (number | null)[][], metric: string): string {
  return htmlTable(
    caption,
    ['Fitted through ↓ / tested on →', ...keys],
    matrix.map((row, i) => [keys[i], ...row.map((v, j) => metricCell(v, `${metric}-${i}-${j}`, (x) => figure(x, 2)))]),
  );
}

export function matrixSections(report: QualityReport): string {
  const keys = report.evaluation.slices;
  const styles = modelStyles(report);
  const block = (id: string, style: ModelStyle, evaluation: ModelEvaluation, metric: string) =>
    figureBlock(
      id,
      `Accuracy matrix: ${style.name}`,
      'Row i: the model fitted through slice i; column j: accuracy on slice j. Below the diagonal: how much of earlier slices is kept; above it: how well the model does on slices it has not yet seen.',
      heatMap({
        title: `Accuracy matrix, ${style.name}`,
        rowLabel: 'Fitted through slice',
        columnLabel: 'Tested on slice',
        rows: keys,
        columns: keys,
        values: evaluation.accuracyMatrix,
        tip: (i, j, v) =>
          `${style.name}\nfitted through ${keys[i]}, tested on ${keys[j]}: ${v === null ? 'no test nodes' : `accuracy ${figure(v)}`}`,
      }),
      matrixTable(`Accuracy matrix, ${style.name}`, keys, evaluation.accuracyMatrix, metric),
    );
  return (
    block('matrix-graph', styles.graph, report.evaluation.graphModel, 'matrix-graph') +
    block('matrix-baseline', styles.baseline, report.evaluation.baseline, 'matrix-baseline')
  );
}

export function warmColdSection(report: QualityReport): string {
  const styles = modelStyles(report);
  const keys = report.evaluation.slices;
  const rows = report.warmAgainstCold;
  const tips = (style: ModelStyle, list: WarmColdRow[]) =>
    list.map((r) => `${style.name}\nslice ${r.slice}: warm ${figure(r.warm)}, cold ${figure(r.cold)}, warm − cold ${figure(r.difference)}`);
  const chart =
    legendOf([styles.graph, styles.baseline], 'bar') +
    groupedBarChart({
      title: 'Warm minus cold accuracy per slice',
      x: { label: 'Time slice', categories: keys },
      y: { label: 'Accuracy, warm − cold' },
      series: [
        {
          name: styles.graph.name,
          className: styles.graph.className,
          values: rows.graph.map((r) => r.difference),
          tips: tips(styles.graph, rows.graph),
        },
        {
          name: styles.baseline.name,
          className: styles.baseline.className,
          values: rows.baseline.map((r) => r.difference),
          tips: tips(styles.baseline, rows.baseline),
        },
      ],
    });
  const table = htmlTable(
    'Warm against cold start',
    ['Slice', 'Graph warm', 'Graph cold', 'Graph Δ', 'MLP warm', 'MLP cold', 'MLP Δ'],
    rows.graph.map((g, i) => {
      const b = rows.baseline[i];
      return [
        g.slice,
        metricCell(g.warm),
        metricCell(g.cold),
        metricCell(g.difference, `warm-cold-graph-${g.slice}`),
        metricCell(b.warm),
        metricCell(b.cold),
        metricCell(b.difference, `warm-cold-baseline-${g.slice}`),
      ];
    }),
  );
  return figureBlock(
    'warm-cold',
    'Warm against cold start',
    "Per slice: accuracy when the model starts from the previous slice's weights minus when it starts from a fresh initialisation, all else equal. Above zero, carrying the model forward helps.",
    chart,
    table,
  );
}

function sweepSeries(
  style: ModelStyle,
  sweep: SettingSweep,
  x: (f: SweepModelFigures, setting: number | 'all') => number,
  pick: 'graph' | 'baseline',
  pointLabels: boolean,
): LineSeries {
  return {
    name: style.name,
    className: style.className,
    marker: style.marker,
    dashed: style.dashed,
    points: sweep.points.map((p) => {
      const f = p[pick];
      return {
        x: x(f, p.setting),
        y: f.meanAccuracy,
        label: pointLabels ? (p.setting === 'all' ? 'all' : String(p.setting)) : undefined,
        tip: `${style.name}, ${p.label}\nmean accuracy ${figure(f.meanAccuracy)}, macro-F1 ${figure(f.meanMacroF1)}\n${f.meanTrainingNodes.toFixed(1)} training nodes per slice, ${seconds(f.trainSeconds)} training`,
      };
    }),
  };
}

function sweepTable(caption: string, sweep: SettingSweep, metric: string): string {
  return htmlTable(
    caption,
    ['Setting', 'Graph acc', 'MLP acc', 'Graph F1', 'MLP F1', 'Nodes', 'Graph s', 'MLP s'],
    sweep.points.map((p) => [
      p.label,
      metricCell(p.graph.meanAccuracy, `${metric}-graph-${String(p.setting)}`),
      metricCell(p.baseline.meanAccuracy, `${metric}-baseline-${String(p.setting)}`),
      metricCell(p.graph.meanMacroF1),
      metricCell(p.baseline.meanMacroF1),
      { text: p.graph.meanTrainingNodes.toFixed(1), value: p.graph.meanTrainingNodes },
      { text: p.graph.trainSeconds.toFixed(2), value: p.graph.trainSeconds },
      { text: p.baseline.trainSeconds.toFixed(2), value: p.baseline.trainSeconds },
    ]),
  );
}

export function sweepSections(report: QualityReport): string {
  const styles = modelStyles(report);
  const plan = report.sweepPlan;
  const planText = `Mean over slices ${plan.slices.join(', ')}; ${plan.epochs} epochs; each slice fitted from a fresh start.`;
  const history = report.historySweep;
  const windowLabels = history.points.map((p) => (p.setting === 'all' ? 'all' : String(p.setting)));
  const historyChart =
    legendOf([styles.graph, styles.baseline]) +
    lineChart({
      title: 'Accuracy against replayed labelled nodes, by history window',
      x: { label: 'Training nodes per slice (labelled nodes replayed from the history window)' },
      y: { label: 'Mean accuracy', domain: [0, 1] },
      series: [
        sweepSeries(styles.graph, history, (f) => f.meanTrainingNodes, 'graph', true),
        sweepSeries(styles.baseline, history, (f) => f.meanTrainingNodes, 'baseline', false),
      ],
    });
  const timeChart =
    legendOf([styles.graph, styles.baseline], 'bar') +
    groupedBarChart({
      title: 'Training time by history window',
      x: { label: 'History window (earlier slices)', categories: windowLabels },
      y: { label: 'Training seconds (sum over sweep slices)' },
      series: (['graph', 'baseline'] as const).map((key) => ({
        name: styles[key].name,
        className: styles[key].className,
        values: history.points.map((p) => p[key].trainSeconds),
        tips: history.points.map(
          (p) =>
            `${styles[key].name}, ${p.label}\n${seconds(p[key].trainSeconds)} training, ${p[key].meanTrainingNodes.toFixed(1)} training nodes per slice`,
        ),
      })),
    });
  const rates = report.labelRateSweep;
  const rateChart =
    legendOf([styles.graph, styles.baseline]) +
    lineChart({
      title: 'Accuracy against label rate',
      x: { label: "Share of the window's labels used for training", domain: [0, 1], format: (v) => `${Math.round(v * 100)}%` },
      y: { label: 'Mean accuracy', domain: [0, 1] },
      series: [
        sweepSeries(styles.graph, rates, (_, s) => s as number, 'graph', false),
        sweepSeries(styles.baseline, rates, (_, s) => s as number, 'baseline', false),
      ],
    });
  return [
    figureBlock(
      'history-sweep',
      'History window: accuracy against replayed data',
      `Each point is one history window (number beside the graph model's points; "all" = every earlier slice): more history replays more labelled nodes. ${escapeHtml(planText)}`,
      historyChart,
      sweepTable('History window sweep', history, 'history'),
    ),
    figureBlock(
      'history-time',
      'History window: training time',
      `Training time grows with the replayed nodes. ${escapeHtml(planText)}`,
      timeChart,
      sweepTable('History window sweep', history, 'history-time'),
    ),
    figureBlock(
      'label-rate-sweep',
      'Label rate',
      `Accuracy when only a share of the window's curated labels trains the model (a seeded choice). ${escapeHtml(planText)}`,
      rateChart,
      sweepTable('Label-rate sweep', rates, 'label-rate'),
    ),
  ].join('');
}
