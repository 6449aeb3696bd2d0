import * as assert from 'node:assert/strict';
import { lineChart, type ChartPoint } from '../../src/report/charts';
import { relativeLuminance, textColourOn, viridis } from '../../src/report/palette';

function chartOf(points: ChartPoint[]): string {
  return lineChart({
    title: 'test',
    x: { label: 'x' },
    y: { label: 'y' },
    series: [{ name: 'graph', className: 'series-graph', marker: 'circle', points }],
  });
}

/** Text of the tick labels along the bottom axis (anchored in the middle), left to right. */
function xTickLabels(svg: string): string[] {
  return [...svg.matchAll(/<text class="tick" x="[^"]*" y="[^"]*" text-anchor="middle">([^<]*)<\/text>/g)].map((m) => m[1]);
}

describe('report charts and colours', () => {
  it('widens a numeric axis to round tick values', () => {
    // The d3-scale documentation (linear.nice): a domain of [0.201479…, 0.996679…] becomes [0.2, 1.0].
    const svg = chartOf([
      { x: 0.201479, y: 0.5, tip: 'a' },
      { x: 0.996679, y: 0.6, tip: 'b' },
    ]);
    const labels = xTickLabels(svg);
    assert.equal(labels[0], '0.2');
    assert.equal(labels[labels.length - 1], '1');
    assert.equal(labels.length, 9);
  });

  it('breaks a line at a missing value and keeps a marker for every value present', () => {
    const points = [0, 1, 2, 3, 4].map((x) => ({ x, y: x === 2 ? null : x / 4, tip: `slice ${x}` }));
    const svg = chartOf(points);
    const paths = [...svg.matchAll(/<path class="line" d="([^"]*)"\/>/g)].map((m) => m[1]);
    assert.equal(paths.length, 1);
    // Two pieces of two points each: M…L…M…L…
    assert.equal(paths[0].match(/M/g)?.length, 2);
    assert.equal(paths[0].match(/L/g)?.length, 2);
    assert.equal(svg.match(/<g class="pt"/g)?.length, 4);
    assert.ok(!svg.includes('slice 2'));
  });

  it('uses viridis end points and picks the text colour with the higher WCAG contrast', () => {
    // From memory of matplotlib's viridis table: first and last colours.
    assert.equal(viridis(0), '#440154');
    assert.equal(viridis(1), '#fde725');
    // WCAG 2 relative luminance: white 1, black 0; #767676 is the darkest grey reaching 4.5:1 on white
    // (from memory, WebAIM's contrast notes): contrast (1.05) / (L + 0.05) ≈ 4.54.
    assert.equal(relativeLuminance('#ffffff'), 1);
    assert.equal(relativeLuminance('#000000'), 0);
    assert.ok(Math.abs(1.05 / (relativeLuminance('#767676') + 0.05) - 4.54) < 0.01);
    assert.equal(textColourOn(viridis(0)), '#ffffff');
    assert.equal(textColourOn(viridis(1)), '#000000');
  });
});
