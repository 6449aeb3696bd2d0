// Activation stays light: no engine or tfjs code is loaded here. The engine worker starts on the
// first request and is terminated when the extension is disposed.
import * as vscode from 'vscode';
import { registerSummaryCommand } from './commands/summary';
import { registerValidateCommand } from './commands/validate';
import { ValidationDiagnostics } from './diagnostics';
import { EngineClient } from './engineClient';
import type { HostServices } from './hostServices';
import { registerRevalidateOnSave } from './revalidateOnSave';

export function activate(context: vscode.ExtensionContext): void {
  const output = vscode.window.createOutputChannel('Graph Curator');
  const workerScript = vscode.Uri.joinPath(context.extensionUri, 'dist', 'engine-worker.js').fsPath;
  const services: HostServices = {
    output,
    client: new EngineClient(workerScript, output),
    diagnostics: new ValidationDiagnostics(),
  };
  context.subscriptions.push(
    output,
    services.client,
    services.diagnostics,
    registerValidateCommand(services),
    registerSummaryCommand(services),
    registerRevalidateOnSave(services),
  );
}

export function deactivate(): void {
  // Everything is in context.subscriptions, which VS Code disposes.
}
