// candidates.json: the candidate new classes of one run, by node id, as `graph-curator discover`
// writes them and the review panel reads them. Documented in the README ("Candidates").
import { promises as fs } from 'node:fs';
import type { Dataset } from '../dataset/types';
import type { Candidate, DiscoveryResult } from '../discovery';

export interface CandidateRecord {
  id: string;
  size: number;
  members: string[];
  sliceCounts: { slice: string; count: number }[];
  topTerms: { term: string; weight: number }[];
  nearestMembers: { id: string; distance: number; text: string }[];
  neighbourClasses: { className: string; count: number }[];
  edgesToClasses: { className: string; edges: number }[];
  cohesion: number;
  internalEdgeDensity: number;
  meanNovelty: number;
  nearestKnownClass: { className: string; distance: number } | null;
  looksLikeDrift: boolean;
  driftTowards: string | null;
  decision?: unknown;
}

export interface CandidatesFile {
  format: 'graph-curator-candidates';
  version: 1;
  dataset: string;
  runId: string | null;
  slice: string;
  /** Where the novelty scores came from: "run" or the external scores file. */
  scoresSource: string;
  rejectedCount: number;
  chosenK: number;
  silhouetteByK: { k: number; silhouette: number }[];
  scattered: string[];
  candidates: CandidateRecord[];
}

/** Converts discovery output (node indices of `nodeOf` space) to a file of node ids. */
export function candidatesFileOf(
  dataset: Dataset,
  result: DiscoveryResult,
  globalOf: (node: number) => number,
  meta: { runId: string | null; slice: string; scoresSource: string; rejectedCount: number },
): CandidatesFile {
  const idOf = (node: number) => dataset.nodeIds[globalOf(node)];
  return {
    format: 'graph-curator-candidates',
    version: 1,
    dataset: dataset.manifest.name,
    runId: meta.runId,
    slice: meta.slice,
    scoresSource: meta.scoresSource,
    rejectedCount: meta.rejectedCount,
    chosenK: result.chosenK,
    silhouetteByK: result.silhouetteByK,
    scattered: Array.from(result.scattered, idOf),
    candidates: result.candidates.map((c: Candidate) => ({
      id: c.id,
      size: c.size,
      members: Array.from(c.members, idOf),
      sliceCounts: c.sliceCounts,
      topTerms: c.topTerms,
      nearestMembers: c.nearestMembers.map((m) => ({ id: idOf(m.node), distance: m.distance, text: m.text })),
      neighbourClasses: c.neighbourClasses,
      edgesToClasses: c.edgesToClasses,
      cohesion: c.cohesion,
      internalEdgeDensity: c.internalEdgeDensity,
      meanNovelty: c.meanNovelty,
      nearestKnownClass: c.nearestKnownClass,
      looksLikeDrift: c.looksLikeDrift,
      driftTowards: c.driftTowards,
      ...(c.decision === undefined ? {} : { decision: c.decision }),
    })),
  };
}

/** Earlier candidates as discovery's `previous` input (members mapped into the current node space; unknown ids dropped). */
export function previousCandidatesOf(file: CandidatesFile, dataset: Dataset, localOf: (global: number) => number): Candidate[] {
  return file.candidates.map((c) => {
    const members = c.members
      .map((id) => dataset.indexOfId.get(id))
      .filter((g): g is number => g !== undefined)
      .map(localOf)
      .filter((l) => l >= 0)
      .sort((a, b) => a - b);
    return {
      ...c,
      members: Int32Array.from(members),
      size: members.length,
      nearestMembers: [],
    };
  });
}

export async function readCandidatesFile(filePath: string): Promise<CandidatesFile | null> {
  try {
    const parsed = JSON.parse(await fs.readFile(filePath, 'utf8')) as CandidatesFile;
    return parsed.format === 'graph-curator-candidates' ? parsed : null;
  } catch {
    return null;
  }
}
