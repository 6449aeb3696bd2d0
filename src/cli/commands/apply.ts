import type { CliIo } from '../io';
import { EXIT } from '../io';
import { parseArgs, UsageError, type CommandSpec } from '../args';
import { formatProblemLines, reportError } from '../command';
import { readDecisionsFile, InvalidDecisionsError } from '../../engine/decisions/decisionsFile';
import { planApply, type ApplyPlan } from '../../engine/decisions/plan';
import { applyPlan } from '../../engine/decisions/apply';
import { recoverInterruptedApply } from '../../engine/decisions/recover';
import { ConflictError, InterruptedApplyError } from '../../engine/decisions/applyErrors';
import { formatPlanSummary, labelCommitMessage } from '../../engine/decisions/summary';
import { commitLabelFiles } from '../../engine/git/labelCommit';
import { GitError, NotInRepositoryError } from '../../engine/git/gitCli';

export const spec: CommandSpec = {
  name: 'apply',
  summary: 'Apply a decisions file to labels.csv and classes.json, log every change, optionally commit with git.',
  positionals: [{ name: 'folder' }],
  flags: [
    {
      name: 'decisions',
      value: 'FILE',
      description: 'The decisions file exported by the review panel (format: docs/decisions-format.md).',
    },
    { name: 'dry-run', description: 'Print what would change; write nothing.' },
    { name: 'commit', description: 'Commit the label files (and only them) with git after writing.' },
    { name: 'message', value: 'TEXT', description: 'Commit message instead of the generated one (with --commit).' },
    {
      name: 'rebase',
      description: 'Apply even though the label files changed since the run the decisions were made on (every decision is checked again).',
    },
    {
      name: 'recover',
      description: 'Settle an apply that was interrupted (finish it or mark it undone), then apply --decisions if given.',
    },
  ],
  details:
    'Writes labels.csv and classes.json atomically and appends one line per changed node to label-log.jsonl. ' +
    'Nothing is written when a label file changed since the decisions were made (use --rebase to apply on the current files) ' +
    'or since it was read. Exit code 0 on success, 1 for invalid decisions, a conflict or a git failure, 2 for a usage error.',
};

/** Changed nodes listed in the output at most. */
const LISTED_CHANGES = 20;

export async function run(args: string[], io: CliIo): Promise<number> {
  let folder = '';
  try {
    const parsed = parseArgs(args, spec);
    folder = parsed.positionals[0];
    const decisionsPath = parsed.value('decisions');
    const dryRun = parsed.has('dry-run');
    if (parsed.has('message') && !parsed.has('commit')) throw new UsageError('--message needs --commit');
    if (parsed.has('commit') && dryRun) throw new UsageError('--commit and --dry-run exclude each other');
    if (decisionsPath === undefined && !parsed.has('recover')) throw new UsageError('missing --decisions FILE (or --recover)');

    if (parsed.has('recover')) {
      const report = await recoverInterruptedApply(folder, { dryRun });
      if (report.batches.length === 0) io.stdout('No interrupted apply to recover.\n');
      for (const b of report.batches) io.stdout(`${dryRun ? 'would settle: ' : ''}${b.message}\n`);
      if (report.batches.some((b) => b.outcome === 'unresolved')) return EXIT.failure;
      if (decisionsPath === undefined) return EXIT.ok;
    }

    const read = await readDecisionsFile(decisionsPath!);
    if (!read.decisions) {
      io.stderr(formatProblemLines(read.problems, ''));
      return EXIT.failure;
    }
    const plan = await planApply(folder, read.decisions, { source: read.file, locate: read.locate, rebase: parsed.has('rebase') });
    io.stdout(formatPlanSummary(plan));
    io.stdout(listChanges(plan));
    if (plan.hasChanges && plan.baseConflicts.length > 0) {
      io.stderr(
        `${new ConflictError(plan.baseConflicts).message.replace('nothing was written', dryRun ? 'an apply would write nothing' : 'nothing was written')}\n(or apply on the current files with --rebase)\n`,
      );
      return EXIT.failure;
    }
    if (dryRun || !plan.hasChanges) {
      if (dryRun) io.stdout('Dry run: nothing written.\n');
      return EXIT.ok;
    }
    const result = await applyPlan(plan);
    io.stdout(
      `Wrote ${result.written.join(' and ')}; appended ${result.entries.length + 2} lines to ${plan.logFile.name} (batch ${result.batch}).\n`,
    );
    if (!parsed.has('commit')) return EXIT.ok;
    const commit = await commitLabelFiles(folder, parsed.value('message') ?? labelCommitMessage(plan, result.batch));
    io.stdout(
      commit
        ? `Committed ${commit.commit.slice(0, 12)}: ${commit.files.join(', ')}\n`
        : 'Nothing to commit: the label files match the last commit.\n',
    );
    return EXIT.ok;
  } catch (error) {
    if (error instanceof InvalidDecisionsError) {
      io.stderr(formatProblemLines(error.problems, ''));
      return EXIT.failure;
    }
    if (error instanceof ConflictError || error instanceof InterruptedApplyError) {
      io.stderr(`graph-curator apply: ${error.message}\n`);
      return EXIT.failure;
    }
    if (error instanceof NotInRepositoryError) {
      io.stderr(`graph-curator apply: the labels were written but not committed: ${error.message}\n`);
      return EXIT.failure;
    }
    if (error instanceof GitError) {
      io.stderr(`graph-curator apply: the labels were written, but the commit failed: ${error.message}\n`);
      return EXIT.failure;
    }
    return reportError(error, io, spec, folder);
  }
}

function listChanges(plan: ApplyPlan): string {
  if (plan.changes.length === 0) return '';
  const lines = plan.changes
    .slice(0, LISTED_CHANGES)
    .map((c) => `  ${c.node}: ${c.oldLabel ?? '(none)'} → ${c.newLabel}  [${c.decisionId}]`);
  if (plan.changes.length > LISTED_CHANGES) lines.push(`  … and ${plan.changes.length - LISTED_CHANGES} more`);
  return `\nChanged nodes:\n${lines.join('\n')}\n`;
}
