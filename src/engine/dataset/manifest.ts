// Reading dataset.json: parse with positions, check every key against MANIFEST_SPEC, fill
// defaults. Every problem names dataset.json's line and column of the offending key or value.
import { promises as fs } from 'node:fs';
import { createHash } from 'node:crypto';
import * as path from 'node:path';
import { DatasetError, type DatasetManifest, type LocatedProblem } from './types';
import { parseJsonWithPositions, plainValue, type JsonNode } from './jsonPositions';
import { MANIFEST_SPEC, type FieldSpec, type ObjectSpec } from './manifestSpec';

export const MANIFEST_FILE = 'dataset.json';

export interface ParsedManifest {
  /** null when the manifest has problems. */
  manifest: DatasetManifest | null;
  problems: LocatedProblem[];
  /** Dotted paths of the keys written in the file (e.g. "edgeColumns.time"). */
  explicit: Set<string>;
  /** Where a dotted path's value (or, failing that, its nearest written parent) starts. */
  locate(dottedPath: string): { line: number; column: number };
}

export interface ManifestFile extends ParsedManifest {
  sha256: string;
}

export async function readManifest(folder: string): Promise<ManifestFile> {
  let bytes: Buffer;
  try {
    bytes = await fs.readFile(path.join(folder, MANIFEST_FILE));
  } catch (error) {
    const message =
      (error as NodeJS.ErrnoException).code === 'ENOENT'
        ? `no ${MANIFEST_FILE} in ${folder} (create one with "graph-curator init")`
        : `cannot read ${MANIFEST_FILE}: ${(error as Error).message}`;
    return { ...failed([{ file: MANIFEST_FILE, line: 0, column: 0, message }]), sha256: '' };
  }
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    return { ...failed([{ file: MANIFEST_FILE, line: 1, column: 1, message: 'invalid UTF-8: save dataset.json as UTF-8' }]), sha256 };
  }
  return { ...parseManifest(text), sha256 };
}

function failed(problems: LocatedProblem[]): ParsedManifest {
  return { manifest: null, problems, explicit: new Set(), locate: () => ({ line: 1, column: 1 }) };
}

export function parseManifest(text: string, file = MANIFEST_FILE): ParsedManifest {
  let root: JsonNode;
  try {
    root = parseJsonWithPositions(text, file);
  } catch (error) {
    if (error instanceof DatasetError) return failed(error.problems);
    throw error;
  }
  const problems: LocatedProblem[] = [];
  const explicit = new Set<string>();
  const positions = new Map<string, { line: number; column: number }>();
  checkNode(MANIFEST_SPEC, root, '', { file, problems, explicit, positions });
  const locate = (dottedPath: string): { line: number; column: number } => {
    for (let p = dottedPath; p.length > 0; p = p.includes('.') ? p.slice(0, p.lastIndexOf('.')) : '') {
      const at = positions.get(p);
      if (at) return at;
    }
    return { line: root.line, column: root.column };
  };
  if (problems.length > 0) return { manifest: null, problems, explicit, locate };
  const manifest = withDefaults(plainValue(root) as Record<string, unknown>);
  checkCrossFieldRules(manifest, explicit, locate, file, problems);
  return { manifest: problems.length > 0 ? null : manifest, problems, explicit, locate };
}

interface CheckContext {
  file: string;
  problems: LocatedProblem[];
  explicit: Set<string>;
  positions: Map<string, { line: number; column: number }>;
}

const KIND_NAMES: Record<FieldSpec['type'], string> = {
  string: 'a string',
  boolean: 'true or false',
  integer: 'an integer',
  array: 'an array of strings',
  object: 'an object',
};

function checkNode(spec: FieldSpec, node: JsonNode, dottedPath: string, context: CheckContext): void {
  const problem = (at: { line: number; column: number }, message: string): void => {
    context.problems.push({ file: context.file, line: at.line, column: at.column, message });
  };
  const label = dottedPath === '' ? 'the manifest' : `"${dottedPath}"`;
  if (dottedPath !== '') {
    context.explicit.add(dottedPath);
    context.positions.set(dottedPath, { line: node.line, column: node.column });
  }
  switch (spec.type) {
    case 'object':
      if (node.kind !== 'object') return problem(node, `${label} must be ${KIND_NAMES.object}`);
      return checkObject(spec, node, dottedPath, context, problem);
    case 'string':
      if (node.kind !== 'string') return problem(node, `${label} must be ${KIND_NAMES.string}`);
      if (spec.enum && !spec.enum.includes(node.value))
        return problem(node, `${label} must be one of ${spec.enum.map((v) => `"${v}"`).join(', ')}; found "${node.value}"`);
      if (spec.minLength !== undefined && node.value.length < spec.minLength) return problem(node, `${label} must not be empty`);
      return;
    case 'boolean':
      if (node.kind !== 'boolean') return problem(node, `${label} must be ${KIND_NAMES.boolean}`);
      return;
    case 'integer':
      if (node.kind !== 'number' || !Number.isSafeInteger(node.value)) return problem(node, `${label} must be ${KIND_NAMES.integer}`);
      if (spec.minimum !== undefined && node.value < spec.minimum) return problem(node, `${label} must be at least ${spec.minimum}`);
      return;
    case 'array':
      if (node.kind !== 'array') return problem(node, `${label} must be ${KIND_NAMES.array}`);
      for (const item of node.items) {
        if (item.kind !== 'string') problem(item, `every entry of ${label} must be a string`);
        else if (item.value.length < spec.items.minLength) problem(item, `entries of ${label} must not be empty`);
      }
      return;
  }
}

function checkObject(
  spec: ObjectSpec,
  node: Extract<JsonNode, { kind: 'object' }>,
  dottedPath: string,
  context: CheckContext,
  problem: (at: { line: number; column: number }, message: string) => void,
): void {
  const seen = new Set<string>();
  const allowed = Object.keys(spec.properties);
  for (const entry of node.entries) {
    const childPath = dottedPath === '' ? entry.key : `${dottedPath}.${entry.key}`;
    if (seen.has(entry.key)) {
      problem(entry.keyAt, `duplicate key "${childPath}"`);
      continue;
    }
    seen.add(entry.key);
    const childSpec = Object.hasOwn(spec.properties, entry.key) ? spec.properties[entry.key] : undefined;
    if (!childSpec) {
      problem(entry.keyAt, `unknown key "${childPath}"; expected one of ${allowed.join(', ')}`);
      continue;
    }
    checkNode(childSpec, entry.value, childPath, context);
  }
  for (const key of spec.required ?? []) {
    if (!seen.has(key)) problem(node, `missing required key "${dottedPath === '' ? key : `${dottedPath}.${key}`}"`);
  }
}

/** Fills every default of MANIFEST_SPEC into a value already checked against it. */
export function withDefaults(raw: Record<string, unknown>): DatasetManifest {
  const filled = fill(MANIFEST_SPEC, raw) as Record<string, unknown>;
  delete filled.$schema;
  const manifest = filled as unknown as DatasetManifest;
  if (manifest.features.source === 'npy' && manifest.files.features === undefined) manifest.files.features = 'features.npy';
  return manifest;
}

function fill(spec: FieldSpec, value: unknown): unknown {
  if (spec.type === 'object') {
    const source = (value ?? {}) as Record<string, unknown>;
    const out: Record<string, unknown> = {};
    for (const [key, child] of Object.entries(spec.properties)) {
      const v = fill(child, source[key]);
      if (v !== undefined) out[key] = v;
    }
    return out;
  }
  if (value !== undefined) return Array.isArray(value) ? [...(value as unknown[])] : value;
  return Array.isArray(spec.default) ? [...spec.default] : spec.default;
}

function checkCrossFieldRules(
  manifest: DatasetManifest,
  explicit: Set<string>,
  locate: (p: string) => { line: number; column: number },
  file: string,
  problems: LocatedProblem[],
): void {
  const problem = (dottedPath: string, message: string): void => {
    problems.push({ file, ...locate(dottedPath), message });
  };
  if (explicit.has('files.features') && manifest.features.source !== 'npy') {
    problem('files.features', `"files.features" is only read when "features.source" is "npy" (it is "${manifest.features.source}")`);
  }
  for (const [key, name] of Object.entries(manifest.files)) {
    if (name !== undefined && !isInsideFolder(name))
      problem(`files.${key}`, `"files.${key}" must be a relative path inside the dataset folder; found "${name}"`);
  }
  const where = (primary: string, secondary: string): string =>
    explicit.has(primary) ? primary : explicit.has(secondary) ? secondary : primary;
  if (manifest.features.source === 'tfidf' && manifest.nodeColumns.text.length === 0) {
    problem(
      where('features.source', 'nodeColumns.text'),
      `"features.source" is "tfidf"${explicit.has('features.source') ? '' : ' (the default)'} but "nodeColumns.text" lists no text columns: list text columns, or set "features.source" to "columns" or "npy"`,
    );
  }
  if (manifest.features.source === 'columns' && manifest.nodeColumns.features.length === 0) {
    problem(where('nodeColumns.features', 'features.source'), '"features.source" is "columns" but "nodeColumns.features" lists no columns');
  }
  const { id, text, features } = manifest.nodeColumns;
  for (const name of [...text, ...features]) {
    if (name === id || name === manifest.time.column)
      problem('nodeColumns', `column "${name}" is the id or time column and cannot also be a text or feature column`);
  }
}

function isInsideFolder(name: string): boolean {
  if (path.isAbsolute(name) || path.win32.isAbsolute(name)) return false;
  return !name.split(/[\\/]/).some((part) => part === '..');
}

/** dataset.json text for a manifest: 2-space indent, LF, trailing newline. */
export function formatManifest(manifest: DatasetManifest): string {
  return JSON.stringify(manifest, null, 2) + '\n';
}
