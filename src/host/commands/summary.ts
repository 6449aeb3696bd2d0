// graphCurator.showSummary: load a dataset in the engine worker and print its summary.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { chooseDatasetFolder } from '../datasetLocator';
import type { HostServices } from '../hostServices';
import { reportEngineError } from '../hostServices';
// A pure formatter shared with the CLI, so both print the same summary; it imports only types.
import { formatSummaryText } from '../../engine/dataset/summary';

export const summaryCommandId = 'graphCurator.showSummary';

export function registerSummaryCommand(services: HostServices): vscode.Disposable {
  return vscode.commands.registerCommand(summaryCommandId, async (resource?: unknown) => {
    const folder = await chooseDatasetFolder(resource);
    if (folder) await showSummary(services, folder);
  });
}

async function showSummary(services: HostServices, folder: string): Promise<void> {
  const name = path.basename(folder);
  await vscode.window.withProgress(
    { location: vscode.ProgressLocation.Notification, title: `Summarizing dataset '${name}'`, cancellable: true },
    async (progress, token) => {
      try {
        const summary = await services.client.summary(folder, { progress, token });
        services.diagnostics.clear(folder);
        services.output.appendLine(formatSummaryText(summary));
        services.output.show(true);
      } catch (error) {
        reportEngineError(services, folder, 'Summary', error);
      }
    },
  );
}
