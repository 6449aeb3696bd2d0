// Generates the whole demo dataset and writes it as a dataset folder, plus the ground truth of
// every report in `<folder>.truth.csv` beside it (never inside it: the tools must not see it).
// Every file is written atomically; large files are written in chunks, never as one string.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { writeChunksAtomic, writeFileAtomic } from '../../src/engine/io/atomicWrite';
import { encodeNpy } from '../../src/engine/io/npy';
import { SeededRandom } from '../../src/engine/util/random';
import type { ClassRecord } from '../../src/engine/dataset/types';
import { csvLine } from './csvText';
import { buildGaussianFeatures } from './gaussianFeatures';
import { chooseLabelled } from './labelling';
import type { DemoOptions } from './options';
import { buildReferences } from './references';
import { writeReportText } from './reportText';
import { FAILURE_MODES, SITES, sliceKey } from './scenario';
import { buildTimeline, type ReportTimeline } from './timeline';

export const DATASET_NAME = 'wind-farm';
const ROWS_PER_CHUNK = 20_000;

export interface DemoSummary {
  folder: string;
  truthFile: string;
  nodes: number;
  edges: number;
  labelled: number;
  /** 0 when features come from TF-IDF of the text. */
  featureDim: number;
  /** Share of edges joining two reports of the same true failure mode. */
  homophily: number;
  /** Number of reports of each novel mode. */
  novelCounts: Record<string, number>;
}

export function reportId(index: number, count: number): string {
  return 'R' + String(index + 1).padStart(Math.max(6, String(count).length), '0');
}

function turbineName(turbine: number, turbineCount: number): string {
  return 'T-' + String(turbine + 1).padStart(Math.max(3, String(turbineCount).length), '0');
}

/** Yields the lines of a table in chunks of ROWS_PER_CHUNK rows. */
function* chunkedLines(header: string[], rows: number, row: (i: number) => string[] | null): Generator<string> {
  let chunk = csvLine(header);
  let inChunk = 0;
  for (let i = 0; i < rows; i++) {
    const fields = row(i);
    if (fields === null) continue;
    chunk += csvLine(fields);
    if (++inChunk === ROWS_PER_CHUNK) {
      yield chunk;
      chunk = '';
      inChunk = 0;
    }
  }
  if (chunk.length > 0) yield chunk;
}

/** Refuses to overwrite a dataset whose label log holds curated work. */
async function guardCuratedWork(folder: string, force: boolean): Promise<void> {
  if (force) return;
  const log = path.join(folder, 'label-log.jsonl');
  const size = await fs.stat(log).then(
    (s) => s.size,
    () => 0,
  );
  if (size > 0) {
    throw new Error(
      `${log} already holds curated label changes; regenerating would overwrite them. Pass --force to overwrite, or choose another --out folder.`,
    );
  }
}

function manifest(options: DemoOptions): object {
  const npy = options.features > 0;
  return {
    name: DATASET_NAME,
    description:
      'Invented inspection and maintenance reports of a fictional wind-farm operator, quarterly from 2019-Q1 to 2024-Q4. ' +
      `Demo data made by demo-data/generator (${options.nodes} reports, ${options.edgesPerNode} references per report, seed ${options.seed}); ` +
      'no real people, companies, places or data.',
    directed: false,
    time: { column: 'time', granularity: 'quarter' },
    files: {
      nodes: 'nodes.csv',
      edges: 'edges.csv',
      labels: 'labels.csv',
      classes: 'classes.json',
      log: 'label-log.jsonl',
      ...(npy ? { features: 'features.npy' } : {}),
    },
    nodeColumns: { id: 'id', text: ['title', 'text'], features: [] },
    edgeColumns: { source: 'source', target: 'target', time: 'time' },
    features: { source: npy ? 'npy' : 'tfidf', vocabularySize: 2000 },
    seed: options.seed,
  };
}

function knownClasses(): { classes: ClassRecord[] } {
  return {
    classes: FAILURE_MODES.filter((mode) => !mode.novel).map((mode) => ({
      name: mode.name,
      description: mode.description,
      introducedIn: sliceKey(mode.firstSlice),
      status: 'active' as const,
    })),
  };
}

function nodeRows(timeline: ReportTimeline, seed: number): Generator<string> {
  const random = new SeededRandom(seed ^ 0x7e47);
  return chunkedLines(['id', 'time', 'turbine', 'site', 'title', 'text'], timeline.count, (i) => {
    const turbine = turbineName(timeline.turbine[i], timeline.turbineCount);
    const { title, text } = writeReportText(timeline.mode[i], timeline.slice[i], turbine, random);
    return [reportId(i, timeline.count), timeline.date[i], turbine, SITES[timeline.turbineSite[timeline.turbine[i]]].name, title, text];
  });
}

export async function generateDemoDataset(options: DemoOptions): Promise<DemoSummary> {
  const folder = path.resolve(options.out);
  const truthFile = `${folder}.truth.csv`;
  await guardCuratedWork(folder, options.force);
  await fs.mkdir(folder, { recursive: true });

  const timeline = buildTimeline(options.nodes, options.seed);
  const references = buildReferences(timeline, options.edgesPerNode, options.seed);
  const labelled = chooseLabelled(timeline, options.seed);
  const id = (i: number) => reportId(i, timeline.count);
  const modeName = (i: number) => FAILURE_MODES[timeline.mode[i]].name;

  await writeFileAtomic(path.join(folder, 'dataset.json'), JSON.stringify(manifest(options), null, 2) + '\n');
  await writeFileAtomic(path.join(folder, 'classes.json'), JSON.stringify(knownClasses(), null, 2) + '\n');
  await writeChunksAtomic(path.join(folder, 'nodes.csv'), nodeRows(timeline, options.seed));
  await writeChunksAtomic(
    path.join(folder, 'edges.csv'),
    chunkedLines(['source', 'target', 'time'], references.count, (e) => [
      id(references.source[e]),
      id(references.target[e]),
      timeline.date[references.source[e]],
    ]),
  );
  // Report order is id order, so both files come out sorted by id.
  await writeChunksAtomic(
    path.join(folder, 'labels.csv'),
    chunkedLines(['id', 'label'], timeline.count, (i) => (labelled[i] ? [id(i), modeName(i)] : null)),
  );
  await writeFileAtomic(path.join(folder, 'label-log.jsonl'), '');
  if (options.features > 0) {
    const features = buildGaussianFeatures(timeline, options.features, options.seed);
    await writeFileAtomic(path.join(folder, 'features.npy'), encodeNpy(features, [timeline.count, options.features]));
  }
  await writeChunksAtomic(
    truthFile,
    chunkedLines(['id', 'label'], timeline.count, (i) => [id(i), modeName(i)]),
  );

  let sameMode = 0;
  for (let e = 0; e < references.count; e++) if (timeline.mode[references.source[e]] === timeline.mode[references.target[e]]) sameMode++;
  const novelCounts: Record<string, number> = {};
  for (const mode of FAILURE_MODES) if (mode.novel) novelCounts[mode.name] = 0;
  for (let i = 0; i < timeline.count; i++) if (FAILURE_MODES[timeline.mode[i]].novel) novelCounts[modeName(i)]++;
  return {
    folder,
    truthFile,
    nodes: timeline.count,
    edges: references.count,
    labelled: labelled.reduce((a, b) => a + b, 0),
    featureDim: options.features,
    homophily: references.count > 0 ? sameMode / references.count : 0,
    novelCounts,
  };
}
