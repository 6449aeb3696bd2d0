import * as assert from 'node:assert/strict';
import Graph from 'graphology';
import { karateClub } from 'graphology-generators/social';
import { buildAdjacency } from '../../src/engine/graph/csr';
import { rejectedAmong, type PrefixFit } from '../../src/engine/pipeline/modelOnPrefix';
import type { RunSettings } from '../../src/engine/pipeline/runSettings';
import { docMargin, docThresholds } from '../../src/engine/scoring/docThresholds';
import { smoothNovelty } from '../../src/engine/scoring/smoothing';
import { SeededRandom } from '../../src/engine/util/random';
import { createThresholdPreviewer, thresholdSettingOf, type ThresholdPreviewInput } from '../../src/review/thresholdPreview';
import type { ThresholdSetting } from '../../src/protocol/webview';

// Zachary's karate club (34 members, 78 ties; Zachary 1977, as shipped by graphology-generators)
// as the graph; the model outputs on it are seeded random numbers.
function karateInput(): ThresholdPreviewInput {
  const graph = karateClub(Graph);
  const index = new Map(graph.nodes().map((node, i) => [node, i]));
  const source: number[] = [];
  const target: number[] = [];
  graph.forEachEdge((_e, _a, s, t) => {
    source.push(index.get(s)!);
    target.push(index.get(t)!);
  });
  assert.equal(source.length, 78, 'karate club has 78 ties (Zachary 1977)');
  const adjacency = buildAdjacency(34, { source: Int32Array.from(source), target: Int32Array.from(target), weight: null, count: 78 }, true);
  const random = new SeededRandom(3);
  const classCount = 3;
  const probabilities = Float32Array.from({ length: 34 * classCount }, () => random.next());
  // Nodes 0..19 are "training" nodes of class node % 3 with a high output for it.
  const trainNodes = Int32Array.from({ length: 20 }, (_, i) => i);
  const trainClasses = Int32Array.from(trainNodes, (n) => n % classCount);
  for (const n of trainNodes) probabilities[n * classCount + (n % classCount)] = 0.6 + 0.4 * random.next();
  return {
    novelty: {
      kind: 'doc',
      probabilities,
      classCount,
      thresholdFit: { probabilities, rows: trainNodes, classes: trainClasses, scale: 'std' },
    },
    noveltyMethod: 'doc',
    adjacency,
    smoothingRounds: 2,
    scoredNodes: Int32Array.from({ length: 14 }, (_, i) => 20 + i),
    candidates: [Int32Array.of(20, 21, 22, 23), Int32Array.of(30, 31, 32, 33)],
    minCandidateSize: 2,
  };
}

function recompute(input: ThresholdPreviewInput, setting: ThresholdSetting): Uint8Array {
  if (input.novelty.kind !== 'doc') throw new Error('doc only');
  const { probabilities, classCount, thresholdFit } = input.novelty;
  const thresholds = docThresholds(probabilities, classCount, thresholdFit.rows, thresholdFit.classes, setting.alpha);
  const smoothed = smoothNovelty(docMargin(probabilities, classCount, thresholds), input.adjacency, setting.lambda, input.smoothingRounds);
  const rule = { rejectQuantile: setting.mode === 'quantile' ? setting.quantile : null, noveltyMethod: 'doc' } as RunSettings;
  return rejectedAmong({ noveltySmoothed: smoothed } as PrefixFit, rule, input.scoredNodes);
}

describe('review/thresholdPreview', () => {
  it('counts the same rejected nodes as the scoring functions, for every α and λ tried, in any order', () => {
    const input = karateInput();
    const preview = createThresholdPreviewer(input);
    const settings: ThresholdSetting[] = [];
    for (const alpha of [0.5, 1, 2, 3, 6])
      for (const lambda of [0, 0.3, 0.5, 0.9]) settings.push({ mode: 'alpha', alpha, quantile: 0.1, lambda });
    // Back and forth, so that a stale cache would show.
    const order = [...settings, ...settings.slice().reverse(), settings[3], settings[17], settings[3]];
    const counts = new Set<number>();
    for (const setting of order) {
      const flags = recompute(input, setting);
      const expected = flags.reduce((s, f) => s + f, 0);
      const result = preview(setting);
      assert.equal(result.rejected, expected, JSON.stringify(setting));
      assert.equal(result.scored, 14);
      const inCandidate = new Set([20, 21, 22, 23, 30, 31, 32, 33]);
      const ungrouped = Array.from(input.scoredNodes).filter((n, i) => flags[i] && !inCandidate.has(n)).length;
      assert.equal(result.ungroupedRejected, ungrouped);
      const kept = input.candidates!.filter((m) => Array.from(m).filter((n) => flags[input.scoredNodes.indexOf(n)]).length >= 2).length;
      assert.equal(result.candidatesKept, kept);
      counts.add(expected);
    }
    assert.ok(counts.size >= 3, `the settings tried should give different counts, got ${[...counts].join(', ')}`);
  });

  it('reports each named candidate: how many of its members stay rejected, and whether it would remain', () => {
    const input = { ...karateInput(), candidateIds: ['first', 'second'] };
    const preview = createThresholdPreviewer(input);
    const seen = new Set<string>();
    for (const alpha of [0.5, 1, 2, 3, 6])
      for (const lambda of [0, 0.5]) {
        const setting: ThresholdSetting = { mode: 'alpha', alpha, quantile: 0.1, lambda };
        const flags = recompute(input, setting);
        const result = preview(setting);
        const expected = input.candidates!.map((members, c) => {
          const stillRejected = Array.from(members).filter((n) => flags[input.scoredNodes.indexOf(n)]).length;
          return { id: input.candidateIds[c], members: 4, stillRejected, kept: stillRejected >= 2 };
        });
        assert.deepEqual(result.candidates, expected, JSON.stringify(setting));
        assert.equal(result.candidatesKept, expected.filter((c) => c.kept).length);
        seen.add(expected.map((c) => c.stillRejected).join('/'));
      }
    assert.ok(seen.size >= 2, `the settings tried should change the candidates' counts, got ${[...seen].join(', ')}`);
    // Without ids the preview reports counts only.
    assert.equal(createThresholdPreviewer(karateInput())({ mode: 'alpha', alpha: 3, quantile: 0.1, lambda: 0.5 }).candidates, undefined);
  });

  it('rejects no more nodes as α grows (thresholds max(0.5, 1 − ασ) only fall) without smoothing', () => {
    const preview = createThresholdPreviewer(karateInput());
    let previous = Infinity;
    for (const alpha of [0, 0.25, 0.5, 1, 2, 4, 8]) {
      const { rejected } = preview({ mode: 'alpha', alpha, quantile: 0.1, lambda: 0 });
      assert.ok(rejected <= previous, `α = ${alpha}: ${rejected} > ${previous}`);
      previous = rejected;
    }
  });

  it('quantile mode rejects round(q · n) nodes, the same ones the pipeline picks', () => {
    const input = karateInput();
    const preview = createThresholdPreviewer(input);
    for (const quantile of [0, 0.1, 0.25, 0.5, 1]) {
      const setting: ThresholdSetting = { mode: 'quantile', alpha: 3, quantile, lambda: 0.5 };
      const result = preview(setting);
      assert.equal(result.rejected, Math.round(quantile * 14));
      assert.equal(
        result.rejected,
        recompute(input, setting).reduce((s, f) => s + f, 0),
      );
    }
  });

  it('fixed novelty (max-softmax or energy) ignores α', () => {
    const input = karateInput();
    const raw = Float32Array.from({ length: 34 }, (_, i) => (i * 7) % 5);
    const preview = createThresholdPreviewer({ ...input, novelty: { kind: 'fixed', noveltyRaw: raw }, noveltyMethod: 'msp' });
    const a = preview({ mode: 'quantile', alpha: 1, quantile: 0.3, lambda: 0.2 });
    const b = preview({ mode: 'quantile', alpha: 5, quantile: 0.3, lambda: 0.2 });
    assert.equal(a.rejected, b.rejected);
    assert.equal(a.ungroupedRejected, b.ungroupedRejected);
  });

  it('refuses scores that do not match the graph, and reads a run’s setting', () => {
    const input = karateInput();
    assert.throws(
      () => createThresholdPreviewer({ ...input, novelty: { kind: 'fixed', noveltyRaw: new Float32Array(5) } }),
      /5 scored rows for a graph of 34 nodes/,
    );
    const base = { alpha: 2, smoothingWeight: 0.4, rejectQuantile: null, noveltyMethod: 'doc' } as RunSettings;
    assert.deepEqual(thresholdSettingOf(base), { mode: 'alpha', alpha: 2, quantile: 0.1, lambda: 0.4 });
    assert.equal(thresholdSettingOf({ ...base, rejectQuantile: 0.2 }).mode, 'quantile');
  });
});
