// Terminal lines describing candidate classes: what a curator reads first.
import type { CandidatesFile } from '../engine/pipeline/candidatesFile';

export function formatCandidateLines(file: CandidatesFile, limit = 10): string[] {
  if (file.candidates.length === 0) return [`no candidate classes among ${file.rejectedCount} rejected nodes`];
  const lines = [
    `${file.candidates.length} candidate class${file.candidates.length === 1 ? '' : 'es'} among ${file.rejectedCount} rejected nodes (k chosen by silhouette: ${file.chosenK}; ${file.scattered.length} scattered):`,
  ];
  for (const c of file.candidates.slice(0, limit)) {
    const terms = c.topTerms
      .slice(0, 6)
      .map((t) => t.term)
      .join(', ');
    const first = c.sliceCounts.find((s) => s.count > 0)?.slice ?? '?';
    const near = c.nearestKnownClass ? `nearest known class ${c.nearestKnownClass.className}` : 'no known class near';
    lines.push(
      `  ${c.id}  ${String(c.size).padStart(5)} nodes  first seen ${first}  terms: ${terms}  (${near}${c.looksLikeDrift ? `; looks like drift of ${c.driftTowards ?? 'a known class'}` : ''})`,
    );
  }
  if (file.candidates.length > limit) lines.push(`  … and ${file.candidates.length - limit} more`);
  return lines;
}
