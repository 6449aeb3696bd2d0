// Reads the pixels of a PNG that Chromium's screenshot wrote (8-bit RGB or RGBA, not interlaced),
// so that a test can find where something was drawn. Decoding per the PNG specification
// (W3C, Portable Network Graphics, 2nd edition: chunks, zlib stream, the five scanline filters).
import { inflateSync } from 'node:zlib';

export interface Pixels {
  width: number;
  height: number;
  /** RGBA, row by row. */
  rgba: Uint8Array;
}

export function decodePng(png: Buffer): Pixels {
  if (png.readUInt32BE(0) !== 0x89504e47) throw new Error('not a PNG');
  let offset = 8;
  let width = 0;
  let height = 0;
  let channels = 0;
  const data: Buffer[] = [];
  while (offset < png.length) {
    const length = png.readUInt32BE(offset);
    const type = png.toString('latin1', offset + 4, offset + 8);
    const body = png.subarray(offset + 8, offset + 8 + length);
    if (type === 'IHDR') {
      width = body.readUInt32BE(0);
      height = body.readUInt32BE(4);
      const [bitDepth, colourType, , , interlace] = body.subarray(8, 13);
      if (bitDepth !== 8 || interlace !== 0 || (colourType !== 2 && colourType !== 6))
        throw new Error(`unsupported PNG (depth ${bitDepth}, colour type ${colourType}, interlace ${interlace})`);
      channels = colourType === 6 ? 4 : 3;
    } else if (type === 'IDAT') data.push(body);
    else if (type === 'IEND') break;
    offset += 12 + length;
  }
  const raw = inflateSync(Buffer.concat(data));
  const stride = width * channels;
  const rows = new Uint8Array(height * stride);
  for (let y = 0; y < height; y++) {
    const filter = raw[y * (stride + 1)];
    const line = raw.subarray(y * (stride + 1) + 1, (y + 1) * (stride + 1));
    for (let x = 0; x < stride; x++) {
      const left = x >= channels ? rows[y * stride + x - channels] : 0;
      const up = y > 0 ? rows[(y - 1) * stride + x] : 0;
      const upLeft = y > 0 && x >= channels ? rows[(y - 1) * stride + x - channels] : 0;
      let predictor = 0;
      if (filter === 1) predictor = left;
      else if (filter === 2) predictor = up;
      else if (filter === 3) predictor = (left + up) >> 1;
      else if (filter === 4) {
        const p = left + up - upLeft;
        const [pa, pb, pc] = [Math.abs(p - left), Math.abs(p - up), Math.abs(p - upLeft)];
        predictor = pa <= pb && pa <= pc ? left : pb <= pc ? up : upLeft;
      }
      rows[y * stride + x] = (line[x] + predictor) & 255;
    }
  }
  const rgba = new Uint8Array(width * height * 4);
  for (let i = 0; i < width * height; i++) {
    for (let c = 0; c < channels; c++) rgba[4 * i + c] = rows[i * channels + c];
    if (channels === 3) rgba[4 * i + 3] = 255;
  }
  return { width, height, rgba };
}

/** Centres of the 4-connected blobs of pixels exactly of one colour (#rrggbb), largest first. */
export function blobsOfColour(pixels: Pixels, hex: string): { x: number; y: number; size: number }[] {
  const value = parseInt(hex.slice(1), 16);
  const target = [(value >> 16) & 255, (value >> 8) & 255, value & 255];
  const { width, height, rgba } = pixels;
  const matches = (i: number) => rgba[4 * i] === target[0] && rgba[4 * i + 1] === target[1] && rgba[4 * i + 2] === target[2];
  const seen = new Uint8Array(width * height);
  const blobs: { x: number; y: number; size: number }[] = [];
  for (let start = 0; start < width * height; start++) {
    if (seen[start] || !matches(start)) continue;
    const stack = [start];
    seen[start] = 1;
    let [sumX, sumY, size] = [0, 0, 0];
    while (stack.length) {
      const i = stack.pop() as number;
      const [x, y] = [i % width, Math.floor(i / width)];
      sumX += x;
      sumY += y;
      size++;
      for (const [nx, ny] of [
        [x - 1, y],
        [x + 1, y],
        [x, y - 1],
        [x, y + 1],
      ]) {
        const j = ny * width + nx;
        if (nx >= 0 && ny >= 0 && nx < width && ny < height && !seen[j] && matches(j)) {
          seen[j] = 1;
          stack.push(j);
        }
      }
    }
    blobs.push({ x: sumX / size, y: sumY / size, size });
  }
  return blobs.sort((a, b) => b.size - a.size);
}
