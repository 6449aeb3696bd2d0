// Any CSS colour the theme or the palette gives (#rgb, #rrggbb, rgb(a), hsl, names) as RGBA bytes,
// read back from a one-pixel canvas so that the browser's own parser decides. Cached per string.
const cache = new Map<string, Uint8Array>();
let context: CanvasRenderingContext2D | null | undefined;

export function cssColourBytes(colour: string): Uint8Array {
  const known = cache.get(colour);
  if (known) return known;
  context ??= document.createElement('canvas').getContext('2d', { willReadFrequently: true });
  let bytes = Uint8Array.of(128, 128, 128, 255);
  if (context) {
    context.clearRect(0, 0, 1, 1);
    context.fillStyle = '#808080';
    context.fillStyle = colour;
    context.fillRect(0, 0, 1, 1);
    // getImageData gives straight (not premultiplied) colour.
    bytes = Uint8Array.from(context.getImageData(0, 0, 1, 1).data);
  }
  cache.set(colour, bytes);
  return bytes;
}
