import * as assert from 'node:assert/strict';
import { niceDomain, tickIncrement, ticks } from '../../src/report/scale';
import { relativeLuminance, textColourOn, viridis } from '../../src/report/palette';

describe('report axes and colours', () => {
  it('chooses ticks as d3-array does', () => {
    // Reference values from the d3-array documentation (https://d3js.org/d3-array/ticks).
    assert.deepEqual(ticks(1, 9, 5), [2, 4, 6, 8]);
    assert.deepEqual(ticks(1, 9, 20), [1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5, 5, 5.5, 6, 6.5, 7, 7.5, 8, 8.5, 9]);
    assert.equal(tickIncrement(1, 9, 5), 2);
    assert.equal(tickIncrement(1, 9, 20), -2);
    // Reference values from the d3-scale port's documentation (pub.dev d4_scale, ScaleLinear.ticks): domain [10, 100], 10 ticks.
    assert.deepEqual(ticks(10, 100, 10), [10, 20, 30, 40, 50, 60, 70, 80, 90, 100]);
    // Reversed domains give the same ticks in reverse order (d3-array documentation).
    assert.deepEqual(ticks(9, 1, 5), [8, 6, 4, 2]);
  });

  it('widens a domain outwards to whole tick steps', () => {
    // common practice: an axis over [0.13, 0.87] with about 5 ticks runs from 0 to 1 in steps of 0.2.
    assert.deepEqual(niceDomain(0.13, 0.87, 5), [0, 1]);
    assert.deepEqual(niceDomain(34.7, 102.7, 6), [30, 110]);
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
