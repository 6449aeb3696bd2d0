// Small helpers shared by the second-look reports.
import type { Dataset } from '../dataset/types';
import type { ClassOutput } from './reportTypes';

/** The highest outputs of one row, best first, named by class. */
export function topClassOutputs(row: ArrayLike<number>, classNames: readonly string[], howMany = 3): ClassOutput[] {
  return Array.from({ length: row.length }, (_, c) => c)
    .sort((a, b) => row[b] - row[a] || a - b)
    .slice(0, howMany)
    .map((c) => ({ className: classNames[c], output: rounded(row[c]) }));
}

/** Four decimals: enough to rank by eye, short enough to read in JSON. */
export function rounded(value: number): number {
  return Math.round(value * 1e4) / 1e4;
}

/** Hashes of the label files as read, under their file names (what a decisions file's baseHashes holds). */
export function labelFileHashes(dataset: Dataset): Record<string, string> {
  const hashes: Record<string, string> = {};
  for (const file of [dataset.manifest.files.labels, dataset.manifest.files.classes]) {
    const hash = dataset.contentHashes[file];
    if (hash !== undefined) hashes[file] = hash;
  }
  return hashes;
}
