// "Review Doubtful Labels and Suggestions": opens the review panel (on the chosen dataset's run,
// as Open Review Panel does) and computes its second-look queues in the engine worker, with
// progress and a cancel button. The queues only list what to look at; every change is a decision
// the curator makes in the panel.
import * as vscode from 'vscode';
import type { ReviewPanels } from '../review/reviewPanel';

export const secondLookCommandId = 'graphCurator.reviewSecondLook';
const openReviewPanelCommandId = 'graphCurator.openReviewPanel';

export function registerSecondLookCommand(panels: ReviewPanels): vscode.Disposable {
  return vscode.commands.registerCommand(secondLookCommandId, async (resource?: unknown) => {
    // Without an open panel, or for a dataset named by the caller (tree item, explorer), the
    // panel is opened first on that dataset's run; opening the run already shown only reveals it.
    if (!panels.current || resource !== undefined) await vscode.commands.executeCommand(openReviewPanelCommandId, resource);
    await panels.loadSecondLook();
  });
}
