// Builds the throw-away workspace a test run opens: a git repository holding a copy of the demo
// dataset, committed once (label commits in later steps need a repository with a history).
import { execFileSync } from 'node:child_process';
import { cpSync, readFileSync, writeFileSync } from 'node:fs';
import * as path from 'node:path';

export interface TestWorkspace {
  root: string;
  /** The copy of the demo dataset inside the workspace. */
  datasetFolder: string;
}

function git(cwd: string, ...args: string[]): string {
  return execFileSync('git', args, { cwd, encoding: 'utf8', timeout: 30_000, stdio: ['ignore', 'pipe', 'pipe'] });
}

export function createWorkspace(root: string, demoFolder: string): TestWorkspace {
  const datasetFolder = path.join(root, path.basename(demoFolder));
  // The dataset as shipped: runs/ (git-ignored) may hold scoring runs someone made in the
  // checkout, and the scenario expects its own scoring run to be the only one.
  const runsFolder = path.join(demoFolder, 'runs');
  cpSync(demoFolder, datasetFolder, { recursive: true, filter: (source) => source !== runsFolder });
  git(root, 'init', '--quiet', '--initial-branch=main');
  // Local identity: CI machines often have none, and the extension's own commits need one.
  git(root, 'config', 'user.name', 'Graph Curator end-to-end test');
  git(root, 'config', 'user.email', 'e2e@graph-curator.invalid');
  git(root, 'add', '--all');
  git(root, 'commit', '--quiet', '--message', 'Demo dataset as shipped');
  return { root, datasetFolder };
}

/** Where a defect was put: the file (relative to its dataset folder), its 1-based line, the id. */
export interface PlantedDefect {
  file: string;
  line: number;
  id: string;
}

/**
 * Physical lines that the CSV record starting at `start` spans: quoted fields may hold line
 * breaks (RFC 4180), so one record is not always one line.
 */
function recordEnd(text: string, start: number): number {
  let inQuotes = false;
  for (let i = start; i < text.length; i++) {
    const char = text[i];
    if (char === '"') inQuotes = !inQuotes;
    else if (char === '\n' && !inQuotes) return i + 1;
  }
  return text.length;
}

/** Data records (header excluded) in a CSV file, counted with quoted line breaks honoured. */
export function countCsvRecords(csvPath: string): number {
  const text = readFileSync(csvPath, 'utf8');
  let records = 0;
  for (let start = recordEnd(text, 0); start < text.length; start = recordEnd(text, start)) {
    if (text[start] !== '\n' && text[start] !== '\r') records++;
  }
  return records;
}

function countLineBreaks(text: string): number {
  let count = 0;
  for (const char of text) if (char === '\n') count++;
  return count;
}

function manifestIdColumn(datasetFolder: string): string {
  const manifest = JSON.parse(readFileSync(path.join(datasetFolder, 'dataset.json'), 'utf8')) as { nodeColumns?: { id?: string } };
  return manifest.nodeColumns?.id ?? 'id';
}

/**
 * Copies a dataset folder and repeats the first node record of nodes.csv right after itself, so
 * the copy holds one duplicate node id on a known line and is otherwise unchanged.
 */
export function copyWithDuplicateNodeId(datasetFolder: string, copyFolder: string, nodesFile = 'nodes.csv'): PlantedDefect {
  cpSync(datasetFolder, copyFolder, { recursive: true });
  const nodesPath = path.join(copyFolder, nodesFile);
  const text = readFileSync(nodesPath, 'utf8');
  const idColumn = manifestIdColumn(copyFolder);
  const headerFirstField = text
    .slice(0, text.search(/[,\r\n]/))
    .replace(/^\uFEFF/, '')
    .replace(/^"|"$/g, '');
  if (headerFirstField !== idColumn)
    throw new Error(`${nodesPath}: expected the id column "${idColumn}" first, found "${headerFirstField}"`);
  const firstRecordStart = recordEnd(text, 0);
  const firstRecordEnd = recordEnd(text, firstRecordStart);
  const firstRecord = text.slice(firstRecordStart, firstRecordEnd);
  if (!firstRecord.endsWith('\n')) throw new Error(`${nodesPath} has fewer than two records; cannot plant a duplicate id`);
  const id = firstRecord.slice(0, firstRecord.search(/[,\r\n]/)).replace(/^"|"$/g, '');
  if (id === '') throw new Error(`${nodesPath}: the first record has an empty first field`);
  writeFileSync(nodesPath, text.slice(0, firstRecordEnd) + firstRecord + text.slice(firstRecordEnd));
  // The duplicate starts on the line after the header and the original record.
  const line = countLineBreaks(text.slice(0, firstRecordEnd)) + 1;
  return { file: nodesFile, line, id };
}
