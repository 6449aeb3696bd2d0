// Shape checks for decisions read back from a saved session (a file in the run folder or the
// webview's state): both can be edited or damaged, so nothing is trusted before it is checked.
import type { Decision, DecisionKind } from '../engine/decisions/types';

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}
const isName = (value: unknown): value is string => typeof value === 'string' && value.length > 0;
const isNameList = (value: unknown, minimum: number): value is string[] =>
  Array.isArray(value) && value.length >= minimum && value.every(isName);

const kindChecks: { [K in DecisionKind]: (d: Record<string, unknown>) => boolean } = {
  'name-new-class': (d) => isName(d.candidateId) && isNameList(d.members, 1) && isName(d.className) && typeof d.description === 'string',
  'merge-into-class': (d) => isName(d.candidateId) && isNameList(d.members, 1) && isName(d.className),
  'move-members': (d) =>
    isNameList(d.members, 1) && isName(d.className) && (d.description === undefined || typeof d.description === 'string'),
  'merge-classes': (d) => isName(d.from) && isName(d.into),
  'merge-candidates': (d) => isNameList(d.candidateIds, 2) && isName(d.resultId),
  'split-candidate': (d) =>
    isName(d.candidateId) && Array.isArray(d.parts) && d.parts.length >= 2 && d.parts.every((part) => isNameList(part, 1)),
  dismiss: (d) => isName(d.candidateId),
  skip: (d) => isName(d.candidateId),
  'keep-label': (d) => isName(d.node),
};

/** Why `value` is not a decision, or null when it is one. */
export function decisionProblem(value: unknown): string | null {
  if (!isRecord(value)) return 'is not an object';
  if (!isName(value.id)) return 'has no id';
  if (typeof value.madeAt !== 'string' || Number.isNaN(Date.parse(value.madeAt))) return `(${value.id}) has no ISO-8601 madeAt time`;
  if (value.note !== undefined && typeof value.note !== 'string') return `(${value.id}) has a note that is not text`;
  if (typeof value.kind !== 'string' || !Object.prototype.hasOwnProperty.call(kindChecks, value.kind))
    return `(${value.id}) has unknown kind ${JSON.stringify(value.kind)}`;
  return kindChecks[value.kind as DecisionKind](value) ? null : `(${value.id}) is a malformed "${value.kind}" decision`;
}

export function isDecision(value: unknown): value is Decision {
  return decisionProblem(value) === null;
}
