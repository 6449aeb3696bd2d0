// The whole review state as the webview receives it (ReviewSnapshot in src/protocol/webview.ts),
// built from the session after every change.
import type { Decision } from '../engine/decisions/types';
import {
  nodeTextCap,
  type CandidateView,
  type ClassView,
  type PendingDecisionView,
  type ReviewSnapshot,
  type ThresholdPreviewResult,
} from '../protocol/webview';
import { neighbourhoodOf } from './neighbourhood';
import type { ReviewSession } from './reviewSession';
import { buildSecondLookView } from './secondLookView';

const queueTermCount = 3;
const round = (value: number, digits = 4) => Math.round(value * 10 ** digits) / 10 ** digits;
const clip = (text: string) => (text.length > nodeTextCap ? `${text.slice(0, nodeTextCap - 1)}…` : text);
const plural = (count: number, word: string) => `${count} ${word}${count === 1 ? '' : 's'}`;

export function describeDecision(decision: Decision): string {
  switch (decision.kind) {
    case 'name-new-class':
      return `name ${decision.candidateId} as new class "${decision.className}" (${plural(decision.members.length, 'node')})`;
    case 'merge-into-class':
      return `merge ${decision.candidateId} into "${decision.className}" (${plural(decision.members.length, 'node')})`;
    case 'move-members':
      return `move ${plural(decision.members.length, 'node')} to ${decision.description !== undefined ? 'new class ' : ''}"${decision.className}"`;
    case 'merge-classes':
      return `merge class "${decision.from}" into "${decision.into}"`;
    case 'merge-candidates':
      return `merge candidates ${decision.candidateIds.join(', ')} → ${decision.resultId}`;
    case 'split-candidate':
      return `split ${decision.candidateId} into ${decision.parts.length} parts (${decision.parts.map((p) => p.length).join(' + ')})`;
    case 'dismiss':
      return `dismiss ${decision.candidateId} as noise`;
    case 'skip':
      return `skip ${decision.candidateId}`;
    case 'keep-label':
      return `keep the label of ${decision.node}`;
  }
}

export function buildSnapshot(
  session: ReviewSession,
  threshold: ThresholdPreviewResult | null = null,
  previewsOff?: string,
): ReviewSnapshot {
  const { context } = session;
  const classes: ClassView[] = session.classes().map((c, index) => ({ name: c.name, colour: index, status: c.status }));
  const classIndex = new Map(classes.map((c, index) => [c.name, index]));
  const queue = session.queue().map(({ candidate, status, skips }) => ({
    id: candidate.id,
    size: candidate.members.length,
    status,
    skips,
    topTerms: candidate.topTerms.slice(0, queueTermCount).map((t) => t.term),
    meanNovelty: round(candidate.meanNovelty),
    looksLikeDrift: candidate.looksLikeDrift,
    ...(session.isApplied(candidate.id) ? { applied: true } : {}),
  }));
  const pending: PendingDecisionView[] = session.pendingDecisions().map((d) => ({ id: d.id, kind: d.kind, summary: describeDecision(d) }));
  let current: CandidateView | null = null;
  const candidate = session.current;
  if (candidate) {
    const hood = neighbourhoodOf(context.adjacency, candidate.members);
    const pendingIndex = (node: number) => {
      const name = session.pendingLabelOf(node);
      return name === undefined ? -1 : (classIndex.get(name) ?? -1);
    };
    current = {
      id: candidate.id,
      size: candidate.members.length,
      status: session.currentStatus ?? 'open',
      topTerms: candidate.topTerms.map((t) => ({ term: t.term, weight: round(t.weight, 5) })),
      sliceCounts: candidate.sliceCounts.map((s) => ({ ...s })),
      nearestMembers: candidate.nearestMembers.map((m) => ({
        id: context.nodeIds[m.node],
        text: clip(m.text),
        distance: round(m.distance),
      })),
      neighbourClasses: candidate.neighbourClasses.map((c) => ({ ...c })),
      meanNovelty: round(candidate.meanNovelty),
      cohesion: candidate.cohesion === null ? null : round(candidate.cohesion),
      looksLikeDrift: candidate.looksLikeDrift,
      driftTowards: candidate.driftTowards,
      graph: {
        memberCount: hood.memberCount,
        nodes: {
          ids: hood.nodes.map((n) => context.nodeIds[n]),
          texts: hood.nodes.map((n) => clip(context.nodeText[n])),
          label: hood.nodes.map((n) => context.labels[n]),
          predicted: hood.nodes.map((n) => context.predictedClass[n]),
          pending: hood.nodes.map(pendingIndex),
          novelty: hood.nodes.map((n) => round(context.novelty[n])),
        },
        source: hood.source,
        target: hood.target,
        totalEdges: hood.totalEdges,
        truncated: hood.source.length < hood.totalEdges,
      },
    };
  }
  const secondLook = buildSecondLookView(session);
  return {
    dataset: context.dataset,
    slice: context.slice,
    runId: context.runId,
    classes,
    queue,
    current,
    pending,
    canUndo: session.canUndo,
    canRedo: session.canRedo,
    threshold,
    ...(previewsOff ? { previewsOff } : {}),
    ...(secondLook ? { secondLook } : {}),
  };
}
