// The curator's question on the bundled demo: in its newest slice, does each of the generator's
// two new failure modes come up as one candidate named by the mode's own words? The truth file
// and vocabularies are the generator's (our own invented scenario), so this checks the whole
// chain score → reject → group → describe, not an outside reference.
import assert from 'node:assert/strict';
import { loadDataset } from '../../src/engine/dataset/load';
import { tokenize } from '../../src/engine/discovery/ctfidf';
import { discoverForFit } from '../../src/engine/pipeline/discoverSlice';
import { readTruthFile } from '../../src/engine/pipeline/referenceLabels';
import { defaultRunSettings } from '../../src/engine/pipeline/runSettings';
import { scoreSlice } from '../../src/engine/pipeline/scoreSlice';
import { initTensorflow } from '../../src/engine/tf/backend';
import { FAILURE_MODES, SHARED_WORDS, type FailureVocabulary } from '../../demo-data/generator/scenario';
import { bundledTruth, copyDemoDataset, removeDemoCopy } from '../secondLook/demoCopy';

const wordsOf = (vocabulary: FailureVocabulary | undefined): string[] =>
  vocabulary ? Object.values(vocabulary).flatMap((phrases: string[]) => phrases.flatMap((phrase) => tokenize(phrase))) : [];

/** Words of a mode's vocabulary that no other mode's vocabulary and no shared phrase uses. */
function distinctiveWords(modeName: string): Set<string> {
  const others = new Set([
    ...FAILURE_MODES.filter((m) => m.name !== modeName).flatMap((m) => [...wordsOf(m.vocabulary), ...wordsOf(m.laterVocabulary)]),
    ...Object.values(SHARED_WORDS).flatMap((phrases) => phrases.flatMap((phrase) => tokenize(phrase))),
  ]);
  const mode = FAILURE_MODES.find((m) => m.name === modeName)!;
  return new Set(wordsOf(mode.vocabulary).filter((w) => !others.has(w)));
}

describe('discovery on the demo dataset', function () {
  this.timeout(300_000);
  let folder = '';
  before(async () => {
    await initTensorflow();
    folder = await copyDemoDataset();
  });
  after(async () => {
    if (folder) await removeDemoCopy(folder);
  });

  it('finds each new failure mode of the newest slice as one candidate whose top terms include its own words', async () => {
    const dataset = await loadDataset(folder);
    const truth = await readTruthFile(dataset, bundledTruth);
    const newest = dataset.slices.length - 1;
    const { fit, scores } = await scoreSlice(dataset, defaultRunSettings, newest);
    const file = await discoverForFit(dataset, fit, scores, defaultRunSettings, null);
    const truthOf = (id: string) => truth.classNames[truth.classOfNode[dataset.indexOfId.get(id)!]];
    const novelModes = FAILURE_MODES.filter((m) => m.novel).map((m) => m.name);
    assert.equal(novelModes.length, 2);
    const chosen = new Set<string>();
    for (const mode of novelModes) {
      const counts = file.candidates.map((c) => c.members.filter((id) => truthOf(id) === mode).length);
      const inCandidates = counts.reduce((sum, n) => sum + n, 0);
      const best = counts.indexOf(Math.max(...counts));
      const candidate = file.candidates[best];
      const words = distinctiveWords(mode);
      const terms = candidate.topTerms.map((t) => t.term);
      const byClass = new Map<string, number>();
      for (const id of candidate.members) byClass.set(truthOf(id), (byClass.get(truthOf(id)) ?? 0) + 1);
      const largest = Math.max(...byClass.values());
      console.log(
        `    ${mode}: ${counts[best]} of its ${inCandidates} grouped reports in ${candidate.id} (${candidate.members.length} members); ` +
          `top terms ${terms.join(', ')}; its own words among them: ${terms.filter((t) => words.has(t)).join(', ')}`,
      );
      assert.ok(inCandidates >= 5, `${mode}: only ${inCandidates} of its reports were grouped into candidates`);
      assert.ok(counts[best] > inCandidates / 2, `${mode} is split: ${counts.join(', ')} across the candidates`);
      assert.equal(byClass.get(mode), largest, `${mode} is not the largest true class of ${candidate.id}: ${JSON.stringify([...byClass])}`);
      assert.ok(
        terms.some((t) => words.has(t)),
        `${candidate.id}'s top terms ${terms.join(', ')} include none of ${[...words].join(', ')}`,
      );
      chosen.add(candidate.id);
    }
    assert.equal(chosen.size, 2, 'both failure modes landed in the same candidate');
  });
});
