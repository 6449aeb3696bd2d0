// What a curator needs to judge the candidate in view: its words, size, how it grew over the
// slices, the members nearest its centre, the classes around it, and whether it looks like drift.
import type { CandidateView } from '../src/protocol/webview';
import { el, replaceChildren, svg } from './dom';

const chartWidth = 220;
const chartHeight = 48;

/** Bars of members per slice, as an inline SVG (no script, no external file). */
export function emergenceChart(sliceCounts: { slice: string; count: number }[]): SVGElement {
  const max = Math.max(1, ...sliceCounts.map((s) => s.count));
  const slot = chartWidth / Math.max(1, sliceCounts.length);
  const barWidth = Math.max(1, slot * 0.75);
  const chart = svg('svg', {
    class: 'emergence-chart',
    id: 'emergence-chart',
    width: chartWidth,
    height: chartHeight + 14,
    viewBox: `0 0 ${chartWidth} ${chartHeight + 14}`,
    role: 'img',
    'aria-label': `Members per slice: ${sliceCounts.map((s) => `${s.slice} ${s.count}`).join(', ')}`,
  });
  sliceCounts.forEach((s, k) => {
    const height = s.count === 0 ? 0 : Math.max(1, (s.count / max) * chartHeight);
    chart.append(
      svg(
        'rect',
        { class: 'emergence-bar', x: k * slot + (slot - barWidth) / 2, y: chartHeight - height, width: barWidth, height },
        svg('title', {}, `${s.slice}: ${s.count}`),
      ),
    );
  });
  chart.append(svg('line', { class: 'emergence-axis', x1: 0, y1: chartHeight + 0.5, x2: chartWidth, y2: chartHeight + 0.5 }));
  if (sliceCounts.length > 0) {
    chart.append(svg('text', { class: 'emergence-label', x: 0, y: chartHeight + 12 }, sliceCounts[0].slice));
    if (sliceCounts.length > 1)
      chart.append(
        svg(
          'text',
          { class: 'emergence-label', x: chartWidth, y: chartHeight + 12, 'text-anchor': 'end' },
          sliceCounts[sliceCounts.length - 1].slice,
        ),
      );
  }
  return chart;
}

export class SummaryView {
  readonly element = el('section', { class: 'summary', id: 'summary', 'aria-label': 'Candidate summary' });

  show(candidate: CandidateView | null, openQueueCount: number): void {
    if (!candidate) {
      replaceChildren(
        this.element,
        el(
          'p',
          { class: 'empty-note', id: 'no-candidate' },
          openQueueCount === 0
            ? 'Every candidate has a decision. Export or apply the pending decisions.'
            : 'Choose a candidate in the queue.',
        ),
      );
      return;
    }
    const drift = candidate.looksLikeDrift
      ? el(
          'span',
          {
            class: 'drift-flag',
            id: 'drift-flag',
            title: 'Its position or its neighbours tie it to a known class: it may be that class, changed, rather than a new one.',
          },
          `looks like drift of ${candidate.driftTowards ?? 'a known class'}`,
        )
      : null;
    const neighbourClasses = candidate.neighbourClasses.length
      ? el(
          'ul',
          { class: 'neighbour-classes' },
          ...candidate.neighbourClasses
            .slice(0, 6)
            .map((c) => el('li', {}, el('span', { class: 'class-name' }, c.className), ` ${c.count}`)),
        )
      : el('p', { class: 'muted' }, 'No labelled neighbours.');
    replaceChildren(
      this.element,
      el(
        'header',
        { class: 'summary-header' },
        el('h2', { id: 'candidate-title' }, candidate.id),
        el('span', { class: 'badge', id: 'candidate-size' }, `${candidate.size} members`),
        candidate.status !== 'open' ? el('span', { class: 'badge' }, candidate.status) : null,
        drift,
      ),
      el(
        'div',
        { class: 'summary-grid' },
        el(
          'div',
          {},
          el('h3', {}, 'Top terms'),
          el(
            'p',
            { class: 'top-terms', id: 'top-terms' },
            candidate.topTerms
              .slice(0, 10)
              .map((t) => t.term)
              .join(' · ') || '—',
          ),
        ),
        el('div', {}, el('h3', {}, 'Emergence over slices'), emergenceChart(candidate.sliceCounts)),
        el('div', {}, el('h3', {}, 'Neighbour classes'), neighbourClasses),
        el(
          'div',
          { class: 'summary-figures' },
          el('h3', {}, 'Scores'),
          el('p', {}, `mean novelty ${candidate.meanNovelty.toFixed(3)}`),
          el('p', {}, candidate.cohesion === null ? 'cohesion: n/a (made in review)' : `cohesion ${candidate.cohesion.toFixed(3)}`),
        ),
      ),
      el('h3', {}, 'Nearest the centre'),
      el(
        'ol',
        { class: 'nearest-members', id: 'nearest-members' },
        ...candidate.nearestMembers.map((m) =>
          el('li', {}, el('span', { class: 'node-id' }, m.id), ' ', el('span', { class: 'node-text' }, m.text)),
        ),
      ),
    );
  }
}
