// Building the Dataset from a dataset folder. Node ids become dense indices here and nowhere
// else; edges, slices, labels and features are kept in typed arrays (no per-row objects), so a
// 1,000,000-edge file loads in seconds. Every problem in every file is collected before failing.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { DatasetError, type ClassRecord, type Dataset, type DatasetManifest, type LocatedProblem, type SliceInfo } from './types';
import { readManifest, MANIFEST_FILE, type ManifestFile } from './manifest';
import { checkDuplicateHeaderNames, readCsvFile, requireColumns, type CsvReadResult, type CsvRow } from './csv';
import { SliceParser, type SliceKey } from './timeSlices';
import { tfidfFeatures } from './tfidf';
import { readLabelsCsv } from './labelsFile';
import { readClassesJson } from './classesFile';
import { sha256Hex } from './smallFiles';
import { GrowableFloat32, GrowableInt32 } from './growable';
import { ProblemCollector } from './problemCollector';
import { parseNpy } from '../io/npy';
import { silentProgress, throwIfCancelled, type CancelSignal, type ProgressSink } from '../util/progress';

export interface LoadOptions {
  progress?: ProgressSink;
  cancel?: CancelSignal;
}

export interface DatasetRead {
  /** null when any problem was found. */
  dataset: Dataset | null;
  problems: LocatedProblem[];
  /** The manifest, when it could be read (also when other files have problems). */
  manifest: DatasetManifest | null;
}

/** Loads a dataset folder; throws DatasetError listing every problem found. */
export async function loadDataset(folder: string, options: LoadOptions = {}): Promise<Dataset> {
  const { dataset, problems } = await readDatasetFolder(folder, options);
  if (!dataset) throw new DatasetError(problems);
  return dataset;
}

// Share of the progress bar for each stage of loading.
const PROGRESS = { nodes: [0, 0.4], edges: [0.4, 0.85], labels: [0.85, 0.9], features: [0.9, 1] } as const;

/** Reads and checks everything; returns the dataset or the located problems. Never writes. */
export async function readDatasetFolder(folderArgument: string, options: LoadOptions = {}): Promise<DatasetRead> {
  const folder = path.resolve(folderArgument);
  const progress = options.progress ?? silentProgress;
  const problems = new ProblemCollector();
  const stat = await fs.stat(folder).catch(() => null);
  if (!stat || !stat.isDirectory()) {
    return {
      dataset: null,
      manifest: null,
      problems: [{ file: folderArgument, line: 0, column: 0, message: stat ? 'not a folder' : 'folder not found' }],
    };
  }
  const manifestFile = await readManifest(folder);
  if (!manifestFile.manifest) return { dataset: null, manifest: null, problems: manifestFile.problems };
  const manifest = manifestFile.manifest;
  const contentHashes: Record<string, string> = { [MANIFEST_FILE]: manifestFile.sha256 };
  const stage = (name: keyof typeof PROGRESS) => (fraction: number) =>
    progress.report('load', PROGRESS[name][0] + (PROGRESS[name][1] - PROGRESS[name][0]) * fraction);

  const nodes = await readNodes(folder, manifest, problems, options.cancel, stage('nodes'));
  if (nodes.sha256) contentHashes[manifest.files.nodes] = nodes.sha256;
  throwIfCancelled(options.cancel);

  const edges = await readEdges(folder, manifest, manifestFile, nodes, problems, options.cancel, stage('edges'));
  if (edges.sha256) contentHashes[manifest.files.edges] = edges.sha256;
  throwIfCancelled(options.cancel);

  const labelsRead = await readLabels(folder, manifest, nodes, problems);
  Object.assign(contentHashes, labelsRead.hashes);
  stage('labels')(1);
  throwIfCancelled(options.cancel);

  const features = await readFeatures(folder, manifest, nodes, problems);
  if (features.sha256 && manifest.files.features) contentHashes[manifest.files.features] = features.sha256;
  stage('features')(1);

  const allProblems = problems.result();
  if (allProblems.length > 0) return { dataset: null, manifest, problems: allProblems };

  const { slices, nodeSlice, edgeSlice } = orderSlices(
    nodes.sliceKeys,
    nodes.provisionalSlice.toArray(),
    edges.provisionalSlice?.toArray(),
  );
  const dataset: Dataset = {
    folder,
    manifest,
    nodeIds: nodes.ids,
    indexOfId: nodes.indexOfId,
    nodeSlice,
    slices,
    nodeText: nodes.text,
    features: features.values,
    featureDim: features.names.length,
    featureNames: features.names,
    edges: {
      source: edges.source.toArray(),
      target: edges.target.toArray(),
      weight: edges.weight ? edges.weight.toArray() : null,
      count: edges.source.length,
      ...(edgeSlice ? { edgeSlice } : {}),
    },
    classNames: labelsRead.classNames,
    labels: labelsRead.labels,
    classes: labelsRead.classes,
    contentHashes,
  };
  return { dataset, manifest, problems: [] };
}

interface NodesRead {
  ids: string[];
  indexOfId: Map<string, number>;
  text: string[];
  /** Index into sliceKeys for each node; -1 when its time did not parse. */
  provisionalSlice: GrowableInt32;
  sliceKeys: SliceKeys;
  /** Numeric feature columns, row-major, when features.source is "columns". */
  columnFeatures: GrowableFloat32 | null;
  /** False when the file could not be read to the end: later checks against node ids are skipped. */
  complete: boolean;
  /** Ids on rejected (ragged) rows: not nodes, but not reported again as unknown elsewhere. */
  rejectedIds: Set<string>;
  sha256: string;
}

/** Slice keys in first-seen order; ordered by time at the end. */
class SliceKeys {
  readonly keys: SliceKey[] = [];
  private readonly indexOfKey = new Map<string, number>();
  constructor(readonly parser: SliceParser) {}

  /** Provisional index of a time value's slice, or the parse error. */
  intern(value: string): number | string {
    const parsed = this.parser.parse(value);
    if ('error' in parsed) return parsed.error;
    let index = this.indexOfKey.get(parsed.key);
    if (index === undefined) {
      index = this.keys.length;
      this.keys.push(parsed);
      this.indexOfKey.set(parsed.key, index);
    }
    return index;
  }
}

async function readCsvInFolder(
  folder: string,
  file: string,
  problems: ProblemCollector,
  onRow: (row: CsvRow) => void,
  onHeader: (header: CsvRow) => void,
  cancel: CancelSignal | undefined,
  onFraction: (f: number) => void,
  onRaggedRow?: (row: CsvRow) => void,
): Promise<CsvReadResult | null> {
  const filePath = path.join(folder, file);
  const exists = await fs.stat(filePath).then(
    (s) => s.isFile(),
    () => false,
  );
  if (!exists) {
    problems.add({ file, line: 0, column: 0, message: 'file not found' });
    return null;
  }
  const result = await readCsvFile(filePath, file, onRow, {
    cancel,
    onHeader,
    onRaggedRow,
    onBytes: (read, total) => onFraction(total > 0 ? read / total : 1),
  });
  problems.addAll(result.problems);
  problems.addUnlisted(file, result.unlistedProblemCount);
  return result;
}

async function readNodes(
  folder: string,
  manifest: DatasetManifest,
  problems: ProblemCollector,
  cancel: CancelSignal | undefined,
  onFraction: (f: number) => void,
): Promise<NodesRead> {
  const file = manifest.files.nodes;
  const ids: string[] = [];
  const indexOfId = new Map<string, number>();
  const firstLine = new GrowableInt32();
  const text: string[] = [];
  const provisionalSlice = new GrowableInt32();
  const sliceKeys = new SliceKeys(new SliceParser(manifest.time.granularity));
  const featureColumns = manifest.nodeColumns.features;
  const columnFeatures = manifest.features.source === 'columns' ? new GrowableFloat32() : null;
  let idIndex = -1;
  let timeIndex = -1;
  let textIndices: number[] = [];
  let featureIndices: number[] = [];
  let usable = false;

  const onHeader = (header: CsvRow): void => {
    const duplicates: LocatedProblem[] = [];
    checkDuplicateHeaderNames(header, file, duplicates);
    problems.addAll(duplicates);
    const list: LocatedProblem[] = [];
    [idIndex, timeIndex] = requireColumns(
      header,
      file,
      [
        { name: manifest.nodeColumns.id, role: 'nodeColumns.id in dataset.json' },
        { name: manifest.time.column, role: 'time.column in dataset.json' },
      ],
      list,
    );
    textIndices = requireColumns(
      header,
      file,
      manifest.nodeColumns.text.map((name) => ({ name, role: 'nodeColumns.text in dataset.json' })),
      list,
    );
    featureIndices = requireColumns(
      header,
      file,
      featureColumns.map((name) => ({ name, role: 'nodeColumns.features in dataset.json' })),
      list,
    );
    problems.addAll(list);
    usable = list.length === 0;
  };

  const onRow = (row: CsvRow): void => {
    if (!usable) return;
    const fields = row.fields;
    const id = fields[idIndex];
    if (id === '') {
      problems.add({ file, line: row.fieldLines[idIndex], column: row.fieldColumns[idIndex], message: 'empty node id' });
      return;
    }
    const existing = indexOfId.get(id);
    if (existing !== undefined) {
      problems.add({
        file,
        line: row.fieldLines[idIndex],
        column: row.fieldColumns[idIndex],
        message: `duplicate node id "${id}" (first on line ${firstLine.get(existing)})`,
      });
      return;
    }
    const slice = sliceKeys.intern(fields[timeIndex]);
    if (typeof slice === 'string')
      problems.add({ file, line: row.fieldLines[timeIndex], column: row.fieldColumns[timeIndex], message: `unparseable time: ${slice}` });
    indexOfId.set(id, ids.length);
    ids.push(id);
    firstLine.push(row.line);
    provisionalSlice.push(typeof slice === 'string' ? -1 : slice);
    if (textIndices.length === 0) text.push('');
    else if (textIndices.length === 1) text.push(fields[textIndices[0]]);
    else
      text.push(
        textIndices
          .map((k) => fields[k])
          .filter((t) => t.length > 0)
          .join(' — '),
      );
    if (columnFeatures) {
      for (const k of featureIndices) {
        const parsed = parseFeatureNumber(fields[k]);
        if (typeof parsed === 'string') {
          problems.add({
            file,
            line: row.fieldLines[k],
            column: row.fieldColumns[k],
            message: `${parsed} in feature column "${featureColumns[featureIndices.indexOf(k)]}"`,
          });
          columnFeatures.push(0);
        } else columnFeatures.push(parsed);
      }
    }
  };

  const rejectedIds = new Set<string>();
  const onRaggedRow = (row: CsvRow): void => {
    if (usable && idIndex < row.fields.length) rejectedIds.add(row.fields[idIndex]);
  };
  const result = await readCsvInFolder(folder, file, problems, onRow, onHeader, cancel, onFraction, onRaggedRow);
  if (result && result.header && !result.fatal && usable && ids.length === 0 && result.rowCount === 0) {
    problems.add({ file, line: result.header.line + 1, column: 1, message: 'no nodes: the file has a header but no rows' });
  }
  return {
    ids,
    indexOfId,
    text,
    provisionalSlice,
    sliceKeys,
    columnFeatures,
    rejectedIds,
    // Without a complete node list, "unknown node" reports in other files would be noise.
    complete: result !== null && !result.fatal && usable && ids.length > 0,
    sha256: result?.sha256 ?? '',
  };
}

const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** A finite decimal number, or the reason it is not one. */
export function parseFeatureNumber(raw: string): number | string {
  const text = raw.trim();
  if (text === '') return 'empty value';
  if (!DECIMAL.test(text)) {
    if (/^[+-]?(nan|inf|infinity)$/i.test(text)) return `"${raw}" is not a finite number`;
    return `non-numeric value "${raw}"`;
  }
  const value = Number(text);
  if (!Number.isFinite(value)) return `"${raw}" is not a finite number`;
  if (Math.abs(value) > 3.4028234663852886e38) return `"${raw}" is too large for a 32-bit float`;
  return value;
}

interface EdgesRead {
  source: GrowableInt32;
  target: GrowableInt32;
  weight: GrowableFloat32 | null;
  provisionalSlice: GrowableInt32 | null;
  sha256: string;
}

async function readEdges(
  folder: string,
  manifest: DatasetManifest,
  manifestFile: ManifestFile,
  nodes: NodesRead,
  problems: ProblemCollector,
  cancel: CancelSignal | undefined,
  onFraction: (f: number) => void,
): Promise<EdgesRead> {
  const file = manifest.files.edges;
  const columns = manifest.edgeColumns;
  const source = new GrowableInt32();
  const target = new GrowableInt32();
  let weight: GrowableFloat32 | null = null;
  let provisionalSlice: GrowableInt32 | null = null;
  let sourceIndex = -1;
  let targetIndex = -1;
  let weightIndex = -1;
  let timeIndex = -1;
  let usable = false;

  const onHeader = (header: CsvRow): void => {
    const duplicates: LocatedProblem[] = [];
    checkDuplicateHeaderNames(header, file, duplicates);
    problems.addAll(duplicates);
    const list: LocatedProblem[] = [];
    [sourceIndex, targetIndex] = requireColumns(
      header,
      file,
      [
        { name: columns.source, role: 'edgeColumns.source in dataset.json' },
        { name: columns.target, role: 'edgeColumns.target in dataset.json' },
      ],
      list,
    );
    if (columns.weight !== undefined)
      [weightIndex] = requireColumns(header, file, [{ name: columns.weight, role: 'edgeColumns.weight in dataset.json' }], list);
    if (columns.time !== undefined) {
      // The default time column is optional in the edges file; one named in dataset.json is not.
      if (manifestFile.explicit.has('edgeColumns.time'))
        [timeIndex] = requireColumns(header, file, [{ name: columns.time, role: 'edgeColumns.time in dataset.json' }], list);
      else timeIndex = header.fields.indexOf(columns.time);
    }
    problems.addAll(list);
    usable = list.length === 0;
    if (weightIndex >= 0) weight = new GrowableFloat32();
    if (timeIndex >= 0) provisionalSlice = new GrowableInt32();
  };

  const onRow = (row: CsvRow): void => {
    if (!usable) return;
    const u = nodes.indexOfId.get(row.fields[sourceIndex]);
    const v = nodes.indexOfId.get(row.fields[targetIndex]);
    let ok = true;
    if (u === undefined) {
      ok = false;
      if (nodes.complete && !nodes.rejectedIds.has(row.fields[sourceIndex]))
        problems.add({
          file,
          line: row.fieldLines[sourceIndex],
          column: row.fieldColumns[sourceIndex],
          message: `edge from unknown node "${row.fields[sourceIndex]}" (not in ${manifest.files.nodes})`,
        });
    }
    if (v === undefined) {
      ok = false;
      if (nodes.complete && !nodes.rejectedIds.has(row.fields[targetIndex]))
        problems.add({
          file,
          line: row.fieldLines[targetIndex],
          column: row.fieldColumns[targetIndex],
          message: `edge to unknown node "${row.fields[targetIndex]}" (not in ${manifest.files.nodes})`,
        });
    }
    let w = 1;
    if (weight) {
      const parsed = parseFeatureNumber(row.fields[weightIndex]);
      if (typeof parsed === 'string') {
        ok = false;
        problems.add({
          file,
          line: row.fieldLines[weightIndex],
          column: row.fieldColumns[weightIndex],
          message: `${parsed} in weight column "${columns.weight}"`,
        });
      } else w = parsed;
    }
    let slice = -1;
    if (provisionalSlice) {
      const interned = nodes.sliceKeys.intern(row.fields[timeIndex]);
      if (typeof interned === 'string') {
        ok = false;
        problems.add({
          file,
          line: row.fieldLines[timeIndex],
          column: row.fieldColumns[timeIndex],
          message: `unparseable time: ${interned}`,
        });
      } else slice = interned;
    }
    if (!ok) return;
    source.push(u!);
    target.push(v!);
    weight?.push(w);
    provisionalSlice?.push(slice);
  };

  const result = await readCsvInFolder(folder, file, problems, onRow, onHeader, cancel, onFraction);
  return { source, target, weight, provisionalSlice, sha256: result?.sha256 ?? '' };
}

interface LabelsOutcome {
  labels: Int32Array;
  classNames: string[];
  classes: ClassRecord[];
  hashes: Record<string, string>;
}

async function readLabels(folder: string, manifest: DatasetManifest, nodes: NodesRead, problems: ProblemCollector): Promise<LabelsOutcome> {
  const hashes: Record<string, string> = {};
  const classesRead = await readClassesJson(path.join(folder, manifest.files.classes), manifest.files.classes);
  problems.addAll(classesRead.problems);
  if (classesRead.sha256) hashes[manifest.files.classes] = classesRead.sha256;
  const classNames = classesRead.classes.map((c) => c.name);
  const classIndex = new Map(classNames.map((name, k) => [name, k]));
  const labels = new Int32Array(nodes.ids.length).fill(-1);
  const labelsPath = path.join(folder, manifest.files.labels);
  const exists = await fs.stat(labelsPath).then(
    (s) => s.isFile(),
    () => false,
  );
  if (exists) {
    const read = await readLabelsCsv(labelsPath, manifest.files.labels);
    hashes[manifest.files.labels] = read.sha256;
    problems.addAll(read.problems);
    for (const entry of read.entries) {
      const node = nodes.indexOfId.get(entry.id);
      if (node === undefined) {
        if (nodes.complete && !nodes.rejectedIds.has(entry.id))
          problems.add({
            file: manifest.files.labels,
            line: entry.line,
            column: entry.idColumn,
            message: `label on unknown node "${entry.id}" (not in ${manifest.files.nodes})`,
          });
        continue;
      }
      let k = classIndex.get(entry.label);
      if (k === undefined) {
        k = classNames.length;
        classNames.push(entry.label);
        classIndex.set(entry.label, k);
      }
      labels[node] = k;
    }
  }
  return { labels, classNames, classes: classesRead.classes, hashes };
}

interface FeaturesOutcome {
  values: Float32Array;
  names: string[];
  sha256: string;
}

async function readFeatures(
  folder: string,
  manifest: DatasetManifest,
  nodes: NodesRead,
  problems: ProblemCollector,
): Promise<FeaturesOutcome> {
  const nodeCount = nodes.ids.length;
  const empty: FeaturesOutcome = { values: new Float32Array(0), names: [], sha256: '' };
  switch (manifest.features.source) {
    case 'columns':
      return {
        values: nodes.columnFeatures ? nodes.columnFeatures.toArray() : new Float32Array(0),
        names: [...manifest.nodeColumns.features],
        sha256: '',
      };
    case 'tfidf': {
      if (problems.count > 0) return empty; // not worth computing for a dataset that will be rejected
      const { terms, features } = tfidfFeatures(nodes.text, { vocabularySize: manifest.features.vocabularySize });
      return { values: features, names: terms, sha256: '' };
    }
    case 'npy': {
      const file = manifest.files.features ?? 'features.npy';
      let bytes: Buffer;
      try {
        bytes = await fs.readFile(path.join(folder, file));
      } catch {
        problems.add({ file, line: 0, column: 0, message: 'file not found (features.source is "npy")' });
        return empty;
      }
      const sha256 = sha256Hex(bytes);
      let matrix;
      try {
        matrix = parseNpy(bytes, file);
      } catch (error) {
        if (error instanceof DatasetError) {
          problems.addAll(error.problems);
          return { ...empty, sha256 };
        }
        throw error;
      }
      const { shape, data, descr } = matrix;
      if (shape.length !== 2) {
        problems.add({
          file,
          line: 1,
          column: 1,
          message: `features must be a 2-D array (nodes × features); shape is (${shape.join(', ')})`,
        });
        return { ...empty, sha256 };
      }
      if (nodes.complete && shape[0] !== nodeCount) {
        problems.add({
          file,
          line: 1,
          column: 1,
          message: `shape (${shape.join(', ')}) has ${shape[0]} rows but ${manifest.files.nodes} has ${nodeCount} nodes`,
        });
        return { ...empty, sha256 };
      }
      const bytesPer = descr.endsWith('8') ? 8 : 4;
      const dataStart = bytes.length - data.length * bytesPer;
      for (let k = 0; k < data.length; k++) {
        if (!Number.isFinite(data[k])) {
          const row = Math.floor(k / shape[1]);
          problems.add({
            file,
            line: 1,
            column: dataStart + k * bytesPer + 1,
            message: `value at row ${row} (node "${nodes.ids[row] ?? row}"), column ${k % shape[1]} is ${data[k]}, not a finite number`,
          });
        }
      }
      const names = Array.from({ length: shape[1] }, (_, j) => `f${j}`);
      return { values: data, names, sha256 };
    }
  }
}

/** Orders slices in time and renumbers node (and edge) slice indices accordingly. */
function orderSlices(
  sliceKeys: SliceKeys,
  provisionalNodeSlice: Int32Array,
  provisionalEdgeSlice: Int32Array | undefined,
): { slices: SliceInfo[]; nodeSlice: Int32Array; edgeSlice?: Int32Array } {
  const keys = sliceKeys.keys;
  const order = keys.map((_, k) => k).sort((a, b) => keys[a].order - keys[b].order);
  const finalIndex = new Int32Array(keys.length);
  order.forEach((provisional, position) => (finalIndex[provisional] = position));
  const nodeSlice = provisionalNodeSlice.map((p) => finalIndex[p]);
  const slices: SliceInfo[] = order.map((provisional, index) => ({ key: keys[provisional].key, index, nodeCount: 0 }));
  for (let i = 0; i < nodeSlice.length; i++) slices[nodeSlice[i]].nodeCount++;
  const edgeSlice = provisionalEdgeSlice?.map((p) => finalIndex[p]);
  return { slices, nodeSlice, ...(edgeSlice ? { edgeSlice } : {}) };
}
