// After an apply, the saved review session keeps its decisions and records how many of them are
// applied, so that the review reopens with those candidates done (closed, not undoable, not
// exported again) rather than all open. Pure: the worker reads and writes the file.
import type { ReviewSessionJson } from './reviewSession';

/**
 * The saved session with the decisions up to the last of `appliedIds` marked applied (and its
 * redo list dropped: it belonged to the state before the apply). Anything that is not a session
 * with a decisions list, or holds none of the ids, is returned as it is.
 */
export function withAppliedMarked(saved: unknown, appliedIds: readonly string[]): unknown {
  if (typeof saved !== 'object' || saved === null || !Array.isArray((saved as ReviewSessionJson).decisions)) return saved;
  const json = saved as ReviewSessionJson;
  const wanted = new Set(appliedIds);
  let last = -1;
  json.decisions.forEach((decision, index) => {
    if (wanted.has((decision as { id?: unknown } | null)?.id as string)) last = index;
  });
  if (last < 0) return saved;
  return { ...json, applied: Math.max(json.applied ?? 0, last + 1), redo: [] };
}
