// graphCurator.validateDataset: check a dataset folder and list its problems in the Problems panel.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { chooseDatasetFolder } from '../datasetLocator';
import type { HostServices } from '../hostServices';
import { plural, reportEngineError, showProblemsMessage } from '../hostServices';

export const validateCommandId = 'graphCurator.validateDataset';

export function registerValidateCommand(services: HostServices): vscode.Disposable {
  return vscode.commands.registerCommand(validateCommandId, async (resource?: unknown) => {
    const folder = await chooseDatasetFolder(resource);
    if (folder) await validateWithNotification(services, folder);
  });
}

async function validateWithNotification(services: HostServices, folder: string): Promise<void> {
  const name = path.basename(folder);
  const problemCount = await vscode.window.withProgress(
    { location: vscode.ProgressLocation.Notification, title: `Validating dataset '${name}'`, cancellable: true },
    (progress, token) => validateDataset(services, folder, { progress, token }),
  );
  if (problemCount === undefined) return;
  if (problemCount === 0) void vscode.window.showInformationMessage(`Dataset '${name}' is valid.`);
  else void showProblemsMessage(`Dataset '${name}' has ${plural(problemCount, 'problem')}.`);
}

/**
 * Validates one dataset folder and replaces its diagnostics. Returns the number of problems, or
 * undefined when the request failed or was cancelled (the failure is already reported).
 */
export async function validateDataset(
  services: HostServices,
  folder: string,
  run: { progress?: vscode.Progress<{ message?: string }>; token?: vscode.CancellationToken },
): Promise<number | undefined> {
  try {
    const problems = await services.client.validate(folder, run);
    services.diagnostics.show(folder, problems);
    return problems.length;
  } catch (error) {
    reportEngineError(services, folder, 'Validation', error);
    return undefined;
  }
}
