// Plain-text rendering of an evaluation report for the terminal.
import type { EvaluationReport, ModelEvaluation, SliceMetrics } from './evaluateSlices';

function figure(value: number | null, digits = 3): string {
  return value === null || Number.isNaN(value) ? '—' : value.toFixed(digits);
}

function meanOf(values: (number | null)[]): number | null {
  const defined = values.filter((v): v is number => v !== null && !Number.isNaN(v));
  return defined.length ? defined.reduce((a, b) => a + b, 0) / defined.length : null;
}

function summaryLine(name: string, evaluation: ModelEvaluation): string {
  const slices = evaluation.perSlice;
  return [
    `${name.padEnd(10)}`,
    `mean acc ${figure(meanOf(slices.map((s) => s.accuracy)))}`,
    `mean macro-F1 ${figure(meanOf(slices.map((s) => s.macroF1)))}`,
    `mean open-set F1 ${figure(meanOf(slices.map((s) => s.openSetMacroF1)))}`,
    `mean AUROC ${figure(meanOf(slices.map((s) => s.noveltyAuroc)))}`,
    `ACC ${figure(evaluation.averageAccuracy)}`,
    `BWT ${figure(evaluation.backwardTransfer)}`,
    evaluation.forwardTransfer !== null ? `warm−cold ${figure(evaluation.forwardTransfer)}` : '',
  ]
    .filter(Boolean)
    .join('  ');
}

export function formatEvaluation(report: EvaluationReport): string {
  const lines: string[] = [];
  lines.push(
    `dataset ${report.dataset}; reference: ${report.reference}; graph model ${report.settings.model}, history ${String(report.settings.historyWindow)}, seed ${report.settings.seed}`,
  );
  lines.push('');
  lines.push(
    'slice      test  unseen | acc graph  acc mlp | F1 graph  F1 mlp | open-F1 graph  mlp | AUROC graph  mlp | rejected graph  mlp',
  );
  report.graphModel.perSlice.forEach((g: SliceMetrics, i: number) => {
    const b = report.baseline.perSlice[i];
    lines.push(
      [
        g.slice.padEnd(9),
        String(g.testNodes).padStart(5),
        String(g.unseenTestNodes).padStart(7),
        '|',
        figure(g.accuracy).padStart(9),
        figure(b.accuracy).padStart(8),
        '|',
        figure(g.macroF1).padStart(8),
        figure(b.macroF1).padStart(7),
        '|',
        figure(g.openSetMacroF1).padStart(13),
        figure(b.openSetMacroF1).padStart(5),
        '|',
        figure(g.noveltyAuroc).padStart(11),
        figure(b.noveltyAuroc).padStart(5),
        '|',
        `${(100 * g.rejectionRate).toFixed(1)}%`.padStart(14),
        `${(100 * b.rejectionRate).toFixed(1)}%`.padStart(5),
      ].join(' '),
    );
  });
  lines.push('');
  lines.push(summaryLine(report.graphModel.model, report.graphModel));
  lines.push(summaryLine('mlp', report.baseline));
  return lines.join('\n') + '\n';
}
