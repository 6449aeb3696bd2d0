// The long-lived objects the commands share, created once at activation.
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { ValidationDiagnostics } from './diagnostics';
import type { EngineClient } from './engineClient';
import { DatasetProblemsError, RequestCancelledError } from './engineErrors';

export interface HostServices {
  client: EngineClient;
  diagnostics: ValidationDiagnostics;
  output: vscode.OutputChannel;
}

/** Tells the user why an engine request failed; a cancellation needs no message. */
export function reportEngineError(services: HostServices, datasetFolder: string, action: string, error: unknown): void {
  const name = path.basename(datasetFolder);
  if (error instanceof RequestCancelledError) {
    services.output.appendLine(`${action} of '${name}' cancelled.`);
    return;
  }
  if (error instanceof DatasetProblemsError) {
    services.diagnostics.show(datasetFolder, error.problems);
    void showProblemsMessage(`${action} of '${name}' stopped: the dataset has ${plural(error.problems.length, 'problem')}.`);
    return;
  }
  const message = error instanceof Error ? error.message : String(error);
  services.output.appendLine(`${action} of '${name}' failed: ${error instanceof Error ? (error.stack ?? message) : message}`);
  void vscode.window.showErrorMessage(`${action} of '${name}' failed: ${message}`, 'Show Log').then((choice) => {
    if (choice) services.output.show(true);
  });
}

export async function showProblemsMessage(message: string): Promise<void> {
  const choice = await vscode.window.showErrorMessage(message, 'Show Problems');
  if (choice) await vscode.commands.executeCommand('workbench.actions.view.problems');
}

export function plural(count: number, noun: string): string {
  return `${count} ${noun}${count === 1 ? '' : 's'}`;
}
