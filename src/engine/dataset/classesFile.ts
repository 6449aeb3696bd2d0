// classes.json: { "classes": [ { name, description, introducedIn, status, mergedInto? } ] }.
// Order matters: it fixes the class indices (Dataset.classNames starts with this order).
import * as path from 'node:path';
import type { ClassRecord, ClassStatus, LocatedProblem } from './types';
import { parseJsonWithPositions, type JsonNode } from './jsonPositions';
import { DatasetError } from './types';
import { readTextFile } from './smallFiles';
import { writeFileAtomic, type AtomicWriteHooks } from '../io/atomicWrite';

const STATUSES: readonly ClassStatus[] = ['active', 'merged', 'retired'];
const CLASS_KEYS = ['name', 'description', 'introducedIn', 'status', 'mergedInto'];

export interface ClassesRead {
  classes: ClassRecord[];
  problems: LocatedProblem[];
  /** Empty when the file does not exist. */
  sha256: string;
  missing: boolean;
}

/** Reads classes.json; a missing file is an empty class list. */
export async function readClassesJson(filePath: string, file: string = path.basename(filePath)): Promise<ClassesRead> {
  const read = await readTextFile(filePath, file);
  if (read.missing) return { classes: [], problems: [], sha256: '', missing: true };
  if ('problem' in read) return { classes: [], problems: [read.problem], sha256: read.sha256 ?? '', missing: false };
  return { ...parseClassesJson(read.text, file), sha256: read.sha256, missing: false };
}

export function parseClassesJson(text: string, file: string): { classes: ClassRecord[]; problems: LocatedProblem[] } {
  let root: JsonNode;
  try {
    root = parseJsonWithPositions(text, file);
  } catch (error) {
    if (error instanceof DatasetError) return { classes: [], problems: error.problems };
    throw error;
  }
  const problems: LocatedProblem[] = [];
  const problem = (at: { line: number; column: number }, message: string): void => {
    problems.push({ file, line: at.line, column: at.column, message });
  };
  if (root.kind !== 'object') {
    problem(root, 'classes.json must be an object: { "classes": [ ... ] }');
    return { classes: [], problems };
  }
  const list = root.entries.find((e) => e.key === 'classes');
  for (const e of root.entries) if (e.key !== 'classes') problem(e.keyAt, `unknown key "${e.key}"; expected "classes"`);
  if (!list) {
    problem(root, 'missing key "classes"');
    return { classes: [], problems };
  }
  if (list.value.kind !== 'array') {
    problem(list.value, '"classes" must be an array');
    return { classes: [], problems };
  }
  const classes: ClassRecord[] = [];
  const names = new Set<string>();
  const mergeTargets: { at: JsonNode; target: string }[] = [];
  for (const item of list.value.items) {
    if (item.kind !== 'object') {
      problem(item, 'each class must be an object with at least a "name"');
      continue;
    }
    const fields = new Map(item.entries.map((e) => [e.key, e]));
    for (const e of item.entries)
      if (!CLASS_KEYS.includes(e.key)) problem(e.keyAt, `unknown key "${e.key}"; expected one of ${CLASS_KEYS.join(', ')}`);
    const stringField = (key: string, required: boolean): string | undefined => {
      const entry = fields.get(key);
      if (!entry) {
        if (required) problem(item, `class without "${key}"`);
        return undefined;
      }
      if (entry.value.kind !== 'string') {
        problem(entry.value, `"${key}" must be a string`);
        return undefined;
      }
      return entry.value.value;
    };
    const name = stringField('name', true);
    const description = stringField('description', false) ?? '';
    const introducedIn = stringField('introducedIn', false) ?? '';
    const status = (stringField('status', false) ?? 'active') as ClassStatus;
    const mergedInto = stringField('mergedInto', false);
    if (name === undefined) continue;
    const nameAt = fields.get('name')!.value;
    if (name.trim() === '') {
      problem(nameAt, 'class name must not be empty');
      continue;
    }
    if (names.has(name)) {
      problem(nameAt, `duplicate class "${name}"`);
      continue;
    }
    if (!STATUSES.includes(status))
      problem(fields.get('status')!.value, `"status" must be one of ${STATUSES.map((s) => `"${s}"`).join(', ')}; found "${status}"`);
    if (status === 'merged' && mergedInto === undefined)
      problem(fields.get('status')!.value, `class "${name}" is merged but has no "mergedInto"`);
    if (mergedInto !== undefined) mergeTargets.push({ at: fields.get('mergedInto')!.value, target: mergedInto });
    names.add(name);
    classes.push(
      mergedInto === undefined ? { name, description, introducedIn, status } : { name, description, introducedIn, status, mergedInto },
    );
  }
  for (const { at, target } of mergeTargets) if (!names.has(target)) problem(at, `"mergedInto" names an unknown class "${target}"`);
  return { classes, problems };
}

export function formatClassesJson(classes: readonly ClassRecord[]): string {
  const ordered = classes.map((c) => {
    const record: ClassRecord = { name: c.name, description: c.description, introducedIn: c.introducedIn, status: c.status };
    if (c.mergedInto !== undefined) record.mergedInto = c.mergedInto;
    return record;
  });
  return JSON.stringify({ classes: ordered }, null, 2) + '\n';
}

export async function writeClassesJson(filePath: string, classes: readonly ClassRecord[], hooks?: AtomicWriteHooks): Promise<void> {
  await writeFileAtomic(filePath, formatClassesJson(classes), hooks);
}
