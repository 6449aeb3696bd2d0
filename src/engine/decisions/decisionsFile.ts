// Reading a decisions file (the JSON the review panel exports) and checking its shape. Every
// problem names the file, line and column of the offending value, and the decision's index and
// id, so a hand-edited file can be fixed from the message alone. The same checks run on a
// decisions object handed over in memory (from the review panel), without positions then.
import { promises as fs } from 'node:fs';
import type { LocatedProblem } from '../dataset/types';
import { DatasetError } from '../dataset/types';
import { parseJsonWithPositions, plainValue, type JsonNode } from '../dataset/jsonPositions';
import type { Decision, DecisionKind, DecisionsFile } from './types';

export const DECISIONS_FORMAT = 'graph-curator-decisions';
export const DECISIONS_VERSION = 1;

/** Path inside the decisions JSON, e.g. ['decisions', 3, 'members', 12]. */
export type JsonPath = readonly (string | number)[];

/** Maps a JSON path to where its value starts in the file; unknown paths give the nearest parent. */
export type DecisionLocator = (jsonPath: JsonPath) => { line: number; column: number };

/** Where nothing is known about positions (decisions handed over in memory). */
export const NO_POSITIONS: DecisionLocator = () => ({ line: 0, column: 0 });

export interface DecisionsRead {
  /** null when the file has problems. */
  decisions: DecisionsFile | null;
  problems: LocatedProblem[];
  /** The name used in problems (the path as given). */
  file: string;
  locate: DecisionLocator;
}

/** Thrown for a decisions file that cannot be applied; a DatasetError, so hosts show it the same way. */
export class InvalidDecisionsError extends DatasetError {
  constructor(problems: LocatedProblem[]) {
    super(problems);
    this.name = 'InvalidDecisionsError';
  }
}

export async function readDecisionsFile(filePath: string, file: string = filePath): Promise<DecisionsRead> {
  let text: string;
  try {
    const bytes = await fs.readFile(filePath);
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const message =
      code === 'ENOENT'
        ? 'decisions file not found'
        : error instanceof TypeError
          ? 'invalid UTF-8: save the decisions file as UTF-8'
          : `cannot read the decisions file: ${(error as Error).message}`;
    return {
      decisions: null,
      problems: [{ file, line: code === 'ENOENT' ? 0 : 1, column: code === 'ENOENT' ? 0 : 1, message }],
      file,
      locate: NO_POSITIONS,
    };
  }
  return parseDecisionsText(text, file);
}

export function parseDecisionsText(text: string, file: string = 'decisions.json'): DecisionsRead {
  let root: JsonNode;
  try {
    root = parseJsonWithPositions(text, file);
  } catch (error) {
    if (error instanceof DatasetError) return { decisions: null, problems: error.problems, file, locate: NO_POSITIONS };
    throw error;
  }
  const locate = locatorOf(root);
  const value = plainValue(root);
  const problems = decisionsShapeProblems(value, file, locate);
  return { decisions: problems.length === 0 ? (value as DecisionsFile) : null, problems, file, locate };
}

function locatorOf(root: JsonNode): DecisionLocator {
  return (jsonPath) => {
    let node = root;
    for (const step of jsonPath) {
      let next: JsonNode | undefined;
      if (typeof step === 'number' && node.kind === 'array') next = node.items[step];
      // The last entry with a key wins, as with JSON.parse.
      else if (typeof step === 'string' && node.kind === 'object') next = [...node.entries].reverse().find((e) => e.key === step)?.value;
      if (!next) break;
      node = next;
    }
    return { line: node.line, column: node.column };
  };
}

/** "decision #4 (d-0004, merge-into-class)": indices are 1-based in messages, as in editors. */
export function describeDecision(index: number, decision: { id?: unknown; kind?: unknown }): string {
  const parts = [typeof decision.id === 'string' ? decision.id : null, typeof decision.kind === 'string' ? decision.kind : null].filter(
    (p) => p !== null,
  );
  return `decision #${index + 1}${parts.length ? ` (${parts.join(', ')})` : ''}`;
}

type Check = (value: unknown) => string | null;

const text: Check = (v) => (typeof v === 'string' ? null : 'must be a string');
const name: Check = (v) => (typeof v === 'string' && v.trim() !== '' ? null : 'must be a non-empty string');
const textOrNull: Check = (v) => (v === null || typeof v === 'string' ? null : 'must be a string or null');
const isoTime: Check = (v) => (typeof v === 'string' && !Number.isNaN(Date.parse(v)) ? null : 'must be an ISO-8601 time');

function nameList(minimum: number): Check {
  return (v) =>
    Array.isArray(v) && v.length >= minimum
      ? null
      : `must be an array of at least ${minimum} node or candidate id${minimum === 1 ? '' : 's'}`;
}

/** Required fields of each kind beyond id, kind, madeAt, note; arrays are checked item by item. */
const KIND_FIELDS: { [K in DecisionKind]: Record<string, { check: Check; optional?: boolean; items?: 'name' | 'nameList' }> } = {
  'name-new-class': {
    candidateId: { check: name },
    members: { check: nameList(1), items: 'name' },
    className: { check: name },
    description: { check: text },
  },
  'merge-into-class': { candidateId: { check: name }, members: { check: nameList(1), items: 'name' }, className: { check: name } },
  'move-members': {
    members: { check: nameList(1), items: 'name' },
    className: { check: name },
    description: { check: text, optional: true },
  },
  'merge-classes': { from: { check: name }, into: { check: name } },
  'merge-candidates': { candidateIds: { check: nameList(2), items: 'name' }, resultId: { check: name } },
  'split-candidate': { candidateId: { check: name }, parts: { check: nameList(2), items: 'nameList' } },
  dismiss: { candidateId: { check: name } },
  skip: { candidateId: { check: name } },
  'keep-label': { node: { check: name } },
};

export const DECISION_KINDS = Object.keys(KIND_FIELDS) as DecisionKind[];

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** Every shape problem of a decisions file value (empty when it is a well-formed DecisionsFile). */
export function decisionsShapeProblems(value: unknown, file: string, locate: DecisionLocator = NO_POSITIONS): LocatedProblem[] {
  const problems: LocatedProblem[] = [];
  const problem = (at: JsonPath, message: string): void => {
    problems.push({ file, ...locate(at), message });
  };
  if (!isRecord(value)) {
    problem([], `a decisions file must be a JSON object with "format": "${DECISIONS_FORMAT}"`);
    return problems;
  }
  if (value.format !== DECISIONS_FORMAT) problem(['format'], `"format" must be "${DECISIONS_FORMAT}"`);
  if (value.version !== DECISIONS_VERSION)
    problem(['version'], `"version" must be ${DECISIONS_VERSION} (this tool reads version ${DECISIONS_VERSION})`);
  const top: [string, Check][] = [
    ['dataset', name],
    ['runId', textOrNull],
    ['settingsHash', textOrNull],
    ['slice', name],
  ];
  for (const [key, check] of top) {
    const why = key in value ? check(value[key]) : 'is missing';
    if (why) problem(key in value ? [key] : [], `"${key}" ${why}`);
  }
  if (!isRecord(value.baseHashes))
    problem(['baseHashes'], '"baseHashes" must be an object of sha256 hex strings by file name (may be empty)');
  else
    for (const [key, hash] of Object.entries(value.baseHashes))
      if (typeof hash !== 'string' || !/^[0-9a-f]{64}$/.test(hash))
        problem(['baseHashes', key], `"baseHashes.${key}" must be a sha256 hex string`);
  if (!Array.isArray(value.decisions)) {
    problem(['decisions'], '"decisions" must be an array');
    return problems;
  }
  value.decisions.forEach((decision, index) => decisionShapeProblems(decision, index, problem));
  return problems;
}

function decisionShapeProblems(decision: unknown, index: number, problem: (at: JsonPath, message: string) => void): void {
  const at = (...rest: (string | number)[]): JsonPath => ['decisions', index, ...rest];
  if (!isRecord(decision)) {
    problem(at(), `decision #${index + 1} must be an object`);
    return;
  }
  const who = describeDecision(index, decision);
  if (name(decision.id)) problem(at('id'), `${who}: "id" must be a non-empty string`);
  if (isoTime(decision.madeAt)) problem('madeAt' in decision ? at('madeAt') : at(), `${who}: "madeAt" must be an ISO-8601 time`);
  if (decision.note !== undefined && typeof decision.note !== 'string') problem(at('note'), `${who}: "note" must be a string`);
  const kind = decision.kind;
  if (typeof kind !== 'string' || !Object.hasOwn(KIND_FIELDS, kind)) {
    problem('kind' in decision ? at('kind') : at(), `${who}: "kind" must be one of ${DECISION_KINDS.map((k) => `"${k}"`).join(', ')}`);
    return;
  }
  for (const [key, field] of Object.entries(KIND_FIELDS[kind as DecisionKind])) {
    if (!(key in decision)) {
      if (!field.optional) problem(at(), `${who}: missing "${key}"`);
      continue;
    }
    const why = field.check(decision[key]);
    if (why) {
      problem(at(key), `${who}: "${key}" ${why}`);
      continue;
    }
    if (field.items === 'name') {
      (decision[key] as unknown[]).forEach((item, k) => {
        if (name(item)) problem(at(key, k), `${who}: "${key}"[${k}] must be a non-empty string`);
      });
    } else if (field.items === 'nameList') {
      (decision[key] as unknown[]).forEach((part, k) => {
        if (!Array.isArray(part) || part.length === 0) problem(at(key, k), `${who}: "${key}"[${k}] must be a non-empty array of node ids`);
        else part.forEach((item, j) => name(item) && problem(at(key, k, j), `${who}: "${key}"[${k}][${j}] must be a non-empty string`));
      });
    }
  }
}

/** The decision's kind-specific node references, with their JSON paths (for "unknown node" checks). */
export function nodeReferences(decision: Decision): { node: string; at: JsonPath }[] {
  switch (decision.kind) {
    case 'name-new-class':
    case 'merge-into-class':
    case 'move-members':
      return decision.members.map((node, k) => ({ node, at: ['members', k] }));
    case 'split-candidate':
      return decision.parts.flatMap((part, k) => part.map((node, j) => ({ node, at: ['parts', k, j] })));
    case 'keep-label':
      return [{ node: decision.node, at: ['node'] }];
    default:
      return [];
  }
}
