// The apply path for the VS Code host: plan (read, validate, compute), write, and commit the
// label files with git's command line when the git extension cannot be used.
import { applyPlan } from '../decisions/apply';
import { planApply } from '../decisions/plan';
import { formatPlanSummary, labelCommitMessage } from '../decisions/summary';
import type { ApplyPlan } from '../decisions/plan';
import type { DecisionsFile } from '../decisions/types';
import { findRepositoryRoot, initRepository } from '../git/gitCli';
import { commitLabelFiles } from '../git/labelCommit';
import type { ApplyPlanOutcome, CommitLabelsOutcome, PlanApplyOutcome } from '../../protocol/worker';

export async function planDecisions(folder: string, decisions: DecisionsFile, source: string, rebase = false): Promise<PlanApplyOutcome> {
  const plan = await planApply(folder, decisions, { source, rebase });
  return { plan, summary: formatPlanSummary(plan) };
}

export async function writePlan(plan: ApplyPlan): Promise<ApplyPlanOutcome> {
  const result = await applyPlan(plan);
  return { result, commitMessage: labelCommitMessage(plan, result.batch) };
}

export async function commitLabels(folder: string, message: string, initialise = false): Promise<CommitLabelsOutcome> {
  if ((await findRepositoryRoot(folder)) === null) {
    if (!initialise) return { outcome: 'no-repository' };
    await initRepository(folder);
  }
  const commit = await commitLabelFiles(folder, message);
  return commit
    ? { outcome: 'committed', commit: commit.commit, root: commit.root, files: commit.files }
    : { outcome: 'nothing-to-commit' };
}
