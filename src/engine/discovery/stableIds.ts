// Stable candidate identity across runs, so that a curator's decision stays with "the same"
// group after a retrain. A new group that overlaps an earlier candidate with Jaccard ≥ 0.5 takes
// its id and decision (best overlaps matched first, each earlier candidate used once). Others get
// a fresh id derived from their members, never one that the earlier run used.
// Node indices must mean the same nodes in both runs (new slices append nodes, so they do).

export interface IdentifiedGroup {
  id: string;
  decision?: unknown;
}

export interface PreviousGroup {
  id: string;
  members: ArrayLike<number>;
  decision?: unknown;
}

export const sameCandidateJaccard = 0.5;

/** FNV-1a over the member indices, two differently seeded 32-bit lanes → 12 hex digits. */
export function memberHash(members: ArrayLike<number>): string {
  const sorted = Int32Array.from(members).sort();
  let h1 = 0x811c9dc5;
  let h2 = 0x050c5d1f;
  for (let i = 0; i < sorted.length; i++) {
    let v = sorted[i] >>> 0;
    for (let byte = 0; byte < 4; byte++) {
      const b = v & 0xff;
      v >>>= 8;
      h1 = Math.imul(h1 ^ b, 0x01000193) >>> 0;
      h2 = Math.imul(h2 ^ b, 0x01000193) >>> 0;
    }
  }
  return (h1.toString(16).padStart(8, '0') + h2.toString(16).padStart(8, '0')).slice(0, 12);
}

/** Ids (and carried decisions) for the new groups, in their order. */
export function assignStableIds(groups: ArrayLike<number>[], previous: PreviousGroup[] | undefined): IdentifiedGroup[] {
  const result: (IdentifiedGroup | null)[] = groups.map(() => null);
  const usedIds = new Set<string>((previous ?? []).map((p) => p.id));
  if (previous && previous.length > 0) {
    // Candidates of one run are disjoint, so each node points to at most one earlier candidate.
    const previousOfNode = new Map<number, number>();
    previous.forEach((p, index) => {
      for (let m = 0; m < p.members.length; m++) previousOfNode.set(p.members[m], index);
    });
    const pairs: { group: number; earlier: number; jaccard: number }[] = [];
    groups.forEach((members, group) => {
      const overlap = new Map<number, number>();
      for (let m = 0; m < members.length; m++) {
        const earlier = previousOfNode.get(members[m]);
        if (earlier !== undefined) overlap.set(earlier, (overlap.get(earlier) ?? 0) + 1);
      }
      for (const [earlier, shared] of overlap) {
        const jaccard = shared / (members.length + previous[earlier].members.length - shared);
        if (jaccard >= sameCandidateJaccard) pairs.push({ group, earlier, jaccard });
      }
    });
    pairs.sort((x, y) => y.jaccard - x.jaccard || x.group - y.group || x.earlier - y.earlier);
    const earlierTaken = new Uint8Array(previous.length);
    for (const { group, earlier } of pairs) {
      if (result[group] || earlierTaken[earlier]) continue;
      earlierTaken[earlier] = 1;
      const match = previous[earlier];
      result[group] = match.decision === undefined ? { id: match.id } : { id: match.id, decision: match.decision };
    }
  }
  return groups.map((members, group) => {
    const matched = result[group];
    if (matched) return matched;
    const base = 'cand-' + memberHash(members);
    let id = base;
    for (let suffix = 2; usedIds.has(id); suffix++) id = `${base}-${suffix}`;
    usedIds.add(id);
    return { id };
  });
}
