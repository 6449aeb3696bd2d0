// Class colours for the graph. Our own set, picked by farthest-point search over mid-lightness,
// saturated sRGB colours (CIELAB L* 45–72, so that they read on light and dark themes alike)
// for the largest smallest CIEDE2000 difference under normal vision and simulated protanopia,
// deuteranopia and tritanopia, away from the neutral grey used for unclassified nodes.
// test/webview/classPalette.test.ts checks the distances.
export const classPalette: readonly string[] = [
  '#3366cc',
  '#ff8811',
  '#33bbff',
  '#886622',
  '#669966',
  '#cc88bb',
  '#4488ff',
  '#bb3388',
  '#99bb77',
  '#ff0044',
];

/** The neutral the palette keeps away from; the graph draws unclassified nodes in the theme's own foreground. */
export const paletteNeutral = '#888888';

export function classColour(index: number): string {
  return classPalette[((index % classPalette.length) + classPalette.length) % classPalette.length];
}
