// How many nodes a different rejection setting would set aside, fast enough to answer every
// move of a slider. It runs the scoring path itself (src/engine/scoring and the pipeline's
// rejection rule) on the run's stored outputs, caching what a setting change leaves untouched:
// the raw novelty depends on α only, the smoothing on α and λ, the quantile cut on all three.
//
// Smoothing is linear: R rounds of s ← (1 − λ)s + λ·Ms (M = neighbour mean, identity on an
// isolated node) give Σ_k C(R, k)(1 − λ)^(R−k) λ^k M^k s. The M^k s are smoothNovelty rounds with
// λ = 1, computed once per α, so moving λ costs one pass over the nodes instead of R passes over
// the edges; values agree with smoothNovelty(s, λ, R) to float32 rounding. For DOC the score is
// the pipeline's signed margin (docMargin), refitted for each α on what the run fitted on.
import type { CsrMatrix } from '../engine/graph/csr';
import { localNodesOfSlice, rejectedAmong, thresholdsFor, type PrefixFit, type ThresholdFit } from '../engine/pipeline/modelOnPrefix';
import type { PreviewFit } from '../engine/pipeline/thresholdFitFile';
import type { NoveltyMethod, RunSettings } from '../engine/pipeline/runSettings';
import { docMargin } from '../engine/scoring/docThresholds';
import { smoothNovelty } from '../engine/scoring/smoothing';
import type { Dataset } from '../engine/dataset/types';
import type { CandidatePreview, ThresholdPreviewResult, ThresholdSetting } from '../protocol/webview';

export const defaultMinCandidateSize = 3;

export type PreviewNovelty =
  /** DOC: novelty follows the thresholds, which follow α. Probabilities are local nodes × classes. */
  | { kind: 'doc'; probabilities: Float32Array; classCount: number; thresholdFit: ThresholdFit }
  /** Max-softmax or energy scores: α plays no part. */
  | { kind: 'fixed'; noveltyRaw: Float32Array };

export interface ThresholdPreviewInput {
  novelty: PreviewNovelty;
  noveltyMethod: NoveltyMethod;
  /** The scored prefix graph (local indices), as smoothing used it. */
  adjacency: CsrMatrix;
  smoothingRounds: number;
  /** Local indices of the scored slice's nodes: the ones counted. */
  scoredNodes: Int32Array;
  /** Local member indices of each open candidate, for the candidate preview. */
  candidates?: Int32Array[];
  /** Their ids, in the same order: the preview then reports each candidate. */
  candidateIds?: string[];
  minCandidateSize?: number;
}

function binomial(n: number, k: number): number {
  let value = 1;
  for (let j = 1; j <= k; j++) value = (value * (n - k + j)) / j;
  return value;
}

export type ThresholdPreviewer = (setting: ThresholdSetting) => ThresholdPreviewResult;

export function createThresholdPreviewer(input: ThresholdPreviewInput): ThresholdPreviewer {
  const localCount = input.adjacency.rowCount;
  const minSize = input.minCandidateSize ?? defaultMinCandidateSize;
  const candidates = input.candidates ?? [];
  const inCandidate = new Uint8Array(localCount);
  for (const members of candidates) for (const node of members) inCandidate[node] = 1;
  const noveltyLength =
    input.novelty.kind === 'doc' ? input.novelty.probabilities.length / input.novelty.classCount : input.novelty.noveltyRaw.length;
  if (noveltyLength !== localCount) throw new Error(`threshold preview: ${noveltyLength} scored rows for a graph of ${localCount} nodes`);

  let rawFor: { alpha: number; powers: Float32Array[] } | null = null;
  let smoothedFor: { alpha: number; lambda: number; smoothed: Float32Array } | null = null;
  /** M^k s for k = 0..R, for the α they were computed with. */
  const rawPowers = (alpha: number): Float32Array[] => {
    const source = input.novelty;
    const key = source.kind === 'doc' ? alpha : 0;
    if (rawFor?.alpha !== key) {
      let raw: Float32Array;
      if (source.kind === 'fixed') raw = source.noveltyRaw;
      else raw = docMargin(source.probabilities, source.classCount, thresholdsFor(source.thresholdFit, source.classCount, alpha));
      const powers = [raw];
      for (let k = 1; k <= input.smoothingRounds; k++) powers.push(smoothNovelty(powers[k - 1], input.adjacency, 1, 1));
      rawFor = { alpha: key, powers };
    }
    return rawFor.powers;
  };
  const smoothed = (alpha: number, lambda: number): Float32Array => {
    const alphaKey = input.novelty.kind === 'doc' ? alpha : 0;
    if (smoothedFor?.alpha !== alphaKey || smoothedFor.lambda !== lambda) {
      const powers = rawPowers(alpha);
      const rounds = input.smoothingRounds;
      const weights = powers.map((_, k) => binomial(rounds, k) * (1 - lambda) ** (rounds - k) * lambda ** k);
      const out = new Float32Array(localCount);
      for (let i = 0; i < localCount; i++) {
        let total = 0;
        for (let k = 0; k <= rounds; k++) total += weights[k] * powers[k][i];
        out[i] = total;
      }
      smoothedFor = { alpha: alphaKey, lambda, smoothed: out };
    }
    return smoothedFor.smoothed;
  };

  return (setting) => {
    const noveltySmoothed = smoothed(setting.alpha, setting.lambda);
    // rejectedAmong reads only the fit's smoothed novelty and the settings' rejection fields.
    const rule = {
      rejectQuantile: setting.mode === 'quantile' ? setting.quantile : null,
      noveltyMethod: input.noveltyMethod,
    } as RunSettings;
    const flags = rejectedAmong({ noveltySmoothed } as PrefixFit, rule, input.scoredNodes);
    const isRejected = new Uint8Array(localCount);
    let rejected = 0;
    let ungroupedRejected = 0;
    for (let i = 0; i < flags.length; i++) {
      if (!flags[i]) continue;
      rejected++;
      const node = input.scoredNodes[i];
      isRejected[node] = 1;
      if (!inCandidate[node]) ungroupedRejected++;
    }
    let candidatesKept = 0;
    const perCandidate: CandidatePreview[] = [];
    candidates.forEach((members, c) => {
      let count = 0;
      for (const node of members) count += isRejected[node];
      if (count >= minSize) candidatesKept++;
      const id = input.candidateIds?.[c];
      if (id !== undefined) perCandidate.push({ id, members: members.length, stillRejected: count, kept: count >= minSize });
    });
    return {
      setting: { ...setting },
      rejected,
      scored: input.scoredNodes.length,
      candidatesKept,
      ungroupedRejected,
      ...(input.candidateIds ? { candidates: perCandidate } : {}),
    };
  };
}

/**
 * Preview input from the fit a run was scored with. `runCandidates` are the run's candidates with
 * their members as global node indices; nodes outside the fit's prefix are ignored.
 */
export function thresholdPreviewInputOf(
  dataset: Dataset,
  fit: PreviewFit,
  settings: Pick<RunSettings, 'noveltyMethod' | 'smoothingRounds'>,
  runCandidates: { id: string; members: ArrayLike<number> }[] = [],
): ThresholdPreviewInput {
  const classCount = fit.modelClasses.length;
  const novelty: PreviewNovelty =
    settings.noveltyMethod === 'doc'
      ? { kind: 'doc', probabilities: fit.probabilities, classCount, thresholdFit: fit.thresholdFit }
      : { kind: 'fixed', noveltyRaw: fit.noveltyRaw };
  const candidates = runCandidates.map(({ members }) =>
    Int32Array.from(Array.from(members, (g) => fit.prefix.localIndex[g]).filter((l) => l >= 0)),
  );
  return {
    novelty,
    noveltyMethod: settings.noveltyMethod,
    adjacency: fit.prefix.inputs.adjacency,
    smoothingRounds: settings.smoothingRounds,
    scoredNodes: localNodesOfSlice(dataset, fit, fit.slice),
    candidates,
    candidateIds: runCandidates.map((c) => c.id),
  };
}

/** The setting a run was scored with, as the panel's controls show it. */
export function thresholdSettingOf(settings: RunSettings): ThresholdSetting {
  return {
    mode: settings.rejectQuantile !== null || settings.noveltyMethod !== 'doc' ? 'quantile' : 'alpha',
    alpha: settings.alpha,
    quantile: settings.rejectQuantile ?? 0.1,
    lambda: settings.smoothingWeight,
  };
}
