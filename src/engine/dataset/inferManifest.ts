// Guessing a dataset.json for `graph-curator init` from a folder holding nodes.csv and edges.csv
// (optionally features.npy and labels.csv).
//
// Rules:
// - columns: id "id" (else the first column); time "time" (else "date", "timestamp", "step",
//   "year"); edges "source"/"target" (else the first two columns), "weight" and "time" if present.
// - granularity: "step" when every time value is an integer; otherwise the coarsest of year,
//   quarter, month, week, day that the values allow and that gives at least MIN_SLICES slices
//   (enough for a history window plus later slices to evaluate on); if none does, the finest
//   the values allow.
// - features: features.npy if present; else the numeric node columns; else TF-IDF of the text.
// - other node columns: numeric ones are feature columns, the rest text columns.
import * as path from 'node:path';
import { promises as fs } from 'node:fs';
import { DatasetError, type DatasetManifest, type LocatedProblem, type SliceGranularity } from './types';
import { readCsvFile, type CsvRow } from './csv';
import { dateSlice, parseIsoDate, type ParsedDate } from './timeSlices';
import { parseFeatureNumber } from './load';
import { withDefaults } from './manifest';

export const MIN_SLICES = 6;

const DATE_GRANULARITIES: { granularity: Exclude<SliceGranularity, 'step'>; precision: number }[] = [
  { granularity: 'year', precision: 0 },
  { granularity: 'quarter', precision: 1 },
  { granularity: 'month', precision: 1 },
  { granularity: 'week', precision: 2 },
  { granularity: 'day', precision: 2 },
];

export interface InferredManifest {
  manifest: DatasetManifest;
  /**
   * What to write as dataset.json: the manifest with every default spelled out, except
   * edgeColumns.time when the edges file has no time column (a written column must exist).
   */
  fileContent: Record<string, unknown>;
  /** One line per decision, for the user to review. */
  notes: string[];
}

interface ColumnStats {
  name: string;
  numeric: boolean;
  nonEmpty: number;
}

/** Reads the folder's files and proposes a manifest; throws DatasetError when it cannot. */
export async function inferManifest(folderArgument: string): Promise<InferredManifest> {
  const folder = path.resolve(folderArgument);
  const notes: string[] = [];
  const problems: LocatedProblem[] = [];
  const nodesFile = 'nodes.csv';
  const edgesFile = 'edges.csv';
  for (const file of [nodesFile, edgesFile]) {
    if (!(await isFile(path.join(folder, file))))
      problems.push({ file, line: 0, column: 0, message: `file not found in ${folder}: init needs ${nodesFile} and ${edgesFile}` });
  }
  if (problems.length > 0) throw new DatasetError(problems);

  // Nodes: column statistics and the time values.
  let stats: ColumnStats[] = [];
  let timeIndex = -1;
  let idName = '';
  const timeValues: { value: string; line: number; column: number }[] = [];
  const distinctTimes = new Set<string>();
  const nodes = await readCsvFile(
    path.join(folder, nodesFile),
    nodesFile,
    (row: CsvRow) => {
      row.fields.forEach((value, k) => {
        const s = stats[k];
        if (value.trim() === '') return;
        s.nonEmpty++;
        if (s.numeric && typeof parseFeatureNumber(value) === 'string') s.numeric = false;
      });
      if (timeIndex >= 0 && !distinctTimes.has(row.fields[timeIndex])) {
        distinctTimes.add(row.fields[timeIndex]);
        timeValues.push({ value: row.fields[timeIndex], line: row.fieldLines[timeIndex], column: row.fieldColumns[timeIndex] });
      }
    },
    {
      onHeader: (header) => {
        stats = header.fields.map((name) => ({ name, numeric: true, nonEmpty: 0 }));
        idName = header.fields.includes('id') ? 'id' : header.fields[0];
        const timeName = ['time', 'date', 'timestamp', 'step', 'year'].find((n) => header.fields.includes(n));
        if (timeName === undefined)
          problems.push({
            file: nodesFile,
            line: header.line,
            column: 1,
            message: 'no time column: name one "time" (an ISO-8601 date or an integer step)',
          });
        else timeIndex = header.fields.indexOf(timeName);
      },
    },
  );
  problems.push(...nodes.problems);
  if (problems.length > 0) throw new DatasetError(problems);
  const timeName = stats[timeIndex].name;
  const granularity = chooseGranularity(timeValues, nodesFile, problems);
  if (problems.length > 0) throw new DatasetError(problems);
  notes.push(`time: column "${timeName}", granularity "${granularity.granularity}" (${granularity.sliceCount} slices)`);

  const others = stats.filter((s) => s.name !== idName && s.name !== timeName && s.nonEmpty > 0);
  const numericColumns = others.filter((s) => s.numeric).map((s) => s.name);
  const textColumns = others.filter((s) => !s.numeric).map((s) => s.name);

  // Edges: header only.
  const edges = await readCsvFile(path.join(folder, edgesFile), edgesFile, () => undefined);
  problems.push(...edges.problems);
  if (problems.length > 0 || !edges.header) throw new DatasetError(problems);
  const edgeFields = edges.header.fields;
  if (edgeFields.length < 2)
    throw new DatasetError([
      { file: edgesFile, line: 1, column: 1, message: 'the edges file needs at least two columns (source, target)' },
    ]);
  const sourceName = edgeFields.includes('source') ? 'source' : edgeFields[0];
  const targetName = edgeFields.includes('target') ? 'target' : edgeFields[sourceName === edgeFields[1] ? 0 : 1];

  const hasNpy = await isFile(path.join(folder, 'features.npy'));
  let source: DatasetManifest['features']['source'];
  if (hasNpy) source = 'npy';
  else if (numericColumns.length > 0) source = 'columns';
  else if (textColumns.length > 0) source = 'tfidf';
  else {
    throw new DatasetError([
      {
        file: nodesFile,
        line: 1,
        column: 1,
        message: 'no features found: add features.npy, numeric node columns, or text columns for TF-IDF',
      },
    ]);
  }
  notes.push(
    `features: ${source === 'npy' ? 'features.npy' : source === 'columns' ? `numeric columns ${numericColumns.join(', ')}` : `TF-IDF of ${textColumns.join(', ')}`}`,
  );
  if (textColumns.length > 0) notes.push(`text columns: ${textColumns.join(', ')}`);

  const raw = {
    name: path.basename(folder),
    time: { column: timeName, granularity: granularity.granularity },
    nodeColumns: { id: idName, text: textColumns, features: numericColumns },
    edgeColumns: {
      source: sourceName,
      target: targetName,
      ...(edgeFields.includes('time') ? { time: 'time' } : {}),
      ...(edgeFields.includes('weight') ? { weight: 'weight' } : {}),
    },
    features: { source },
    ...(hasNpy ? { files: { features: 'features.npy' } } : {}),
  };
  const manifest = withDefaults(raw);
  const fileContent = JSON.parse(JSON.stringify(manifest)) as Record<string, unknown> & { edgeColumns: Record<string, unknown> };
  if (!edgeFields.includes(manifest.edgeColumns.time ?? '')) delete fileContent.edgeColumns.time;
  return { manifest, fileContent, notes };
}

/** Granularity by the rule in the file comment; problems for values that are not times. */
export function chooseGranularity(
  values: { value: string; line: number; column: number }[],
  file: string,
  problems: LocatedProblem[],
): { granularity: SliceGranularity; sliceCount: number } {
  if (values.length > 0 && values.every((v) => /^[+-]?\d+$/.test(v.value.trim()))) {
    return { granularity: 'step', sliceCount: new Set(values.map((v) => Number(v.value))).size };
  }
  const dates: ParsedDate[] = [];
  for (const v of values) {
    const parsed = parseIsoDate(v.value);
    if ('error' in parsed) problems.push({ file, line: v.line, column: v.column, message: `unparseable time: ${parsed.error}` });
    else dates.push(parsed);
  }
  if (problems.length > 0 || dates.length === 0) return { granularity: 'step', sliceCount: 0 };
  const precision = Math.min(...dates.map((d) => d.precision));
  const allowed = DATE_GRANULARITIES.filter((g) => g.precision <= precision);
  let best = { granularity: allowed[allowed.length - 1].granularity as SliceGranularity, sliceCount: 0 };
  for (const { granularity } of allowed) {
    const count = new Set(dates.map((d) => dateSlice(d, granularity).key)).size;
    if (count >= MIN_SLICES) return { granularity, sliceCount: count };
    best = { granularity, sliceCount: count };
  }
  return best;
}

async function isFile(p: string): Promise<boolean> {
  return fs.stat(p).then(
    (s) => s.isFile(),
    () => false,
  );
}
