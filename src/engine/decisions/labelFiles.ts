// The three files an apply touches (labels.csv, classes.json, label-log.jsonl), read together
// through the dataset layer's readers, with the sha256 of the exact bytes each decision is
// checked against. Never writes.
import { promises as fs } from 'node:fs';
import { createHash } from 'node:crypto';
import * as path from 'node:path';
import { DatasetError, type ClassRecord, type DatasetManifest } from '../dataset/types';
import { readManifest } from '../dataset/manifest';
import { readLabelsCsv } from '../dataset/labelsFile';
import { parseClassesJson } from '../dataset/classesFile';
import { readBatchLog, type BatchLogRead } from './batchLog';
import { ConflictError } from './applyErrors';

export interface LabelFileNames {
  labels: string;
  classes: string;
  log: string;
}

export interface LabelFilesSnapshot {
  /** Absolute dataset folder. */
  folder: string;
  manifest: DatasetManifest;
  /** File names as in dataset.json (relative to the folder). */
  names: LabelFileNames;
  /** Absolute paths. */
  paths: LabelFileNames;
  /** sha256 by file name; null for a file that does not exist. */
  hashes: Record<string, string | null>;
  /** Exact text of labels.csv (null when absent) and its labels by node id. */
  labelsText: string | null;
  labels: Map<string, string>;
  classesText: string | null;
  classes: ClassRecord[];
  log: BatchLogRead;
}

export function sha256OfText(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

/** sha256 of a file's bytes, or null when it does not exist. */
export async function fileHash(filePath: string): Promise<string | null> {
  try {
    return createHash('sha256')
      .update(await fs.readFile(filePath))
      .digest('hex');
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return null;
    throw error;
  }
}

async function readOptionalText(filePath: string): Promise<{ text: string; sha256: string } | null> {
  let bytes: Buffer;
  try {
    bytes = await fs.readFile(filePath);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return null;
    throw error;
  }
  // ignoreBOM keeps a byte-order mark in the text, so writing the text back restores the same bytes.
  return { text: new TextDecoder('utf-8', { ignoreBOM: true }).decode(bytes), sha256: createHash('sha256').update(bytes).digest('hex') };
}

export async function labelFileNamesOf(
  folder: string,
): Promise<{ manifest: DatasetManifest; names: LabelFileNames; paths: LabelFileNames }> {
  const absolute = path.resolve(folder);
  const read = await readManifest(absolute);
  if (!read.manifest) throw new DatasetError(read.problems);
  const { labels, classes, log } = read.manifest.files;
  return {
    manifest: read.manifest,
    names: { labels, classes, log },
    paths: { labels: path.join(absolute, labels), classes: path.join(absolute, classes), log: path.join(absolute, log) },
  };
}

/** Reads the label files; problems in labels.csv or classes.json throw a DatasetError (nothing can be applied to a broken file). */
export async function readLabelFiles(folder: string): Promise<LabelFilesSnapshot> {
  const { manifest, names, paths } = await labelFileNamesOf(folder);
  const hashes: Record<string, string | null> = {};

  const labelsRaw = await readOptionalText(paths.labels);
  hashes[names.labels] = labelsRaw?.sha256 ?? null;
  let labels = new Map<string, string>();
  if (labelsRaw) {
    const read = await readLabelsCsv(paths.labels, names.labels);
    if (read.problems.length > 0) throw new DatasetError(read.problems);
    // The reader read the file again: if the bytes differ, someone is writing it right now.
    if (read.sha256 !== labelsRaw.sha256)
      throw new ConflictError([{ file: names.labels, expected: labelsRaw.sha256, found: read.sha256, since: 'plan' }]);
    labels = read.labels;
  }

  const classesRaw = await readOptionalText(paths.classes);
  hashes[names.classes] = classesRaw?.sha256 ?? null;
  let classes: ClassRecord[] = [];
  if (classesRaw) {
    const parsed = parseClassesJson(classesRaw.text, names.classes);
    if (parsed.problems.length > 0) throw new DatasetError(parsed.problems);
    classes = parsed.classes;
  }

  const log = await readBatchLog(paths.log, names.log);
  hashes[names.log] = log.sha256 === '' ? null : log.sha256;

  return {
    folder: path.resolve(folder),
    manifest,
    names,
    paths,
    hashes,
    labelsText: labelsRaw?.text ?? null,
    labels,
    classesText: classesRaw?.text ?? null,
    classes,
    log,
  };
}
