// graphCurator.showReport: build the quality-over-time report of a dataset in the engine worker
// (the graph model beside the MLP baseline, warm against cold start, the settings sweeps) and show
// it in a webview panel. The worker renders the HTML; the panel only wraps it in a CSP page.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { newNonce } from '../../review/webviewHtml';
import { chooseDatasetFolder } from '../datasetLocator';
import type { HostServices } from '../hostServices';
import { reportEngineError } from '../hostServices';
import { reportPanelHtml } from '../reportPanelHtml';
import { describeRunSettings } from '../runSettingsConfig';
import { currentRunSettings } from './reviewCommands';

export const showReportCommandId = 'graphCurator.showReport';
const reportViewType = 'graphCurator.report';

export function registerShowReportCommand(services: HostServices): vscode.Disposable {
  return vscode.commands.registerCommand(showReportCommandId, (resource?: unknown) => showReport(services, resource));
}

/** The truth file the curator picked, null for none, undefined when the pick was dismissed. */
async function chooseTruthFile(folder: string): Promise<string | null | undefined> {
  const choice = await vscode.window.showQuickPick(
    [
      { label: 'No truth file', description: 'test each slice on its own curated labels', pick: 'none' as const },
      { label: 'Choose a truth file…', description: 'held-out true labels (id,label CSV)', pick: 'file' as const },
    ],
    { title: `Quality report of ${path.basename(folder)}: reference labels`, placeHolder: 'Compare the models against…' },
  );
  if (!choice) return undefined;
  if (choice.pick === 'none') return null;
  const picked = await vscode.window.showOpenDialog({
    canSelectFiles: true,
    canSelectFolders: false,
    canSelectMany: false,
    defaultUri: vscode.Uri.file(folder),
    filters: { 'CSV files': ['csv'] },
    openLabel: 'Use as Truth',
    title: 'Held-out true labels (id,label)',
  });
  return picked?.[0]?.fsPath;
}

async function chooseQuick(): Promise<boolean | undefined> {
  const choice = await vscode.window.showQuickPick(
    [
      { label: 'Quick', description: 'sweeps on the newest slices with fewer epochs', quick: true },
      { label: 'Full', description: 'sweeps on every slice with the configured epochs', quick: false },
    ],
    { title: 'Quick sweeps?', placeHolder: 'The main evaluation is the same either way' },
  );
  return choice?.quick;
}

async function showReport(services: HostServices, resource?: unknown): Promise<void> {
  const folder = await chooseDatasetFolder(resource);
  if (!folder) return;
  const truthFile = await chooseTruthFile(folder);
  if (truthFile === undefined) return;
  const quick = await chooseQuick();
  if (quick === undefined) return;
  const name = path.basename(folder);
  const settings = currentRunSettings(services);
  // The report cache lives in the dataset's runs/ folder: Restricted Mode neither reads nor writes it.
  const useCache = vscode.workspace.isTrusted;
  const nonce = newNonce();
  services.output.appendLine(
    `Quality report of ${name}${truthFile ? ` against ${truthFile}` : ''}${quick ? ' (quick sweeps)' : ''}: ${describeRunSettings(settings)}`,
  );
  let outcome;
  try {
    outcome = await vscode.window.withProgress(
      { location: vscode.ProgressLocation.Notification, title: `Quality report of '${name}'`, cancellable: true },
      (progress, token) => services.client.request('report', { folder, settings, truthFile, quick, nonce, useCache }, { progress, token }),
    );
  } catch (error) {
    reportEngineError(services, folder, 'Quality report', error);
    return;
  }
  const { summary } = outcome;
  services.output.appendLine(
    `Quality report of ${name}: ${summary.slices} slices, ${summary.fromCache ? `from the cache (computed ${summary.createdAt})` : `computed in ${summary.computeSeconds.toFixed(1)} s`}`,
  );
  const title = `Quality: ${summary.dataset}`;
  const panel = vscode.window.createWebviewPanel(reportViewType, title, vscode.ViewColumn.Active, {
    enableScripts: true,
    enableFindWidget: true,
  });
  panel.webview.html = reportPanelHtml({ head: outcome.head, body: outcome.body, nonce, title });
}
