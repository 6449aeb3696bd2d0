// NumPy .npy format (format versions 1.0, 2.0 and 3.0) for float32/float64 matrices in C order.
// Problems are reported as located problems: line 1, column = 1-based byte offset in the file.
import { DatasetError, type LocatedProblem } from '../dataset/types';

export interface NpyMatrix {
  data: Float32Array;
  shape: number[];
  /** dtype as written in the file, e.g. "<f4". */
  descr: string;
}

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]; // \x93NUMPY

function fail(file: string, byteOffset: number, message: string): never {
  const problem: LocatedProblem = { file, line: 1, column: byteOffset + 1, message };
  throw new DatasetError([problem]);
}

/** Parses a .npy buffer into Float32 values (float64 is narrowed). */
export function parseNpy(buffer: Uint8Array, file: string): NpyMatrix {
  if (buffer.length < 10) fail(file, 0, `not a NumPy .npy file: only ${buffer.length} bytes`);
  for (let i = 0; i < MAGIC.length; i++) {
    if (buffer[i] !== MAGIC[i]) fail(file, i, 'not a NumPy .npy file: bad magic string');
  }
  const major = buffer[6];
  let headerLength: number;
  let headerStart: number;
  const view = new DataView(buffer.buffer, buffer.byteOffset, buffer.byteLength);
  if (major === 1) {
    headerLength = view.getUint16(8, true);
    headerStart = 10;
  } else if (major === 2 || major === 3) {
    if (buffer.length < 12) fail(file, 8, 'truncated .npy header');
    headerLength = view.getUint32(8, true);
    headerStart = 12;
  } else {
    fail(file, 6, `unsupported .npy format version ${major}`);
  }
  if (headerStart + headerLength > buffer.length) fail(file, headerStart, 'truncated .npy header');
  const header = new TextDecoder('latin1').decode(buffer.subarray(headerStart, headerStart + headerLength));
  const descr = /'descr'\s*:\s*'([^']*)'/.exec(header)?.[1];
  const fortran = /'fortran_order'\s*:\s*(True|False)/.exec(header)?.[1];
  const shapeText = /'shape'\s*:\s*\(([^)]*)\)/.exec(header)?.[1];
  if (descr === undefined || fortran === undefined || shapeText === undefined) {
    fail(file, headerStart, `malformed .npy header: ${header.trim()}`);
  }
  if (fortran === 'True') fail(file, headerStart, 'features must be stored in C order, not Fortran order');
  const shape = shapeText
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s.length > 0)
    .map((s) => Number(s));
  if (shape.some((d) => !Number.isInteger(d) || d < 0)) fail(file, headerStart, `malformed .npy shape (${shapeText})`);
  const dataStart = headerStart + headerLength;
  const count = shape.reduce((a, b) => a * b, 1);
  let bytesPer: number;
  if (descr === '<f4' || descr === '=f4') bytesPer = 4;
  else if (descr === '<f8' || descr === '=f8') bytesPer = 8;
  else fail(file, headerStart, `unsupported dtype '${descr}': expected little-endian float32 ('<f4') or float64 ('<f8')`);
  const expected = dataStart + count * bytesPer;
  if (buffer.length !== expected) {
    fail(
      file,
      Math.min(buffer.length, dataStart),
      `data size mismatch: shape (${shape.join(', ')}) of ${descr} needs ${count * bytesPer} bytes, file has ${buffer.length - dataStart}`,
    );
  }
  const data = new Float32Array(count);
  if (bytesPer === 4) {
    if ((buffer.byteOffset + dataStart) % 4 === 0) {
      data.set(new Float32Array(buffer.buffer, buffer.byteOffset + dataStart, count));
    } else {
      for (let i = 0; i < count; i++) data[i] = view.getFloat32(dataStart + 4 * i, true);
    }
  } else {
    for (let i = 0; i < count; i++) data[i] = view.getFloat64(dataStart + 8 * i, true);
  }
  return { data, shape, descr };
}

/** Encodes a float32 matrix as .npy version 1.0 (header padded to a multiple of 64 bytes). */
export function encodeNpy(data: Float32Array, shape: number[]): Uint8Array {
  const count = shape.reduce((a, b) => a * b, 1);
  if (count !== data.length) throw new Error(`encodeNpy: shape (${shape.join(', ')}) does not match ${data.length} values`);
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  let header = `{'descr': '<f4', 'fortran_order': False, 'shape': ${shapeText}, }`;
  const unpadded = 10 + header.length + 1;
  header += ' '.repeat((64 - (unpadded % 64)) % 64) + '\n';
  const out = new Uint8Array(10 + header.length + data.length * 4);
  out.set(MAGIC, 0);
  out[6] = 1;
  out[7] = 0;
  new DataView(out.buffer).setUint16(8, header.length, true);
  for (let i = 0; i < header.length; i++) out[10 + i] = header.charCodeAt(i);
  const body = new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
  out.set(body, 10 + header.length);
  return out;
}
