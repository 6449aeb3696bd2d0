// Restricted Mode: datasets may be read (validated, summarized) but nothing is written to the
// workspace until the user trusts it. Every command that writes asks here first.
import * as vscode from 'vscode';

export function mayWriteToWorkspace(action: string): boolean {
  if (vscode.workspace.isTrusted) return true;
  void vscode.window.showWarningMessage(`${action} writes files, which Restricted Mode does not allow. Trust this workspace to continue.`);
  return false;
}
