// The second-look queues as the webview draws them (SecondLookView in src/protocol/webview.ts):
// the engine's items in its ranking, each with what the pending decisions say about its node.
// An item's status is read from the decisions every time, never stored, so undo, redo and a
// restored session show the same thing as the decisions themselves.
import type { Decision } from '../engine/decisions/types';
import type { ClassOutput, DoubtfulLabel, LabelSuggestion } from '../engine/secondLook/reportTypes';
import type { SecondLookItemStatus, SecondLookItemView, SecondLookQueueView, SecondLookView } from '../protocol/webview';
import type { ReviewSession } from './reviewSession';

/** Longest node text sent per item: a row shows one line of it. */
export const secondLookTextCap = 240;

const clip = (text: string) => (text.length > secondLookTextCap ? `${text.slice(0, secondLookTextCap - 1)}…` : text);
const plural = (count: number, word: string) => `${count} ${word}${count === 1 ? '' : 's'}`;
const outputsText = (outputs: ClassOutput[]) => outputs.map((o) => `${o.className} ${o.output.toFixed(2)}`).join(', ');

/** The last pending decision on each node that settles a second-look item. */
export function settledNodes(
  decisions: readonly Decision[],
): Map<string, { status: Exclude<SecondLookItemStatus, 'open'>; decisionId: string }> {
  const settled = new Map<string, { status: Exclude<SecondLookItemStatus, 'open'>; decisionId: string }>();
  for (const decision of decisions) {
    switch (decision.kind) {
      case 'keep-label':
        settled.set(decision.node, { status: 'kept', decisionId: decision.id });
        break;
      case 'move-members':
      case 'name-new-class':
      case 'merge-into-class':
        for (const node of decision.members) settled.set(node, { status: 'changed', decisionId: decision.id });
        break;
      default:
        break;
    }
  }
  return settled;
}

export function doubtEvidence(entry: DoubtfulLabel): string {
  const neighbours =
    entry.neighbourDisagreement === null
      ? 'no labelled neighbours'
      : `${Math.round(entry.neighbourDisagreement * 100)}% of labelled neighbours disagree`;
  return [
    `margin ${entry.selfConfidenceMargin.toFixed(2)}`,
    neighbours,
    entry.confidentLearning ? 'off the confident joint’s diagonal' : null,
    `outputs ${outputsText(entry.outputs)}`,
  ]
    .filter((part) => part !== null)
    .join(' · ');
}

export function suggestionEvidence(entry: LabelSuggestion): string {
  return [
    `uncertainty ${entry.uncertainty.toFixed(2)}`,
    plural(entry.unlabelledNeighbours, 'unlabelled neighbour'),
    `outputs ${outputsText(entry.outputs)}`,
  ].join(' · ');
}

export function buildSecondLookView(session: ReviewSession): SecondLookView | null {
  const queues = session.secondLookQueues;
  if (!queues) return null;
  const { context } = session;
  const settled = settledNodes(session.pendingDecisions());
  const item = (
    entry: { rank: number; node: string; slice: string },
    currentLabel: string | null,
    suggestedLabel: string,
    score: number,
    evidence: string,
  ): SecondLookItemView | null => {
    const index = session.nodeIndexOf(entry.node);
    // A node removed from nodes.csv since the queues were computed has nothing left to decide.
    if (index === undefined) return null;
    const decided = settled.get(entry.node);
    return {
      rank: entry.rank,
      node: entry.node,
      text: clip(context.nodeText[index]),
      slice: entry.slice,
      currentLabel,
      suggestedLabel,
      score,
      evidence,
      status: decided?.status ?? 'open',
      pendingLabel: session.pendingLabelOf(index) ?? null,
      decisionId: decided?.decisionId ?? null,
    };
  };
  const present = (items: (SecondLookItemView | null)[]) => items.filter((i): i is SecondLookItemView => i !== null);
  const queueView = (
    kind: SecondLookQueueView['kind'],
    slice: string,
    summary: string,
    problem: string | undefined,
    items: SecondLookItemView[],
  ): SecondLookQueueView => ({
    kind,
    slice,
    summary,
    problem: problem ?? null,
    items,
    openCount: items.filter((i) => i.status === 'open').length,
  });

  const { doubts, labelNext } = queues;
  const doubtItems = present((doubts?.doubts ?? []).map((d) => item(d, d.curatedLabel, d.suggestedLabel, d.score, doubtEvidence(d))));
  const suggestionItems = present(
    (labelNext?.suggestions ?? []).map((s) => item(s, null, s.predictedLabel, s.usefulness, suggestionEvidence(s))),
  );
  return {
    computedAt: queues.computedAt,
    doubts: queueView(
      'doubts',
      doubts?.slice ?? context.slice,
      doubts
        ? `${plural(doubts.doubts.length, 'doubtful label')} of ${doubts.labelsChecked} checked in ${doubts.windowSlices.first} … ${doubts.windowSlices.last} (${doubts.folds}-fold cross-fitting)`
        : 'The curated labels could not be checked.',
      queues.problems.doubts,
      doubtItems,
    ),
    labelNext: queueView(
      'labelNext',
      labelNext?.slice ?? context.slice,
      labelNext
        ? `${plural(labelNext.suggestions.length, 'suggestion')} among ${plural(labelNext.unlabelledInSlice, 'unlabelled node')} of ${labelNext.slice}, most useful first`
        : 'No suggestions could be made.',
      queues.problems.labelNext,
      suggestionItems,
    ),
  };
}
