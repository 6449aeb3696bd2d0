// Settling applies that were interrupted (a begin line in the log but no commit or abort). The
// begin line holds each replaced file's sha256 before and after, so the state of every file is
// known exactly:
//   all files new          → the apply had finished writing: append "commit";
//   all files old          → nothing was replaced: append "abort" (the entries never took effect);
//   some old, some new     → finish the apply: rebuild the old ones from the log (entries, class
//                            changes), check they hash to the recorded "after", write, "commit";
//   a file matching neither → someone else changed it: report it and change nothing (or, when
//                            asked, close the batch as abandoned).
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import type { ClassRecord } from '../dataset/types';
import { formatLabelsCsv, readLabelsCsv } from '../dataset/labelsFile';
import { formatClassesJson, parseClassesJson } from '../dataset/classesFile';
import { appendLines, writeFileAtomic } from '../io/atomicWrite';
import { formatBatchEnd, readBatchLog, type AppliedBatch, type BatchLogRead } from './batchLog';
import { fileHash, labelFileNamesOf, sha256OfText, type LabelFileNames } from './labelFiles';

export type FileState = 'old' | 'new' | 'other';

export type RecoveryOutcome =
  /** Every file had its new content: the batch is committed. */
  | 'had-been-applied'
  /** No file had been replaced: the batch is aborted; its log entries never took effect. */
  | 'had-not-been-applied'
  /** Some files were replaced: the rest were brought to their new content and the batch committed. */
  | 'completed'
  /** A file matches neither its old nor its new content: left as it is. */
  | 'unresolved'
  /** As unresolved, but closed as aborted because the caller asked to abandon it. */
  | 'abandoned';

export interface BatchRecovery {
  batch: string;
  /** 1-based line of the batch's begin line in the log. */
  line: number;
  /** State of each file the batch replaces, by file name, when recovery started. */
  files: Record<string, FileState>;
  outcome: RecoveryOutcome;
  message: string;
}

export interface RecoveryReport {
  batches: BatchRecovery[];
  /** Temporary files of interrupted atomic writes that were removed. */
  removedTemporaryFiles: string[];
}

export interface RecoveryOptions {
  /** Only report what would be done. */
  dryRun?: boolean;
  /** Close unresolved batches as aborted (their entries then count as never applied). */
  abandonUnresolved?: boolean;
  now?: Date;
}

/** The batches recorded in a dataset's label log (committed, aborted, interrupted). */
export async function readAppliedBatches(folder: string): Promise<BatchLogRead> {
  const { names, paths } = await labelFileNamesOf(folder);
  return readBatchLog(paths.log, names.log);
}

export async function recoverInterruptedApply(folder: string, options: RecoveryOptions = {}): Promise<RecoveryReport> {
  const { names, paths } = await labelFileNamesOf(folder);
  const log = await readBatchLog(paths.log, names.log);
  const report: RecoveryReport = { batches: [], removedTemporaryFiles: [] };
  const root = path.resolve(folder);
  const pathOf = (name: string): string => path.join(root, name);
  for (const batch of log.batches.filter((b) => b.state === 'interrupted')) {
    const files: Record<string, FileState> = {};
    for (const [name, transition] of Object.entries(batch.begin.files ?? {})) {
      const found = await fileHash(pathOf(name));
      files[name] = found === transition.after ? 'new' : found === transition.before ? 'old' : 'other';
    }
    const states = Object.values(files);
    const base = { batch: batch.begin.batch, line: batch.line, files };
    const close = async (phase: 'commit' | 'abort', reason: string): Promise<void> => {
      if (!options.dryRun)
        await appendLines(paths.log, [
          formatBatchEnd({ batch: batch.begin.batch, phase, time: (options.now ?? new Date()).toISOString(), reason, recovered: true }),
        ]);
    };
    const list = (state: FileState): string =>
      Object.keys(files)
        .filter((n) => files[n] === state)
        .join(', ');

    if (states.includes('other')) {
      const message = `${list('other')} matches neither its content before nor after batch ${batch.begin.batch} (changed by someone else)`;
      if (options.abandonUnresolved) {
        await close('abort', `abandoned: ${message}`);
        report.batches.push({ ...base, outcome: 'abandoned', message: `${message}; closed as abandoned` });
      } else report.batches.push({ ...base, outcome: 'unresolved', message: `${message}; nothing changed` });
      continue;
    }
    if (states.every((s) => s === 'new')) {
      await close('commit', 'recovered: every file had reached its new content');
      report.batches.push({
        ...base,
        outcome: 'had-been-applied',
        message: `batch ${batch.begin.batch} had been written completely; marked committed`,
      });
      continue;
    }
    if (states.every((s) => s === 'old')) {
      await close('abort', 'recovered: no file had been replaced');
      report.batches.push({
        ...base,
        outcome: 'had-not-been-applied',
        message: `batch ${batch.begin.batch} had replaced no file; marked aborted (its ${batch.entries.length} log entries never took effect)`,
      });
      continue;
    }
    const rebuilt = new Map<string, string>();
    let failure: string | null = null;
    for (const name of Object.keys(files).filter((n) => files[n] === 'old')) {
      const text = await rebuildNewContent(batch, name, names, pathOf(name));
      if (text === null || sha256OfText(text) !== batch.begin.files[name].after) {
        failure = `${name} could not be rebuilt to its recorded new content`;
        break;
      }
      rebuilt.set(name, text);
    }
    if (failure) {
      report.batches.push({ ...base, outcome: 'unresolved', message: `${failure}; nothing changed` });
      continue;
    }
    if (!options.dryRun) for (const [name, text] of rebuilt) await writeFileAtomic(pathOf(name), text);
    await close('commit', `recovered: completed ${[...rebuilt.keys()].join(', ')}`);
    report.batches.push({
      ...base,
      outcome: 'completed',
      message: `batch ${batch.begin.batch} had replaced ${list('new')}; wrote ${[...rebuilt.keys()].join(', ')} and marked it committed`,
    });
  }
  if (!options.dryRun) report.removedTemporaryFiles = await removeTemporaryFiles([paths.labels, paths.classes]);
  return report;
}

/** The content a batch gives a file, rebuilt from the file's old content and the log. */
async function rebuildNewContent(batch: AppliedBatch, name: string, names: LabelFileNames, filePath: string): Promise<string | null> {
  if (name === names.labels) {
    const labels = new Map<string, string>();
    if (batch.begin.files[name].before !== null) {
      const read = await readLabelsCsv(filePath, name);
      if (read.problems.length > 0) return null;
      for (const [id, label] of read.labels) labels.set(id, label);
    }
    for (const entry of batch.entries) {
      if (entry.newLabel === null) labels.delete(entry.node);
      else labels.set(entry.node, entry.newLabel);
    }
    return formatLabelsCsv(labels);
  }
  if (name === names.classes) {
    let classes: ClassRecord[] = [];
    if (batch.begin.files[name].before !== null) {
      const parsed = parseClassesJson(await fs.readFile(filePath, 'utf8'), name);
      if (parsed.problems.length > 0) return null;
      classes = parsed.classes;
    }
    classes.push(...(batch.begin.classesAdded ?? []));
    for (const { from, into } of batch.begin.classesMerged ?? []) {
      const record = classes.find((c) => c.name === from);
      if (record) {
        record.status = 'merged';
        record.mergedInto = into;
      }
    }
    return formatClassesJson(classes);
  }
  return null;
}

/** Removes ".labels.csv.<hex>.tmp"-style files left by an atomic write that never renamed. */
async function removeTemporaryFiles(targets: string[]): Promise<string[]> {
  const removed: string[] = [];
  for (const target of targets) {
    const folder = path.dirname(target);
    const prefix = `.${path.basename(target)}.`;
    for (const name of await fs.readdir(folder).catch(() => [] as string[])) {
      if (!name.startsWith(prefix) || !/^[0-9a-f]{12}\.tmp$/.test(name.slice(prefix.length))) continue;
      await fs.rm(path.join(folder, name), { force: true });
      removed.push(name);
    }
  }
  return removed;
}
