// The one description of dataset.json's fields. The code validator (manifest.ts) walks it and
// schemas/dataset.schema.json is generated from it (manifestJsonSchema), so the two cannot
// drift; test/dataset/manifestSchema.test.ts checks the shipped schema file against it.
import { SLICE_GRANULARITIES } from './timeSlices';
import { DEFAULT_VOCABULARY_SIZE } from './tfidf';

export type FieldSpec =
  | { type: 'string'; description: string; default?: string; enum?: readonly string[]; minLength?: number }
  | { type: 'boolean'; description: string; default: boolean }
  | { type: 'integer'; description: string; default: number; minimum?: number }
  | { type: 'array'; description: string; default: string[]; items: { type: 'string'; minLength: number } }
  | ObjectSpec;

export interface ObjectSpec {
  type: 'object';
  description: string;
  properties: Record<string, FieldSpec>;
  required?: readonly string[];
}

const column = (description: string, defaultName?: string): FieldSpec =>
  defaultName === undefined
    ? { type: 'string', description, minLength: 1 }
    : { type: 'string', description, default: defaultName, minLength: 1 };

const fileName = (description: string, defaultName?: string): FieldSpec =>
  column(`${description} A path relative to the dataset folder, inside it.`, defaultName);

export const MANIFEST_SPEC: ObjectSpec = {
  type: 'object',
  description: 'An evolving graph dataset for Graph Curator: node, edge and label files plus how to read them.',
  required: ['name'],
  properties: {
    $schema: { type: 'string', description: 'Optional link to this schema (ignored by Graph Curator).' },
    name: { type: 'string', description: 'Short name of the dataset.', minLength: 1 },
    description: { type: 'string', description: 'What the graph is and what its labels mean.', default: '' },
    directed: {
      type: 'boolean',
      description: 'Whether edges have a direction. Undirected graphs pass messages both ways.',
      default: false,
    },
    time: {
      type: 'object',
      description: 'How nodes are grouped into time slices.',
      properties: {
        column: column(
          'Column of the nodes file holding an ISO-8601 date (YYYY, YYYY-MM, YYYY-MM-DD or a date-time) or an integer step.',
          'time',
        ),
        granularity: {
          type: 'string',
          description:
            'Size of a time slice. Keys: year "2021", quarter "2021-Q3", month "2021-07", week (ISO) "2021-W05", day "2021-07-14", step: the integer.',
          default: 'quarter',
          enum: SLICE_GRANULARITIES,
        },
      },
    },
    files: {
      type: 'object',
      description: 'File names inside the dataset folder.',
      properties: {
        nodes: fileName('Nodes CSV: header row, one row per node.', 'nodes.csv'),
        edges: fileName('Edges CSV: source, target, optional time and weight.', 'edges.csv'),
        labels: fileName('Curated labels CSV (id,label), written sorted by id.', 'labels.csv'),
        classes: fileName('Class list (JSON).', 'classes.json'),
        log: fileName('Append-only label change log (JSON lines).', 'label-log.jsonl'),
        features: fileName(
          'NumPy .npy feature matrix (float32 or float64, one row per node in nodes-file order); used when features.source is "npy" (default "features.npy" then).',
        ),
      },
    },
    nodeColumns: {
      type: 'object',
      description: 'Columns of the nodes file.',
      properties: {
        id: column('Unique node id column.', 'id'),
        text: {
          type: 'array',
          description: 'Free-text columns shown to curators and used for TF-IDF features.',
          default: [],
          items: { type: 'string', minLength: 1 },
        },
        features: {
          type: 'array',
          description: 'Numeric feature columns (used when features.source is "columns").',
          default: [],
          items: { type: 'string', minLength: 1 },
        },
      },
    },
    edgeColumns: {
      type: 'object',
      description: 'Columns of the edges file.',
      properties: {
        source: column('Source node id column.', 'source'),
        target: column('Target node id column.', 'target'),
        time: column('Optional time column; without it an edge belongs to the slice of its later endpoint.', 'time'),
        weight: column('Optional numeric weight column (all weights 1 without it).'),
      },
    },
    features: {
      type: 'object',
      description: 'Where node features come from.',
      properties: {
        source: {
          type: 'string',
          description: 'npy: files.features; columns: nodeColumns.features; tfidf: TF-IDF of nodeColumns.text.',
          default: 'tfidf',
          enum: ['npy', 'columns', 'tfidf'],
        },
        vocabularySize: {
          type: 'integer',
          description: 'TF-IDF vocabulary cap: the terms found in most nodes are kept.',
          default: DEFAULT_VOCABULARY_SIZE,
          minimum: 1,
        },
      },
    },
    seed: { type: 'integer', description: 'Seed for every random choice, so runs are reproducible.', default: 7 },
  },
};

/** JSON Schema (draft-07) for dataset.json, as shipped in schemas/dataset.schema.json. */
export function manifestJsonSchema(): Record<string, unknown> {
  return {
    $schema: 'http://json-schema.org/draft-07/schema#',
    title: 'Graph Curator dataset manifest (dataset.json)',
    ...schemaOf(MANIFEST_SPEC),
  };
}

function schemaOf(spec: FieldSpec): Record<string, unknown> {
  if (spec.type === 'object') {
    const properties: Record<string, unknown> = {};
    for (const [key, child] of Object.entries(spec.properties)) properties[key] = schemaOf(child);
    return {
      type: 'object',
      description: spec.description,
      ...(spec.required ? { required: [...spec.required] } : {}),
      properties,
      additionalProperties: false,
    };
  }
  const { type, description, ...rest } = spec;
  const out: Record<string, unknown> = { type, description };
  for (const [key, value] of Object.entries(rest)) out[key] = Array.isArray(value) ? [...(value as unknown[])] : value;
  return out;
}
