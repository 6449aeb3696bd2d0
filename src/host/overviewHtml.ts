// The dataset overview shown by the dataset.json custom editor: name, slices, label counts per
// class, latest runs, and links that run the extension's commands (command: URIs, enabled for
// these commands only). No script at all; styles inline under a nonce; colours from VS Code's theme.
import type { DatasetOverview } from '../protocol/worker';

export const overviewCommands = [
  'graphCurator.scoreSlice',
  'graphCurator.openReviewPanel',
  'graphCurator.openCandidate',
  'graphCurator.validateDataset',
] as const;
export type OverviewCommand = (typeof overviewCommands)[number];

export function escapeHtml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

/** A command: URI whose single argument is `argument` (VS Code passes JSON arrays as the argument list). */
export function commandUri(command: OverviewCommand, argument: unknown): string {
  return `command:${command}?${encodeURIComponent(JSON.stringify([argument]))}`;
}

const style = `
body { font-family: var(--vscode-font-family); color: var(--vscode-foreground); background: var(--vscode-editor-background); padding: 0 1.5em 2em; }
h1 { font-size: 1.5em; margin-bottom: 0.2em; }
h2 { font-size: 1.1em; margin-top: 1.6em; border-bottom: 1px solid var(--vscode-panel-border); padding-bottom: 0.2em; }
.muted { color: var(--vscode-descriptionForeground); }
table { border-collapse: collapse; }
th, td { text-align: left; padding: 0.15em 1.2em 0.15em 0; }
td.number, th.number { text-align: right; }
.actions a { display: inline-block; margin: 0.6em 0.8em 0 0; padding: 0.3em 0.9em; color: var(--vscode-button-foreground); background: var(--vscode-button-background); text-decoration: none; border-radius: 2px; }
.actions a:hover { background: var(--vscode-button-hoverBackground); }
.actions a:focus { outline: 1px solid var(--vscode-focusBorder); outline-offset: 2px; }
a { color: var(--vscode-textLink-foreground); }
`;

function page(body: string, parts: { cspSource: string; nonce: string }): string {
  const csp = `default-src 'none'; img-src ${parts.cspSource}; style-src 'nonce-${parts.nonce}';`;
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="UTF-8">
<meta http-equiv="Content-Security-Policy" content="${escapeHtml(csp)}">
<meta name="viewport" content="width=device-width, initial-scale=1.0">
<style nonce="${escapeHtml(parts.nonce)}">${style}</style>
<title>Dataset overview</title>
</head>
<body>
${body}
</body>
</html>
`;
}

export function overviewMessageHtml(message: string, parts: { cspSource: string; nonce: string }): string {
  return page(`<p class="muted">${escapeHtml(message)}</p>`, parts);
}

export function overviewHtml(folder: string, overview: DatasetOverview, parts: { cspSource: string; nonce: string }): string {
  const { summary, runs, latestCandidates } = overview;
  const number = (n: number) => n.toLocaleString('en-US');
  const sliceRows = [...summary.slices]
    .reverse()
    .map(
      (s) =>
        `<tr><td>${escapeHtml(s.key)}</td><td class="number">${number(s.nodes)}</td><td class="number">${number(s.edges)}</td><td class="number">${number(s.labelled)}</td></tr>`,
    )
    .join('\n');
  const classRows = summary.classes
    .map((c) => `<tr><td>${escapeHtml(c.name)}</td><td>${escapeHtml(c.status)}</td><td class="number">${number(c.labelled)}</td></tr>`)
    .join('\n');
  const runRows = runs
    .map(
      (r) =>
        `<tr><td><a href="${escapeHtml(commandUri('graphCurator.openReviewPanel', { folder, runId: r.runId }))}">${escapeHtml(r.slice)}</a></td><td>${escapeHtml(r.createdAt.slice(0, 16).replace('T', ' '))}</td><td>${escapeHtml(r.settings.model)}</td><td class="number">${number(r.counts.rejected)} / ${number(r.counts.scored)}</td></tr>`,
    )
    .join('\n');
  const candidateRows = (latestCandidates?.candidates ?? [])
    .slice(0, 20)
    .map(
      (c) =>
        `<tr><td><a href="${escapeHtml(commandUri('graphCurator.openCandidate', { folder, runId: latestCandidates!.runId, candidateId: c.id }))}">${escapeHtml(c.id)}</a></td><td class="number">${number(c.size)}</td><td>${escapeHtml(c.topTerms.join(', '))}</td></tr>`,
    )
    .join('\n');
  const body = `
<h1>${escapeHtml(summary.name)}</h1>
<p class="muted">${number(summary.nodeCount)} nodes, ${number(summary.edgeCount)} edges, ${summary.slices.length} slices by ${escapeHtml(summary.granularity)}; ${number(summary.labelledCount)} labelled (${(100 * (1 - summary.unlabelledShare)).toFixed(1)}%). Features: ${escapeHtml(summary.featureSource)} (${summary.featureDim}).</p>
<div class="actions">
<a href="${escapeHtml(commandUri('graphCurator.scoreSlice', { folder }))}">Score a Slice…</a>
${runs.length > 0 ? `<a href="${escapeHtml(commandUri('graphCurator.openReviewPanel', { folder, runId: (runs.find((r) => r.files.candidates) ?? runs[0]).runId }))}">Review Candidates</a>` : ''}
<a href="${escapeHtml(commandUri('graphCurator.validateDataset', { folder }))}">Validate</a>
</div>
<h2>Classes</h2>
<table><thead><tr><th>Class</th><th>Status</th><th class="number">Labels</th></tr></thead><tbody>
${classRows || '<tr><td class="muted" colspan="3">No classes yet.</td></tr>'}
</tbody></table>
<h2>Latest runs</h2>
${runs.length > 0 ? `<table><thead><tr><th>Slice</th><th>Scored at</th><th>Model</th><th class="number">Rejected</th></tr></thead><tbody>\n${runRows}\n</tbody></table>` : '<p class="muted">No runs yet: score a slice to find candidate classes.</p>'}
${latestCandidates ? `<h2>Candidates of ${escapeHtml(latestCandidates.slice)}</h2>\n<table><thead><tr><th>Candidate</th><th class="number">Nodes</th><th>Top terms</th></tr></thead><tbody>\n${candidateRows || '<tr><td class="muted" colspan="3">None.</td></tr>'}\n</tbody></table>` : ''}
<h2>Slices</h2>
<table><thead><tr><th>Slice</th><th class="number">Nodes</th><th class="number">Edges</th><th class="number">Labelled</th></tr></thead><tbody>
${sliceRows}
</tbody></table>
`;
  return page(body, parts);
}
