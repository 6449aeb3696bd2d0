// The commands of the review workflow: open a dataset folder, score a slice, open the review
// panel (at a candidate), apply and export the pending decisions.
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { DecisionsFile } from '../../engine/decisions/types';
import type { DecisionApplier } from '../apply/applyDecisions';
import { chooseDatasetFolder } from '../datasetLocator';
import type { DatasetOverviews } from '../datasetOverviews';
import { manifestFileName } from '../datasetPaths';
import type { DatasetTreeProvider } from '../datasetTree';
import { datasetsViewId } from '../datasetTree';
import { openCandidateCommandId } from '../datasetTreeModel';
import type { HostServices } from '../hostServices';
import { reportEngineError } from '../hostServices';
import type { ReviewPanels } from '../review/reviewPanel';
import { isReviewTarget, type ReviewTarget } from '../review/reviewState';
import { listRunRecords, pendingDecisionsPath, runToReview } from '../runFiles';
import { describeRunSettings, runSettingsFromConfiguration, type SettingKey } from '../runSettingsConfig';
import { mayWriteToWorkspace } from '../trust';

export const commandIds = {
  openDatasetFolder: 'graphCurator.openDatasetFolder',
  scoreSlice: 'graphCurator.scoreSlice',
  openReviewPanel: 'graphCurator.openReviewPanel',
  applyDecisions: 'graphCurator.applyDecisions',
  exportDecisions: 'graphCurator.exportDecisions',
  openCandidate: openCandidateCommandId,
  refreshDatasets: 'graphCurator.refreshDatasets',
} as const;

export interface ReviewCommandServices extends HostServices {
  overviews: DatasetOverviews;
  tree: DatasetTreeProvider;
  panels: ReviewPanels;
  applier: DecisionApplier;
}

const openReviewButton = 'Open Review';

export function registerReviewCommands(services: ReviewCommandServices): vscode.Disposable[] {
  return [
    vscode.commands.registerCommand(commandIds.openDatasetFolder, () => openDatasetFolder(services)),
    vscode.commands.registerCommand(commandIds.scoreSlice, (resource?: unknown) => scoreSliceCommand(services, resource)),
    vscode.commands.registerCommand(commandIds.openReviewPanel, (resource?: unknown) => openReviewPanel(services, resource)),
    vscode.commands.registerCommand(commandIds.openCandidate, async (target?: unknown) => {
      if (isReviewTarget(target))
        await services.panels.show(target, (target as { candidateId?: unknown }).candidateId as string | undefined);
    }),
    vscode.commands.registerCommand(commandIds.applyDecisions, (resource?: unknown) => applyDecisionsCommand(services, resource)),
    vscode.commands.registerCommand(commandIds.exportDecisions, (resource?: unknown) => exportDecisionsCommand(services, resource)),
    vscode.commands.registerCommand(commandIds.refreshDatasets, () => services.tree.refresh()),
  ];
}

async function openDatasetFolder(services: ReviewCommandServices): Promise<void> {
  const picked = await vscode.window.showOpenDialog({
    canSelectFolders: true,
    canSelectFiles: false,
    canSelectMany: false,
    openLabel: 'Open Dataset',
    title: 'Open a dataset folder (with dataset.json)',
  });
  const folder = picked?.[0]?.fsPath;
  if (!folder) return;
  const hasManifest = await fs.stat(path.join(folder, manifestFileName)).then(
    (s) => s.isFile(),
    () => false,
  );
  if (!hasManifest) {
    void vscode.window.showErrorMessage(
      `${folder} has no ${manifestFileName}: it is not a dataset folder. Create one with "graph-curator init".`,
    );
    return;
  }
  await services.tree.addFolder(folder);
  await vscode.commands.executeCommand(`${datasetsViewId}.focus`);
  const run = runToReview(await listRunRecords(folder));
  if (run) {
    await services.panels.show({ folder, runId: run.runId });
    return;
  }
  const choice = await vscode.window.showInformationMessage(`${path.basename(folder)} has no scoring run yet.`, 'Score Slice…');
  if (choice) await scoreSliceCommand(services, { folder });
}

/** The settings the next run uses; ignored settings are reported once per run. */
export function currentRunSettings(services: HostServices) {
  const config = vscode.workspace.getConfiguration('graphCurator');
  const read = runSettingsFromConfiguration((key: SettingKey) => config.get(key));
  for (const problem of read.problems) services.output.appendLine(`Settings: ${problem}`);
  if (read.problems.length > 0)
    void vscode.window.showWarningMessage(
      `Some Graph Curator settings are invalid and were replaced by defaults (see the Graph Curator output).`,
    );
  return read.settings;
}

async function scoreSliceCommand(services: ReviewCommandServices, resource?: unknown): Promise<void> {
  const folder = await chooseDatasetFolder(resource);
  if (!folder) return;
  const name = path.basename(folder);
  if (!mayWriteToWorkspace('Scoring a slice')) return;
  let overview;
  try {
    overview = await vscode.window.withProgress(
      { location: vscode.ProgressLocation.Notification, title: `Reading dataset '${name}'`, cancellable: false },
      () => services.overviews.get(folder),
    );
  } catch (error) {
    reportEngineError(services, folder, 'Reading', error);
    return;
  }
  const slices = [...overview.summary.slices].reverse();
  if (slices.length === 0) {
    void vscode.window.showWarningMessage(`Dataset '${name}' has no slices to score.`);
    return;
  }
  const picked = await vscode.window.showQuickPick(
    slices.map((slice, index) => ({
      label: slice.key,
      description: `${slice.nodes.toLocaleString('en-US')} nodes, ${slice.labelled.toLocaleString('en-US')} labelled${index === 0 ? ' (newest)' : ''}`,
      slice: slice.key,
    })),
    { title: `Score a slice of ${overview.summary.name}`, placeHolder: 'Slice to score (newest first)' },
  );
  if (!picked) return;
  const settings = currentRunSettings(services);
  services.output.appendLine(`Scoring ${picked.slice} of ${name}: ${describeRunSettings(settings)}`);
  let outcome;
  try {
    outcome = await vscode.window.withProgress(
      { location: vscode.ProgressLocation.Notification, title: `Scoring ${picked.slice} of ${overview.summary.name}`, cancellable: true },
      (progress, token) => services.client.request('score', { folder, slice: picked.slice, settings }, { progress, token }),
    );
  } catch (error) {
    reportEngineError(services, folder, 'Scoring', error);
    return;
  }
  services.overviews.invalidate(folder);
  const { record } = outcome;
  const summary = `Scored ${record.slice} of ${record.dataset}: ${record.counts.rejected} of ${record.counts.scored} nodes fit no known class; ${outcome.candidateCount} candidate class${outcome.candidateCount === 1 ? '' : 'es'}.`;
  services.output.appendLine(`${summary} Run ${outcome.runId} saved to ${outcome.runFolder}`);
  const choice = await vscode.window.showInformationMessage(summary, openReviewButton);
  if (choice === openReviewButton) await services.panels.show({ folder, runId: outcome.runId });
}

async function openReviewPanel(services: ReviewCommandServices, resource?: unknown): Promise<void> {
  if (isReviewTarget(resource)) {
    await services.panels.show(resource);
    return;
  }
  const folder = await chooseDatasetFolder(resource);
  if (!folder) return;
  const run = runToReview(await listRunRecords(folder));
  if (!run) {
    const choice = await vscode.window.showWarningMessage(`${path.basename(folder)} has no scoring run to review yet.`, 'Score Slice…');
    if (choice) await scoreSliceCommand(services, { folder });
    return;
  }
  await services.panels.show({ folder, runId: run.runId });
}

/**
 * The decisions to apply or export: the open panel's, else a run of the chosen dataset with saved
 * pending decisions (opened in the panel first, so the curator sees them), else a decisions file.
 */
async function pendingDecisions(
  services: ReviewCommandServices,
  resource: unknown,
  verb: string,
): Promise<{ folder: string; decisions: DecisionsFile; source: string; fromPanel: boolean } | undefined> {
  const fromPanel = isReviewTarget(resource) ? undefined : await services.panels.currentDecisions();
  if (fromPanel && fromPanel.decisions.decisions.length > 0)
    return {
      folder: fromPanel.target.folder,
      decisions: fromPanel.decisions,
      source: `review of run ${fromPanel.target.runId}`,
      fromPanel: true,
    };
  const folder = isReviewTarget(resource) ? resource.folder : (fromPanel?.target.folder ?? (await chooseDatasetFolder(resource)));
  if (!folder) return undefined;
  const runs = await listRunRecords(folder);
  const withPending: ReviewTarget[] = [];
  for (const run of runs) {
    if (
      await fs.stat(pendingDecisionsPath(folder, run.runId)).then(
        () => true,
        () => false,
      )
    )
      withPending.push({ folder, runId: run.runId });
  }
  const saved = withPending[0];
  if (saved) {
    await services.panels.show(saved);
    const current = await services.panels.currentDecisions();
    if (current && current.decisions.decisions.length > 0)
      return { folder, decisions: current.decisions, source: `review of run ${saved.runId}`, fromPanel: true };
  }
  const choice = await vscode.window.showInformationMessage(
    `No pending decisions to ${verb} in ${path.basename(folder)}.`,
    'Choose a Decisions File…',
  );
  if (!choice) return undefined;
  const files = await vscode.window.showOpenDialog({
    canSelectMany: false,
    filters: { 'Decisions file': ['json'] },
    defaultUri: vscode.Uri.file(folder),
    openLabel: 'Use Decisions',
  });
  const file = files?.[0]?.fsPath;
  if (!file) return undefined;
  try {
    const decisions = JSON.parse(await fs.readFile(file, 'utf8')) as DecisionsFile;
    return { folder, decisions, source: path.basename(file), fromPanel: false };
  } catch (error) {
    void vscode.window.showErrorMessage(`${file} is not a decisions file: ${error instanceof Error ? error.message : String(error)}`);
    return undefined;
  }
}

async function applyDecisionsCommand(services: ReviewCommandServices, resource?: unknown): Promise<void> {
  const found = await pendingDecisions(services, resource, 'apply');
  if (!found) return;
  try {
    if (found.fromPanel && (await services.panels.applyFromPanel())) return;
    await services.applier.run(found);
  } catch (error) {
    reportEngineError(services, found.folder, 'Applying decisions', error);
  } finally {
    services.overviews.invalidate(found.folder);
  }
}

async function exportDecisionsCommand(services: ReviewCommandServices, resource?: unknown): Promise<void> {
  const found = await pendingDecisions(services, resource, 'export');
  if (!found) return;
  try {
    await exportDecisionsFile(services, found.folder, found.decisions);
  } catch (error) {
    reportEngineError(services, found.folder, 'Export of decisions', error);
  }
}

/** Asks where, writes the file (atomically, in the worker); resolves to the message shown. */
export async function exportDecisionsFile(services: HostServices, folder: string, decisions: DecisionsFile): Promise<string> {
  const defaultName = `decisions-${decisions.slice}-${(decisions.runId ?? 'review').slice(0, 19)}.json`;
  const target = await vscode.window.showSaveDialog({
    defaultUri: vscode.Uri.file(path.join(folder, defaultName)),
    filters: { 'Decisions file': ['json'] },
    saveLabel: 'Export Decisions',
  });
  if (!target) return 'Export cancelled.';
  const inWorkspace = vscode.workspace.getWorkspaceFolder(target) !== undefined;
  if (inWorkspace && !mayWriteToWorkspace('Exporting decisions'))
    return 'Not exported: Restricted Mode does not allow writing to the workspace.';
  const written = await services.client.request('exportDecisions', { file: target.fsPath, decisions });
  const message = `Exported ${decisions.decisions.length} decision${decisions.decisions.length === 1 ? '' : 's'} to ${written}. Apply them with "graph-curator apply --decisions".`;
  void vscode.window.showInformationMessage(message);
  return message;
}
