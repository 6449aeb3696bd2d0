// What the Datasets tree shows under one dataset, built from the worker's overview (summary, runs,
// newest candidates). vscode-free: the tree provider turns these nodes into TreeItems.
import type { DatasetOverview } from '../protocol/worker';

export const openCandidateCommandId = 'graphCurator.openCandidate';
export const openRunCommandId = 'graphCurator.openReviewPanel';

export type TreeNodeKind = 'dataset' | 'group' | 'slice' | 'class' | 'run' | 'candidate' | 'message';

export interface TreeNodeModel {
  /** Unique in the tree and stable across refreshes (VS Code keeps expansion state by id). */
  id: string;
  kind: TreeNodeKind;
  /** The dataset folder, on dataset nodes: commands run from the node's context menu read it. */
  folder?: string;
  label: string;
  description?: string;
  tooltip?: string;
  children?: TreeNodeModel[];
  command?: { command: string; title: string; arguments: unknown[] };
}

const count = (n: number, noun: string) => `${n.toLocaleString('en-US')} ${noun}${n === 1 ? '' : 's'}`;
/** Candidates listed at most; the review panel has them all. */
export const listedCandidates = 50;

export function datasetChildren(folder: string, overview: DatasetOverview): TreeNodeModel[] {
  const { summary, runs, latestCandidates } = overview;
  const key = (suffix: string) => `${folder}#${suffix}`;
  const slices: TreeNodeModel = {
    id: key('slices'),
    kind: 'group',
    label: 'Slices',
    description: `${summary.slices.length}`,
    // Newest first, as the score command lists them.
    children: [...summary.slices].reverse().map((slice) => ({
      id: key(`slice:${slice.key}`),
      kind: 'slice',
      label: slice.key,
      description: `${count(slice.nodes, 'node')}, ${slice.labelled.toLocaleString('en-US')} labelled`,
      tooltip: `${slice.key}: ${count(slice.nodes, 'node')}, ${count(slice.edges, 'edge')}, ${slice.labelled} labelled`,
    })),
  };
  const classes: TreeNodeModel = {
    id: key('classes'),
    kind: 'group',
    label: 'Classes',
    description: `${summary.classes.length}`,
    children: summary.classes.map((c) => ({
      id: key(`class:${c.name}`),
      kind: 'class',
      label: c.name,
      description: `${count(c.labelled, 'label')}${c.status === 'active' ? '' : ` (${c.status})`}`,
    })),
  };
  const groups = [slices, classes];
  if (runs.length > 0) {
    groups.push({
      id: key('runs'),
      kind: 'group',
      label: 'Runs',
      description: `${runs.length}`,
      children: runs.map((run) => ({
        id: key(`run:${run.runId}`),
        kind: 'run',
        label: run.slice,
        description: `${run.counts.rejected}/${run.counts.scored} rejected · ${run.settings.model} · ${run.createdAt.slice(0, 16).replace('T', ' ')}`,
        tooltip: `run ${run.runId}\nsettings ${run.settingsHash}`,
        command: { command: openRunCommandId, title: 'Open Review Panel', arguments: [{ folder, runId: run.runId }] },
      })),
    });
  }
  if (latestCandidates) {
    const { runId, slice, candidates } = latestCandidates;
    const shown = candidates.slice(0, listedCandidates);
    groups.push({
      id: key(`candidates:${runId}`),
      kind: 'group',
      label: 'Candidates',
      description: `${candidates.length} in ${slice}`,
      tooltip: `candidate classes of run ${runId}`,
      children: [
        ...shown.map((c) => ({
          id: key(`candidate:${runId}:${c.id}`),
          kind: 'candidate' as const,
          label: c.topTerms.slice(0, 3).join(', ') || c.id,
          description: `${count(c.size, 'node')}${c.looksLikeDrift ? ' · drift?' : ''}`,
          tooltip: `${c.id}: ${c.topTerms.join(', ')}`,
          command: { command: openCandidateCommandId, title: 'Review Candidate', arguments: [{ folder, runId, candidateId: c.id }] },
        })),
        ...(candidates.length > shown.length
          ? [
              {
                id: key(`candidates:${runId}:more`),
                kind: 'message' as const,
                label: `… ${candidates.length - shown.length} more in the review panel`,
              },
            ]
          : []),
      ],
    });
  } else if (runs.length === 0) {
    groups.push({ id: key('no-runs'), kind: 'message', label: 'No runs yet: score a slice to find candidates' });
  }
  return groups;
}

export function datasetDescription(overview: DatasetOverview): string {
  return `${count(overview.summary.nodeCount, 'node')}, ${count(overview.summary.slices.length, 'slice')}`;
}
