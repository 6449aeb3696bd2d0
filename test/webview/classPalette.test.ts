import * as assert from 'node:assert/strict';
import { classColour, classPalette, paletteNeutral } from '../../webview/classPalette';
import { deltaE2000, hexToRgb, rgbToLab, simulate, smallestDifference, type Vision } from './colourVision';

// CIEDE2000 test pairs from Sharma, Wu & Dalal (2005), "The CIEDE2000 color-difference formula:
// implementation notes, supplementary test data, and mathematical observations", Color Research
// and Application 30(1), Table 1.
const sharmaPairs: [number, number, number, number, number, number, number][] = [
  [50, 2.6772, -79.7751, 50, 0, -82.7485, 2.0425],
  [50, 3.1571, -77.2803, 50, 0, -82.7485, 2.8615],
  [50, 2.8361, -74.02, 50, 0, -82.7485, 3.4412],
  [50, -1.3802, -84.2814, 50, 0, -82.7485, 1.0],
  [50, 2.5, 0, 73, 25, -18, 27.1492],
  [50, 2.5, 0, 61, -5, 29, 22.8977],
  [50, 2.5, 0, 56, -27, -3, 31.903],
  [50, 2.5, 0, 58, 24, 15, 19.4535],
];

describe('webview/class palette', () => {
  it('computes CIEDE2000 as in the published test data', () => {
    for (const [L1, a1, b1, L2, a2, b2, expected] of sharmaPairs) {
      assert.ok(
        Math.abs(deltaE2000([L1, a1, b1], [L2, a2, b2]) - expected) < 1e-4,
        `${[L1, a1, b1].join(',')} vs ${[L2, a2, b2].join(',')}`,
      );
      assert.ok(Math.abs(deltaE2000([L2, a2, b2], [L1, a1, b1]) - expected) < 1e-4, 'symmetric');
    }
  });

  it('converts sRGB white and a primary to the CIELAB values of the sRGB standard (D65)', () => {
    // White is L* 100, a* b* 0; sRGB red is about L* 53.24, a* 80.09, b* 67.20 (common practice: published sRGB-to-Lab tables).
    const white = rgbToLab([255, 255, 255]);
    // (within 0.02: the sRGB matrix is used with its four published decimals)
    assert.ok(Math.abs(white[0] - 100) < 0.02 && Math.abs(white[1]) < 0.02 && Math.abs(white[2]) < 0.02, String(white));
    const red = rgbToLab([255, 0, 0]);
    assert.ok(Math.abs(red[0] - 53.24) < 0.05 && Math.abs(red[1] - 80.09) < 0.1 && Math.abs(red[2] - 67.2) < 0.1, String(red));
    // A dichromat simulation leaves greys grey: every matrix row of Machado et al. (2009) sums to 1.
    for (const vision of ['protanopia', 'deuteranopia', 'tritanopia'] as Vision[]) {
      const grey = simulate([128, 128, 128], vision);
      assert.ok(
        grey.every((c) => Math.abs(c - 128) < 0.6),
        `${vision}: ${grey.join(', ')}`,
      );
    }
  });

  it('keeps 10 class colours at least ΔE00 10 apart, and from neutral grey, under normal vision and simulated dichromacy', () => {
    // Machado, Oliveira & Fernandes (2009), "A physiologically-based model for simulation of color
    // vision deficiency", IEEE TVCG 15(6): severity-1.0 matrices (see colourVision.ts).
    assert.equal(classPalette.length, 10);
    const minimum = 10;
    for (const vision of ['normal', 'protanopia', 'deuteranopia', 'tritanopia'] as Vision[]) {
      const { distance, pair } = smallestDifference([...classPalette, paletteNeutral], vision);
      assert.ok(distance >= minimum, `${vision}: ${pair.join(' vs ')} only ΔE00 ${distance.toFixed(2)} apart`);
    }
    // The check can fail: two reds a deuteranope confuses are caught.
    assert.ok(
      smallestDifference(['#cc3333', '#669900'], 'deuteranopia').distance <
        smallestDifference(['#cc3333', '#669900'], 'normal').distance / 2,
    );
    assert.equal(classColour(12), classPalette[2]);
    assert.ok(classPalette.every((hex) => hexToRgb(hex).length === 3));
  });
});
