// Readable tables of the second-look reports for a terminal or an output channel.
import type { DoubtsReport, LabelNextReport } from './reportTypes';

export const defaultTableRows = 30;

/** Columns padded to their widest cell; numbers right-aligned. */
export function textTable(header: string[], rows: string[][], rightAligned: ReadonlySet<number> = new Set()): string[] {
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c].length)));
  const line = (cells: string[]) =>
    cells
      .map((cell, c) => (rightAligned.has(c) ? cell.padStart(widths[c]) : cell.padEnd(widths[c])))
      .join('  ')
      .trimEnd();
  return [line(header), ...rows.map(line)];
}

function neighbourSummary(counts: Record<string, number>, unlabelled: number): string {
  const labelled = Object.entries(counts).map(([name, n]) => `${n} ${name}`);
  return [...labelled, `${unlabelled} unlabelled`].join(', ');
}

export function formatDoubtsTable(report: DoubtsReport, maxRows = defaultTableRows): string {
  const lines = [
    `slice ${report.slice}: checked ${report.labelsChecked} curated labels of ${report.windowSlices.first} … ${report.windowSlices.last} with ${report.folds}-fold cross-fitting`,
    `${report.doubts.length} doubtful (score above 0.5 or flagged by confident learning; ${report.confidentLearningFlags} flagged)`,
  ];
  if (report.doubts.length > 0) {
    const rows = report.doubts
      .slice(0, maxRows)
      .map((d) => [
        String(d.rank),
        d.node,
        d.slice,
        d.curatedLabel,
        d.suggestedLabel,
        d.score.toFixed(3),
        d.outputs.map((o) => `${o.className} ${o.output.toFixed(2)}`).join(', '),
        neighbourSummary(d.neighbourLabels, d.unlabelledNeighbours),
        d.confidentLearning ? 'yes' : '',
      ]);
    lines.push(
      '',
      ...textTable(
        ['#', 'node', 'slice', 'curated label', 'suggested', 'score', 'out-of-fold outputs', 'neighbours', 'CL'],
        rows,
        new Set([0, 5]),
      ),
    );
    if (report.doubts.length > maxRows) lines.push(`… and ${report.doubts.length - maxRows} more (--json or --out for all)`);
  }
  lines.push('', 'Suggestions are not decisions: keep the label or move the node in the review panel, or with a decisions file.');
  return lines.join('\n') + '\n';
}

export function formatSuggestionsTable(report: LabelNextReport): string {
  const lines = [
    `slice ${report.slice}: ${report.unlabelledInSlice} unlabelled nodes ranked by usefulness (model trained on ${report.trainingNodes} labelled nodes)`,
  ];
  if (report.suggestions.length > 0) {
    const rows = report.suggestions.map((s) => [
      String(s.rank),
      s.node,
      s.usefulness.toFixed(3),
      s.uncertainty.toFixed(3),
      String(s.unlabelledNeighbours),
      s.outputs
        .slice(0, 2)
        .map((o) => `${o.className} ${o.output.toFixed(2)}`)
        .join(', '),
    ]);
    lines.push(
      '',
      ...textTable(['#', 'node', 'usefulness', 'uncertainty', 'unlabelled neighbours', 'top outputs'], rows, new Set([0, 2, 3, 4])),
    );
  }
  return lines.join('\n') + '\n';
}
