// The label log's record of each apply, as a two-phase batch (docs/decisions-format.md):
//
//   {"batch":B,"phase":"begin",...hashes before/after, class changes...}
//   {"time":...,"node":...,"oldLabel":...,"newLabel":...,"reason":...,"decisionId":...,"batch":B}   (one per changed node)
//   {"batch":B,"phase":"commit",...}      written after labels.csv and classes.json are in place
//   {"batch":B,"phase":"abort",...}       written when the files were left (or put back) as they were
//
// The begin line and the entries are appended (and flushed) before either label file is
// replaced, so a crash can never leave a changed labels.csv that the log does not explain. A
// batch with a begin but no end line is "interrupted"; the before/after hashes in its begin line
// tell exactly which files reached their new state (see recover.ts). The log is append-only.
import type { ClassRecord, LabelLogEntry, LocatedProblem } from '../dataset/types';
import { readTextFile } from '../dataset/smallFiles';

/** sha256 of a label file before and after the batch; null = the file did not exist. */
export interface FileTransition {
  before: string | null;
  after: string;
}

export interface BatchBegin {
  batch: string;
  phase: 'begin';
  time: string;
  dataset: string;
  runId: string | null;
  settingsHash: string | null;
  /** The decisions file name (or "review panel" for decisions handed over in memory). */
  decisionsSource: string;
  /** Number of entry lines that follow. */
  changes: number;
  /** Files this batch replaces, by file name (e.g. "labels.csv", "classes.json"). */
  files: Record<string, FileTransition>;
  /** Classes the batch registers and classes it marks merged: enough to redo classes.json. */
  classesAdded: ClassRecord[];
  classesMerged: { from: string; into: string }[];
  /** Digests of the decisions that had an effect (see decisionDigest), for idempotent re-applies. */
  decisionDigests: string[];
}

export interface BatchEnd {
  batch: string;
  phase: 'commit' | 'abort';
  time: string;
  /** Why a batch was aborted, or how recovery resolved it. */
  reason?: string;
  /** Written by recoverInterruptedApply rather than by the apply itself. */
  recovered?: boolean;
}

export type BatchState = 'committed' | 'aborted' | 'interrupted';

export interface AppliedBatch {
  begin: BatchBegin;
  entries: LabelLogEntry[];
  state: BatchState;
  end: BatchEnd | null;
  /** 1-based line of the begin line in the log. */
  line: number;
}

export interface BatchLogRead {
  batches: AppliedBatch[];
  /** Entries written outside any batch (by other tools, or before batches existed). */
  unbatchedEntries: LabelLogEntry[];
  problems: LocatedProblem[];
  /** Empty string when the log does not exist. */
  sha256: string;
  /** True when the file is non-empty and its last line lacks its line feed (a torn append). */
  endsMidLine: boolean;
}

export function formatBatchBegin(begin: BatchBegin): string {
  const ordered: BatchBegin = {
    batch: begin.batch,
    phase: 'begin',
    time: begin.time,
    dataset: begin.dataset,
    runId: begin.runId,
    settingsHash: begin.settingsHash,
    decisionsSource: begin.decisionsSource,
    changes: begin.changes,
    files: begin.files,
    classesAdded: begin.classesAdded,
    classesMerged: begin.classesMerged,
    decisionDigests: begin.decisionDigests,
  };
  return JSON.stringify(ordered);
}

export function formatBatchEnd(end: BatchEnd): string {
  const ordered: BatchEnd = { batch: end.batch, phase: end.phase, time: end.time };
  if (end.reason !== undefined) ordered.reason = end.reason;
  if (end.recovered) ordered.recovered = true;
  return JSON.stringify(ordered);
}

/** A log entry of a batch: the LabelLogEntry keys in their fixed order, then "batch". */
export function formatBatchedEntry(entry: LabelLogEntry, batch: string): string {
  const ordered: Record<string, unknown> = {
    time: entry.time,
    node: entry.node,
    oldLabel: entry.oldLabel,
    newLabel: entry.newLabel,
    reason: entry.reason,
  };
  if (entry.decisionId !== undefined) ordered.decisionId = entry.decisionId;
  if (entry.runId !== undefined) ordered.runId = entry.runId;
  if (entry.settingsHash !== undefined) ordered.settingsHash = entry.settingsHash;
  ordered.batch = batch;
  return JSON.stringify(ordered);
}

/** Reads label-log.jsonl and groups its lines into batches. A missing log has no batches. */
export async function readBatchLog(filePath: string, file: string): Promise<BatchLogRead> {
  const read = await readTextFile(filePath, file);
  if (read.missing) return { batches: [], unbatchedEntries: [], problems: [], sha256: '', endsMidLine: false };
  if ('problem' in read)
    return { batches: [], unbatchedEntries: [], problems: [read.problem], sha256: read.sha256 ?? '', endsMidLine: false };
  return { ...parseBatchLog(read.text, file), sha256: read.sha256 };
}

export function parseBatchLog(text: string, file: string): Omit<BatchLogRead, 'sha256'> {
  const batches: AppliedBatch[] = [];
  const open = new Map<string, AppliedBatch>();
  const unbatchedEntries: LabelLogEntry[] = [];
  const problems: LocatedProblem[] = [];
  const lines = text.split('\n');
  lines.forEach((raw, k) => {
    const line = raw.endsWith('\r') ? raw.slice(0, -1) : raw;
    if (line.trim() === '') return;
    const at = { file, line: k + 1, column: 1 };
    let value: Record<string, unknown>;
    try {
      const parsed: unknown = JSON.parse(line);
      if (typeof parsed !== 'object' || parsed === null || Array.isArray(parsed)) throw new Error('not an object');
      value = parsed as Record<string, unknown>;
    } catch {
      problems.push({
        ...at,
        message: k === lines.length - 1 ? 'incomplete last line (an append was cut short); it is ignored' : 'not a JSON object',
      });
      return;
    }
    const batchId = typeof value.batch === 'string' ? value.batch : undefined;
    if (batchId !== undefined && value.phase === 'begin') {
      if (open.has(batchId) || batches.some((b) => b.begin.batch === batchId)) {
        problems.push({ ...at, message: `batch "${batchId}" begins twice` });
        return;
      }
      const batch: AppliedBatch = { begin: value as unknown as BatchBegin, entries: [], state: 'interrupted', end: null, line: k + 1 };
      batches.push(batch);
      open.set(batchId, batch);
    } else if (batchId !== undefined && (value.phase === 'commit' || value.phase === 'abort')) {
      const batch = open.get(batchId);
      if (!batch) {
        problems.push({ ...at, message: `"${value.phase}" of batch "${batchId}", which has no open "begin"` });
        return;
      }
      batch.end = value as unknown as BatchEnd;
      batch.state = value.phase === 'commit' ? 'committed' : 'aborted';
      open.delete(batchId);
    } else if (typeof value.node === 'string') {
      const entry = value as unknown as LabelLogEntry;
      if (batchId === undefined) unbatchedEntries.push(entry);
      else {
        const batch = open.get(batchId);
        if (batch) batch.entries.push(entry);
        else problems.push({ ...at, message: `entry of batch "${batchId}", which has no open "begin"` });
      }
    } else {
      problems.push({ ...at, message: 'neither a label change nor a batch line' });
    }
  });
  const endsMidLine = text.length > 0 && !text.endsWith('\n');
  return { batches, unbatchedEntries, problems, endsMidLine };
}

/**
 * The label changes that took effect, sorted by time (stably): entries of committed batches and entries
 * written outside batches. Entries of aborted batches never reached labels.csv; those of an
 * interrupted batch are left out until recovery settles them.
 */
export function effectiveEntries(read: Pick<BatchLogRead, 'batches' | 'unbatchedEntries'>): LabelLogEntry[] {
  const committed = read.batches.filter((b) => b.state === 'committed').flatMap((b) => b.entries);
  return [...read.unbatchedEntries, ...committed].sort((a, b) => (a.time < b.time ? -1 : a.time > b.time ? 1 : 0));
}
