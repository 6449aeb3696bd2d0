// Applying the curator's decisions from VS Code: plan in the worker, preview (class counts before
// and after in a modal, labels.csv in the diff editor), write on confirmation, offer to re-read
// and re-apply when a label file changed meanwhile, then commit the label files if asked.
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { DecisionsFile } from '../../engine/decisions/types';
import type { ApplyPlan, PlanApplyOutcome } from '../../protocol/worker';
import { LabelFilesConflictError, RequestCancelledError } from '../engineErrors';
import type { HostServices } from '../hostServices';
import { joinCommitMessage, splitCommitMessage, subjectProblem } from './commitMessage';
import { commitLabelFiles } from './gitCommit';
import type { PreviewDocuments } from './previewDocuments';

export interface ApplyRequest {
  folder: string;
  decisions: DecisionsFile;
  /** Names the decisions in the label log and in messages, e.g. "review of run …". */
  source: string;
}

export interface ApplyOutcome {
  /** Shown to the curator (and in the review panel). */
  message: string;
  /** The label log batch written; null when nothing was written. */
  batch: string | null;
}

export const applyButton = 'Apply';
export const applyAndCommitButton = 'Apply and Commit…';
export const rereadButton = 'Re-read and Re-apply';
/** Re-reads after conflicts before giving up (someone keeps changing the files). */
const maxAttempts = 4;

export class DecisionApplier {
  constructor(
    private readonly services: HostServices,
    private readonly previews: PreviewDocuments,
  ) {}

  async run(request: ApplyRequest): Promise<ApplyOutcome> {
    let rebase = false;
    for (let attempt = 0; attempt < maxAttempts; attempt++) {
      const planned = await this.plan(request, rebase);
      const { plan } = planned;
      if (!plan.hasChanges) {
        const message = 'Nothing to apply: every decision is already in the label files.';
        void vscode.window.showInformationMessage(message);
        return { message, batch: null };
      }
      if (plan.baseConflicts.length > 0) {
        const files = [...new Set(plan.baseConflicts.map((c) => c.file))].join(' and ');
        const choice = await vscode.window.showWarningMessage(
          `${files} changed since run ${plan.decisions.runId ?? ''} was scored.`,
          {
            modal: true,
            detail: 'Re-read the label files as they are now and apply the decisions to them? Every decision is checked again.',
          },
          rereadButton,
        );
        if (choice !== rereadButton) return { message: `Nothing written: ${files} changed since the run.`, batch: null };
        rebase = true;
        continue;
      }
      await this.showPreview(plan);
      if (!vscode.workspace.isTrusted) {
        const message = 'Preview only: Restricted Mode does not allow writing the label files. Trust the workspace to apply.';
        void vscode.window.showWarningMessage(message);
        return { message, batch: null };
      }
      const choice = await vscode.window.showInformationMessage(
        `Apply ${plural(plan.changes.length, 'label change')} to ${plan.dataset}?`,
        { modal: true, detail: planned.summary },
        applyButton,
        applyAndCommitButton,
      );
      if (choice !== applyButton && choice !== applyAndCommitButton)
        return { message: 'Apply cancelled: nothing was written.', batch: null };
      let applied;
      try {
        applied = await vscode.window.withProgress(
          { location: vscode.ProgressLocation.Notification, title: `Writing the label files of ${plan.dataset}` },
          () => this.services.client.request('applyPlan', { plan }),
        );
      } catch (error) {
        if (!(error instanceof LabelFilesConflictError)) throw error;
        const again = await vscode.window.showWarningMessage(error.message, { modal: true }, rereadButton);
        if (again !== rereadButton)
          return { message: `Nothing written: ${error.files.join(' and ')} changed during the apply.`, batch: null };
        continue;
      }
      this.previews.clear();
      const written = applied.result.written.join(' and ');
      let message = `Applied ${plural(plan.changes.length, 'label change')}: wrote ${written}, logged batch ${applied.result.batch}.`;
      this.services.output.appendLine(message);
      if (choice === applyAndCommitButton) message += ` ${await this.commit(plan, applied.commitMessage)}`;
      void vscode.window.showInformationMessage(message);
      return { message, batch: applied.result.batch };
    }
    throw new Error(`the label files kept changing during ${maxAttempts} attempts; nothing was written by the last one`);
  }

  private async plan(request: ApplyRequest, rebase: boolean): Promise<PlanApplyOutcome> {
    return await vscode.window.withProgress(
      {
        location: vscode.ProgressLocation.Notification,
        title: `Planning the decisions for ${path.basename(request.folder)}`,
        cancellable: true,
      },
      (progress, token) =>
        this.services.client.request(
          'planApply',
          { folder: request.folder, decisions: request.decisions, source: request.source, rebase },
          { progress, token },
        ),
    );
  }

  private async showPreview(plan: ApplyPlan): Promise<void> {
    for (const file of [plan.classesFile, plan.labelsFile]) {
      if (!file.changed) continue;
      // The left side is the file as planned against (not the live file), so the diff still
      // reads correctly once the apply has replaced the file.
      const before = this.previews.add(
        file.name,
        file.oldText ?? '',
        file.oldText === null ? 'before apply (no file yet)' : 'before apply',
      );
      const after = this.previews.add(file.name, file.newText);
      const title = `${file.name}: before ↔ after apply`;
      await vscode.commands.executeCommand('vscode.diff', before, after, title, { preview: file !== plan.labelsFile, preserveFocus: true });
    }
  }

  private async commit(plan: ApplyPlan, generated: string): Promise<string> {
    const { subject, body } = splitCommitMessage(generated);
    const edited = await vscode.window.showInputBox({
      title: 'Commit the label files',
      prompt: `Subject of the commit; the body lists the changes (${body.split('\n').length} lines). Only ${plan.labelsFile.name}, ${plan.classesFile.name} and ${plan.logFile.name} are committed.`,
      value: subject,
      validateInput: subjectProblem,
      ignoreFocusOut: true,
    });
    if (edited === undefined) return 'Not committed.';
    try {
      const report = await commitLabelFiles(
        this.services,
        plan.folder,
        [plan.labelsFile.path, plan.classesFile.path, plan.logFile.path],
        joinCommitMessage(edited, body),
      );
      return report.committed ? `Committed ${report.commit.slice(0, 12)} (${report.via}).` : `Not committed: ${report.why}.`;
    } catch (error) {
      if (error instanceof RequestCancelledError) return 'Not committed.';
      const text = error instanceof Error ? error.message : String(error);
      this.services.output.appendLine(`Commit of the label files failed: ${text}`);
      return `Not committed: ${text}`;
    }
  }
}

function plural(count: number, noun: string): string {
  return `${count} ${noun}${count === 1 ? '' : 's'}`;
}
