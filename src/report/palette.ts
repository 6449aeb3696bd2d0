// Colours that carry data (not theme): the heat map's sequential palette. Viridis is perceptually
// uniform and readable with the common colour-vision deficiencies; the same fixed colours are
// used in every theme, and each cell's number is printed in black or white, whichever contrasts.

// Viridis sampled at nine evenly spaced points (from memory of matplotlib's table).
const VIRIDIS_STOPS = ['#440154', '#472d7b', '#3b528b', '#2c728e', '#21918c', '#28ae80', '#5ec962', '#addc30', '#fde725'];

function rgbOf(hex: string): [number, number, number] {
  return [parseInt(hex.slice(1, 3), 16), parseInt(hex.slice(3, 5), 16), parseInt(hex.slice(5, 7), 16)];
}

function hexOf([r, g, b]: [number, number, number]): string {
  return '#' + [r, g, b].map((c) => Math.round(c).toString(16).padStart(2, '0')).join('');
}

/** Viridis colour of t in [0, 1] (clamped), linearly interpolated between the stops. */
export function viridis(t: number): string {
  const clamped = Math.min(1, Math.max(0, t));
  const position = clamped * (VIRIDIS_STOPS.length - 1);
  const k = Math.min(VIRIDIS_STOPS.length - 2, Math.floor(position));
  const f = position - k;
  const a = rgbOf(VIRIDIS_STOPS[k]);
  const b = rgbOf(VIRIDIS_STOPS[k + 1]);
  return hexOf([a[0] + (b[0] - a[0]) * f, a[1] + (b[1] - a[1]) * f, a[2] + (b[2] - a[2]) * f]);
}

/** WCAG relative luminance of a #rrggbb colour. */
export function relativeLuminance(hex: string): number {
  const [r, g, b] = rgbOf(hex).map((c) => {
    const s = c / 255;
    return s <= 0.03928 ? s / 12.92 : Math.pow((s + 0.055) / 1.055, 2.4);
  });
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** Black or white text, whichever has the higher contrast ratio on `background`. */
export function textColourOn(background: string): '#000000' | '#ffffff' {
  const l = relativeLuminance(background);
  return (l + 0.05) / 0.05 >= 1.05 / (l + 0.05) ? '#000000' : '#ffffff';
}
