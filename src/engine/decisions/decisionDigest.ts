// A digest that identifies one decision of one run, so that applying the same decisions file
// again (or a later export of the same review, which repeats the earlier decisions) is recognised
// as a repeat rather than as a clash ("class exists already").
import { createHash } from 'node:crypto';
import type { Decision, DecisionsFile } from './types';

/** Canonical JSON: object keys sorted, so that key order in the file does not matter. */
function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  if (typeof value === 'object' && value !== null) {
    const keys = Object.keys(value).sort();
    return `{${keys.map((k) => `${JSON.stringify(k)}:${canonicalJson((value as Record<string, unknown>)[k])}`).join(',')}}`;
  }
  return JSON.stringify(value);
}

export function decisionDigest(file: Pick<DecisionsFile, 'dataset' | 'runId'>, decision: Decision): string {
  return createHash('sha256')
    .update(canonicalJson({ dataset: file.dataset, runId: file.runId, decision }))
    .digest('hex');
}
