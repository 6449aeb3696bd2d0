// What the host keeps in workspace state for the review panel: which run the panel shows (so the
// serializer can restore it after a reload) and each run's session (pending decisions with undo
// and redo), the copy that survives when the run folder cannot be written (Restricted Mode).

export interface ReviewTarget {
  /** Absolute dataset folder. */
  folder: string;
  runId: string;
}

export const reviewPanelStateKey = 'graphCurator.reviewPanel';

export function reviewSessionStateKey(folder: string, runId: string): string {
  return `graphCurator.reviewSession:${folder}:${runId}`;
}

export function isReviewTarget(value: unknown): value is ReviewTarget {
  if (typeof value !== 'object' || value === null) return false;
  const target = value as Partial<ReviewTarget>;
  return (
    typeof target.folder === 'string' &&
    target.folder.length > 0 &&
    typeof target.runId === 'string' &&
    /^[A-Za-z0-9._-]+$/.test(target.runId)
  );
}
