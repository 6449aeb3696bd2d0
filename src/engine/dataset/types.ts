// The dataset model: what every later stage (engine, discovery, review, apply) reads.
// Built once from the files of a dataset folder; node ids are mapped to dense indices here
// and nowhere else.

export type SliceGranularity = 'year' | 'quarter' | 'month' | 'week' | 'day' | 'step';

export type FeatureSource = 'npy' | 'columns' | 'tfidf';

/** dataset.json, after defaults are filled in. The JSON Schema in schemas/ mirrors this. */
export interface DatasetManifest {
  name: string;
  description: string;
  directed: boolean;
  time: {
    /** Column of nodes.csv holding an ISO-8601 date or an integer step. */
    column: string;
    granularity: SliceGranularity;
  };
  files: {
    nodes: string;
    edges: string;
    labels: string;
    classes: string;
    log: string;
    /** Present only when features come from a .npy file. */
    features?: string;
  };
  nodeColumns: {
    id: string;
    /** Free-text columns: shown to curators, used for TF-IDF features and c-TF-IDF terms. */
    text: string[];
    /** Numeric feature columns (used when features.source is 'columns'). */
    features: string[];
  };
  edgeColumns: {
    source: string;
    target: string;
    time?: string;
    weight?: string;
  };
  features: {
    source: FeatureSource;
    /** Cap on the TF-IDF vocabulary (most frequent terms kept). */
    vocabularySize: number;
  };
  seed: number;
}

export interface SliceInfo {
  /** Canonical key, e.g. "2021-Q3", "2021-07", "2021-W05", "2021-07-14", "2021", "17". */
  key: string;
  /** Position in time order, 0-based. */
  index: number;
  /** Number of nodes in the slice. */
  nodeCount: number;
}

export type ClassStatus = 'active' | 'merged' | 'retired';

/** One entry of classes.json. */
export interface ClassRecord {
  name: string;
  description: string;
  /** Slice key in which the class was introduced. */
  introducedIn: string;
  status: ClassStatus;
  /** When status is 'merged': the class it was merged into. */
  mergedInto?: string;
}

/** One line of label-log.jsonl. */
export interface LabelLogEntry {
  time: string; // ISO-8601
  node: string;
  oldLabel: string | null;
  newLabel: string | null;
  reason: string;
  decisionId?: string;
  runId?: string;
  settingsHash?: string;
}

/** Edge list with dense node indices; undirected datasets keep each edge once as given. */
export interface EdgeList {
  source: Int32Array;
  target: Int32Array;
  /** null when the edges file has no weight column (all weights 1). */
  weight: Float32Array | null;
  count: number;
  /**
   * Slice index of each edge, from the edges file's time column. Absent when the file has no
   * time column: an edge then belongs to the slice of its later endpoint (see edgeSliceOf).
   */
  edgeSlice?: Int32Array;
}

export interface Dataset {
  /** Absolute path of the dataset folder. */
  folder: string;
  manifest: DatasetManifest;
  /** Node id strings, in nodes.csv order; index = dense node index. */
  nodeIds: string[];
  indexOfId: Map<string, number>;
  /** Slice index of each node. */
  nodeSlice: Int32Array;
  slices: SliceInfo[];
  /** Text of each node: the text columns joined by " — " (empty string when none). */
  nodeText: string[];
  /** Row-major node features, nodeCount × featureDim. */
  features: Float32Array;
  featureDim: number;
  /** Names of the feature columns (TF-IDF terms, column names, or "f0".."fD" for npy). */
  featureNames: string[];
  edges: EdgeList;
  /** Class names known to the dataset: classes.json order, then any label not yet registered. */
  classNames: string[];
  /** Curated label of each node as an index into classNames, or -1 when unlabelled. */
  labels: Int32Array;
  classes: ClassRecord[];
  /** SHA-256 of each file read, keyed by file name, for conflict detection before writing. */
  contentHashes: Record<string, string>;
}

/** A problem found in a dataset, located in its file. line and column are 1-based; 0 = not applicable. */
export interface LocatedProblem {
  file: string;
  line: number;
  column: number;
  message: string;
}

export class DatasetError extends Error {
  constructor(readonly problems: LocatedProblem[]) {
    super(problems.map(formatProblem).join('\n'));
    this.name = 'DatasetError';
  }
}

export function formatProblem(p: LocatedProblem): string {
  return `${p.file}:${p.line}:${p.column}: ${p.message}`;
}
