// label-log.jsonl: an append-only record of every label change, one JSON object per line.
import * as path from 'node:path';
import type { LabelLogEntry, LocatedProblem } from './types';
import { readTextFile } from './smallFiles';
import { appendLines } from '../io/atomicWrite';

export async function appendLabelLog(filePath: string, entries: readonly LabelLogEntry[]): Promise<void> {
  await appendLines(filePath, entries.map(formatLabelLogEntry));
}

/** One line of the log; keys in a fixed order so lines are comparable. */
export function formatLabelLogEntry(entry: LabelLogEntry): string {
  const ordered: LabelLogEntry = {
    time: entry.time,
    node: entry.node,
    oldLabel: entry.oldLabel,
    newLabel: entry.newLabel,
    reason: entry.reason,
  };
  if (entry.decisionId !== undefined) ordered.decisionId = entry.decisionId;
  if (entry.runId !== undefined) ordered.runId = entry.runId;
  if (entry.settingsHash !== undefined) ordered.settingsHash = entry.settingsHash;
  return JSON.stringify(ordered);
}

export interface LabelLogRead {
  entries: LabelLogEntry[];
  problems: LocatedProblem[];
  sha256: string;
}

/** Reads the log; a missing file is an empty log. A line that is not a log entry is a problem. */
export async function readLabelLog(filePath: string, file: string = path.basename(filePath)): Promise<LabelLogRead> {
  const read = await readTextFile(filePath, file);
  if (read.missing) return { entries: [], problems: [], sha256: '' };
  if ('problem' in read) return { entries: [], problems: [read.problem], sha256: read.sha256 ?? '' };
  const { entries, problems } = parseLabelLog(read.text, file);
  return { entries, problems, sha256: read.sha256 };
}

export function parseLabelLog(text: string, file: string): { entries: LabelLogEntry[]; problems: LocatedProblem[] } {
  const entries: LabelLogEntry[] = [];
  const problems: LocatedProblem[] = [];
  const lines = text.split('\n');
  lines.forEach((raw, k) => {
    const line = raw.endsWith('\r') ? raw.slice(0, -1) : raw;
    if (line.trim() === '') return;
    let value: unknown;
    try {
      value = JSON.parse(line);
    } catch {
      problems.push({ file, line: k + 1, column: 1, message: 'not a JSON object (each line of the log is one JSON object)' });
      return;
    }
    if (isBatchMarker(value)) return;
    const why = labelLogEntryProblem(value);
    if (why) problems.push({ file, line: k + 1, column: 1, message: why });
    else entries.push(value as LabelLogEntry);
  });
  return { entries, problems };
}

/**
 * Lines `{"batch": id, "phase": "begin" | "commit" | "abort", ...}` bracket the entries written by
 * one apply (see src/engine/decisions/batchLog.ts); they are not label changes.
 */
export function isBatchMarker(value: unknown): boolean {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return false;
  const v = value as Record<string, unknown>;
  return typeof v.batch === 'string' && typeof v.phase === 'string' && v.node === undefined;
}

function labelLogEntryProblem(value: unknown): string | null {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return 'not a JSON object';
  const v = value as Record<string, unknown>;
  for (const key of ['time', 'node', 'reason']) if (typeof v[key] !== 'string') return `"${key}" must be a string`;
  for (const key of ['oldLabel', 'newLabel']) if (v[key] !== null && typeof v[key] !== 'string') return `"${key}" must be a string or null`;
  for (const key of ['decisionId', 'runId', 'settingsHash'])
    if (v[key] !== undefined && typeof v[key] !== 'string') return `"${key}" must be a string when present`;
  return null;
}
