// applyPlan: writes what planApply computed, so that a crash at any point leaves every file in its
// old or its new state and the log says which decisions took effect (see batchLog.ts):
//   1. check that no label file changed since the run and since the plan (else write nothing);
//   2. append the batch's begin line and one entry per changed node, flushed;
//   3. replace labels.csv, then classes.json (temporary file + rename, each checked once more
//      just before its rename);
//   4. append the commit line.
// A crash between 2 and 4 leaves an "interrupted" batch that recoverInterruptedApply settles.
import { promises as fs } from 'node:fs';
import { randomBytes } from 'node:crypto';
import type { LabelLogEntry } from '../dataset/types';
import { appendLines, writeFileAtomic } from '../io/atomicWrite';
import { formatBatchBegin, formatBatchedEntry, formatBatchEnd, type BatchBegin, type FileTransition } from './batchLog';
import { ConflictError, type FileConflict } from './applyErrors';
import { fileHash } from './labelFiles';
import type { ApplyPlan, PlannedFile } from './plan';

/** Points at which a test can stop an apply, as a crash would. */
export type ApplyStep =
  | 'before-log-begin'
  | 'after-log-begin'
  | 'before-labels-rename'
  | 'after-labels'
  | 'before-classes-rename'
  | 'after-classes'
  | 'before-log-commit'
  | 'after-log-commit';

export const APPLY_STEPS: readonly ApplyStep[] = [
  'before-log-begin',
  'after-log-begin',
  'before-labels-rename',
  'after-labels',
  'before-classes-rename',
  'after-classes',
  'before-log-commit',
  'after-log-commit',
];

export interface ApplyHooks {
  /** Called at each step; a throw stops the apply there, leaving the files as a crash would. */
  step?(step: ApplyStep): Promise<void> | void;
}

export interface ApplyOptions {
  hooks?: ApplyHooks;
  /** Time stamped on the log lines (default: now). */
  now?: Date;
}

export interface ApplyResult {
  /** Batch id written to the log; null when there was nothing to apply. */
  batch: string | null;
  /** Names of the files replaced (the log is appended to whenever batch is not null). */
  written: string[];
  /** The log entries written. */
  entries: LabelLogEntry[];
  time: string;
}

export function newBatchId(now: Date): string {
  return `${now.toISOString().replace(/[:.]/g, '-')}-${randomBytes(3).toString('hex')}`;
}

export async function applyPlan(plan: ApplyPlan, options: ApplyOptions = {}): Promise<ApplyResult> {
  const now = options.now ?? new Date();
  const time = now.toISOString();
  if (!plan.hasChanges) return { batch: null, written: [], entries: [], time };
  const step = async (name: ApplyStep): Promise<void> => {
    await options.hooks?.step?.(name);
  };

  const conflicts: FileConflict[] = [...plan.baseConflicts];
  for (const file of [plan.labelsFile, plan.classesFile, { name: plan.logFile.name, path: plan.logFile.path }]) {
    const found = await fileHash(file.path);
    if (found !== plan.readHashes[file.name])
      conflicts.push({ file: file.name, expected: plan.readHashes[file.name] ?? null, found, since: 'plan' });
  }
  if (conflicts.length > 0) throw new ConflictError(conflicts);

  const batch = newBatchId(now);
  const replaced = [plan.labelsFile, plan.classesFile].filter((f) => f.changed);
  const files: Record<string, FileTransition> = {};
  for (const f of replaced) files[f.name] = { before: f.oldSha256, after: f.newSha256 };
  const entries = plan.logEntries.map((e) => ({ ...e, time }));
  const begin: BatchBegin = {
    batch,
    phase: 'begin',
    time,
    dataset: plan.dataset,
    runId: plan.decisions.runId,
    settingsHash: plan.decisions.settingsHash,
    decisionsSource: plan.source,
    changes: entries.length,
    files,
    classesAdded: plan.classesAdded,
    classesMerged: plan.classesMerged,
    decisionDigests: plan.decisionDigests,
  };
  const lines = [formatBatchBegin(begin), ...entries.map((e) => formatBatchedEntry(e, batch))];
  // A torn last line (an earlier append cut short) must not swallow our begin line.
  if (await endsMidLine(plan.logFile.path)) lines.unshift('');

  await step('before-log-begin');
  await appendLines(plan.logFile.path, lines);
  await step('after-log-begin');

  const written: PlannedFile[] = [];
  try {
    for (const file of replaced) {
      const role = file === plan.labelsFile ? 'labels' : 'classes';
      await writeFileAtomic(file.path, file.newText, {
        beforeRename: async () => {
          await step(role === 'labels' ? 'before-labels-rename' : 'before-classes-rename');
          const found = await fileHash(file.path);
          if (found !== file.oldSha256) throw new ConflictError([{ file: file.name, expected: file.oldSha256, found, since: 'plan' }]);
        },
      });
      written.push(file);
      await step(role === 'labels' ? 'after-labels' : 'after-classes');
    }
  } catch (error) {
    // A conflict found at the last moment: put back what this batch replaced and close it as
    // aborted. Any other failure is left as a crash would leave it, for recovery to settle.
    if (error instanceof ConflictError && (await restore(written))) {
      await appendLines(plan.logFile.path, [
        formatBatchEnd({
          batch,
          phase: 'abort',
          time: new Date().toISOString(),
          reason: `conflict: ${error.files.join(', ')} changed during the apply; nothing was changed`,
        }),
      ]);
    }
    throw error;
  }

  await step('before-log-commit');
  await appendLines(plan.logFile.path, [formatBatchEnd({ batch, phase: 'commit', time })]);
  await step('after-log-commit');
  return { batch, written: replaced.map((f) => f.name), entries, time };
}

/** Puts back the old content of files this batch replaced; false if one was changed since. */
async function restore(written: PlannedFile[]): Promise<boolean> {
  for (const file of written) if ((await fileHash(file.path)) !== file.newSha256) return false;
  for (const file of written) {
    if (file.oldText === null) await fs.rm(file.path, { force: true });
    else await writeFileAtomic(file.path, file.oldText);
  }
  return true;
}

async function endsMidLine(filePath: string): Promise<boolean> {
  let handle: fs.FileHandle | undefined;
  try {
    handle = await fs.open(filePath, 'r');
    const { size } = await handle.stat();
    if (size === 0) return false;
    const last = Buffer.alloc(1);
    await handle.read(last, 0, 1, size - 1);
    return last[0] !== 0x0a;
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return false;
    throw error;
  } finally {
    await handle?.close();
  }
}
