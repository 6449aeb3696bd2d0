// Activation stays light: no engine or tfjs code is loaded here. The engine worker starts on the
// first request and is terminated when the extension is disposed.
import * as vscode from 'vscode';
import { DecisionApplier } from './apply/applyDecisions';
import { PreviewDocuments } from './apply/previewDocuments';
import { exportDecisionsFile, registerReviewCommands } from './commands/reviewCommands';
import { registerShowReportCommand } from './commands/showReport';
import { registerSecondLookCommand } from './commands/secondLookCommand';
import { registerSummaryCommand } from './commands/summary';
import { registerValidateCommand } from './commands/validate';
import { DatasetOverviews } from './datasetOverviews';
import { DatasetTreeProvider, datasetsViewId } from './datasetTree';
import { ValidationDiagnostics } from './diagnostics';
import { EngineClient } from './engineClient';
import type { HostServices } from './hostServices';
import { DatasetOverviewEditor } from './overviewEditor';
import { registerRevalidateOnSave } from './revalidateOnSave';
import { ReviewPanels } from './review/reviewPanel';

export function activate(context: vscode.ExtensionContext): void {
  const output = vscode.window.createOutputChannel('Graph Curator');
  const workerScript = vscode.Uri.joinPath(context.extensionUri, 'dist', 'engine-worker.js').fsPath;
  const services: HostServices = {
    output,
    client: new EngineClient(workerScript, output),
    diagnostics: new ValidationDiagnostics(),
  };
  const previews = new PreviewDocuments();
  const applier = new DecisionApplier(services, previews);
  const overviews = new DatasetOverviews(services.client);
  const tree = new DatasetTreeProvider(overviews, context.workspaceState);
  const panels = new ReviewPanels(services, context, applier, (folder, file) => exportDecisionsFile(services, folder, file));
  context.subscriptions.push(
    output,
    services.client,
    services.diagnostics,
    previews,
    overviews,
    tree,
    panels,
    vscode.window.registerTreeDataProvider(datasetsViewId, tree),
    DatasetOverviewEditor.register(overviews),
    registerValidateCommand(services),
    registerSummaryCommand(services),
    registerShowReportCommand(services),
    registerRevalidateOnSave(services),
    ...registerReviewCommands({ ...services, overviews, tree, panels, applier }),
    registerSecondLookCommand(panels),
  );
}

export function deactivate(): void {
  // Everything is in context.subscriptions, which VS Code disposes.
}
