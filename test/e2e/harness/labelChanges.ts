// On-disk checks after an apply: which labels.csv lines changed, what the label log gained, what
// git committed. Read straight from the files, independently of the engine's own readers.
import { execFileSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import * as path from 'node:path';

export interface LabelFilesSnapshot {
  labelLines: string[];
  logText: string;
  classesText: string;
}

export function snapshotLabelFiles(datasetFolder: string): LabelFilesSnapshot {
  const read = (file: string) => (existsSync(path.join(datasetFolder, file)) ? readFileSync(path.join(datasetFolder, file), 'utf8') : '');
  return {
    labelLines: read('labels.csv')
      .split('\n')
      .filter((line) => line !== ''),
    logText: read('label-log.jsonl'),
    classesText: read('classes.json'),
  };
}

/** The node ids whose labels.csv line was added or removed (the id is the first field). */
export function changedLabelIds(before: string[], after: string[]): { ids: Set<string>; removed: string[]; added: string[] } {
  const beforeSet = new Set(before);
  const afterSet = new Set(after);
  const removed = before.filter((line) => !afterSet.has(line));
  const added = after.filter((line) => !beforeSet.has(line));
  const idOf = (line: string) => line.slice(0, line.indexOf(',')).replace(/^"|"$/g, '');
  return { ids: new Set([...removed, ...added].map(idOf)), removed, added };
}

/** Labels by node id from labels.csv lines (header skipped). */
export function labelsById(lines: string[]): Map<string, string> {
  const labels = new Map<string, string>();
  for (const line of lines.slice(1)) {
    const comma = line.indexOf(',');
    labels.set(line.slice(0, comma), line.slice(comma + 1));
  }
  return labels;
}

export interface LogGrowth {
  nodeLines: { node: string; oldLabel?: string | null; newLabel: string | null; reason?: string; decisionId?: string; batch?: string }[];
  markerLines: { batch: string; phase: string }[];
}

/** Lines appended to the label log; fails when earlier lines were rewritten. */
export function logGrowth(before: string, after: string): LogGrowth {
  if (!after.startsWith(before)) throw new Error('label-log.jsonl was rewritten, not appended to');
  const growth: LogGrowth = { nodeLines: [], markerLines: [] };
  after
    .slice(before.length)
    .split('\n')
    .filter((line) => line.trim() !== '')
    .forEach((line, index) => {
      const entry = JSON.parse(line) as Record<string, unknown>;
      if (typeof entry.node === 'string') growth.nodeLines.push(entry as unknown as LogGrowth['nodeLines'][number]);
      else if (typeof entry.batch === 'string' && typeof entry.phase === 'string')
        growth.markerLines.push({ batch: entry.batch, phase: entry.phase });
      else throw new Error(`appended label-log.jsonl line ${index + 1} is neither a node change nor a batch marker: ${line}`);
    });
  return growth;
}

/** The members of each candidate of the only run in runs/ (its candidates.json). */
export function runCandidates(datasetFolder: string): { runId: string; members: Map<string, string[]> } {
  const runsDir = path.join(datasetFolder, 'runs');
  const runIds = readdirSync(runsDir, { withFileTypes: true })
    .filter((entry) => entry.isDirectory() && existsSync(path.join(runsDir, entry.name, 'run.json')))
    .map((entry) => entry.name);
  if (runIds.length !== 1) throw new Error(`expected one run in ${runsDir}, found ${runIds.length}: ${runIds.join(', ')}`);
  const file = JSON.parse(readFileSync(path.join(runsDir, runIds[0], 'candidates.json'), 'utf8')) as {
    candidates: { id: string; members: string[] }[];
  };
  return { runId: runIds[0], members: new Map(file.candidates.map((c) => [c.id, c.members])) };
}

export function git(cwd: string, ...args: string[]): string {
  return execFileSync('git', args, { cwd, encoding: 'utf8', timeout: 30_000, stdio: ['ignore', 'pipe', 'pipe'] }).trim();
}
