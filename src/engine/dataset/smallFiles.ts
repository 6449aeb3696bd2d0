// Whole-file reads for the small dataset files (manifest, classes, label log): bytes checked
// as UTF-8, hashed for conflict detection, problems located instead of thrown.
import { promises as fs } from 'node:fs';
import { createHash } from 'node:crypto';
import type { LocatedProblem } from './types';
import { firstInvalidUtf8 } from './csv';

export type TextFileRead =
  { text: string; sha256: string; missing: false } | { missing: true } | { problem: LocatedProblem; missing: false; sha256?: string };

export async function readTextFile(filePath: string, file: string): Promise<TextFileRead> {
  let bytes: Buffer;
  try {
    bytes = await fs.readFile(filePath);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return { missing: true };
    return { missing: false, problem: { file, line: 0, column: 0, message: `cannot read the file: ${(error as Error).message}` } };
  }
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  const bad = firstInvalidUtf8(bytes);
  if (bad < bytes.length) {
    const before = new TextDecoder().decode(bytes.subarray(0, bad));
    const lines = before.split(/\r\n|\r|\n/);
    const lastLine = lines[lines.length - 1].replace(/^\uFEFF/, '');
    return {
      missing: false,
      sha256,
      problem: { file, line: lines.length, column: lastLine.length + 1, message: 'invalid UTF-8 byte sequence: save the file as UTF-8' },
    };
  }
  return { text: new TextDecoder().decode(bytes), sha256, missing: false };
}

/** sha256 hex of a file's bytes (for files read by other means, e.g. features.npy). */
export function sha256Hex(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}
