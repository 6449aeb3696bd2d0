// After an apply: the applied decisions stay in the session (their candidates stay closed and are
// shown as applied), but they are no longer pending, exported or undoable, and the saved session
// reopens that way on the new labels (where the named class now exists).
import * as assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { loadDataset } from '../../src/engine/dataset/load';
import { CancelFlag, silentProgress } from '../../src/engine/util/progress';
import { ReviewRegistry } from '../../src/engine/worker/reviewRegistry';
import { scoreAndSave } from '../../src/engine/worker/scoreRequest';
import type { ReviewSessionJson } from '../../src/protocol/worker';
import { withAppliedMarked } from '../../src/review/appliedSession';
import type { ReviewCandidate } from '../../src/review/reviewCandidate';
import type { ReviewContext } from '../../src/review/reviewContext';
import { ReviewError, ReviewSession } from '../../src/review/reviewSession';
import { buildSnapshot } from '../../src/review/snapshot';
import { quickSettings, smallDataset } from '../pipeline/pipelineFixture';
import { buildScenario, scenarioCandidates } from './reviewScenario';

const clock = () => new Date(Date.UTC(2024, 9, 1, 12, 0, 0));

describe('review/applied decisions', () => {
  let context: ReviewContext;
  let candidates: ReviewCandidate[];

  before(() => {
    const scenario = buildScenario();
    context = scenario.context;
    candidates = scenarioCandidates(scenario);
    assert.equal(candidates.length, 3);
  });

  const openIds = (session: ReviewSession) =>
    session
      .queue()
      .filter((q) => q.status === 'open')
      .map((q) => q.candidate.id);

  /** Names the largest candidate, dismisses the next one. */
  function decided(): ReviewSession {
    const session = new ReviewSession(context, candidates, clock);
    const [first, second] = openIds(session);
    session.decide({ kind: 'name-new-class', candidateId: first, className: 'rotor icing', description: 'ice on blades' });
    session.decide({ kind: 'dismiss', candidateId: second });
    return session;
  }

  it('marks the pending decisions applied: their candidates are done, nothing is pending, undo is not offered', () => {
    const session = decided();
    const [first, second, third] = candidates.map((c) => c.id);
    session.markApplied();
    assert.deepEqual(session.pendingDecisions(), []);
    assert.deepEqual(
      session.appliedDecisions().map((d) => d.kind),
      ['name-new-class', 'dismiss'],
    );
    assert.equal(session.canUndo, false);
    assert.equal(session.undo(), null, 'undo reaches no applied decision');
    assert.deepEqual(openIds(session), [third]);
    assert.deepEqual(session.exportDecisions().decisions, [], 'an applied decision is not exported (or applied) again');
    const snapshot = buildSnapshot(session);
    assert.deepEqual(
      snapshot.queue.map((q) => [q.id, q.status, q.applied ?? false]),
      [
        [third, 'open', false],
        [first, 'named', true],
        [second, 'dismissed', true],
      ],
    );
    assert.deepEqual(snapshot.pending, []);
    assert.equal(snapshot.canUndo, false);
  });

  it('keeps later decisions pending and undoable, down to the applied ones', () => {
    const session = decided();
    session.markApplied();
    const [third] = openIds(session);
    const skip = session.decide({ kind: 'dismiss', candidateId: third });
    assert.deepEqual(
      session.pendingDecisions().map((d) => d.id),
      [skip.id],
    );
    assert.deepEqual(
      session.exportDecisions().decisions.map((d) => d.id),
      [skip.id],
    );
    assert.equal(session.isApplied(third), false, 'closed by a pending decision, not an applied one');
    assert.equal(session.undo()?.id, skip.id);
    assert.equal(session.canUndo, false);
    assert.equal(session.undo(), null);
    assert.deepEqual(openIds(session), [third]);
    // A decision id is never reused, even across the apply.
    assert.notEqual(session.decide({ kind: 'dismiss', candidateId: third }).id, session.appliedDecisions()[1].id);
  });

  it('reopens a saved session marked applied on the new labels, where the named class exists now', () => {
    const session = decided();
    const appliedIds = session.pendingDecisions().map((d) => d.id);
    const saved = withAppliedMarked(session.toJSON(), appliedIds) as ReviewSessionJson;
    assert.equal(saved.applied, 2);
    const untouched = session.toJSON();
    assert.equal(withAppliedMarked(untouched, ['d-9999']), untouched, 'a session holding none of the ids is left as it is');
    assert.equal(untouched.applied, undefined);

    // The label files after the apply: the new class is known, its members carry it.
    const named = candidates[0];
    const afterApply: ReviewContext = {
      ...context,
      classNames: [...context.classNames, 'rotor icing'],
      labels: Int32Array.from(context.labels),
    };
    for (const node of named.members) afterApply.labels[node] = afterApply.classNames.length - 1;
    const reopened = ReviewSession.fromJSON(saved, afterApply, candidates, clock);
    assert.equal(reopened.canUndo, false);
    assert.deepEqual(reopened.pendingDecisions(), []);
    assert.equal(reopened.isApplied(named.id), true);
    assert.deepEqual(openIds(reopened), [candidates[2].id]);
    assert.deepEqual(
      reopened.classes().filter((c) => c.name === 'rotor icing'),
      [{ name: 'rotor icing', status: 'known' }],
      'the class is known now, not created again by a pending decision',
    );
    // Naming a candidate with that class again is refused, as for any existing class.
    assert.throws(
      () => reopened.decide({ kind: 'name-new-class', candidateId: candidates[2].id, className: 'rotor icing', description: 'again' }),
      ReviewError,
    );
    // The same file without the mark does not fit the new labels: the class would be created twice.
    const unmarked = { ...saved, applied: undefined };
    assert.throws(() => ReviewSession.fromJSON(unmarked, afterApply, candidates, clock), /exists already/);
    // A damaged mark is refused with a clear message.
    assert.throws(
      () => ReviewSession.fromJSON({ ...saved, applied: 5 }, afterApply, candidates, clock),
      /says 5 decisions are applied, of 2/,
    );
  });

  it('in the worker: reopening the review after an apply marks the applied decisions in the saved session', async function () {
    this.timeout(120_000);
    const folder = (await smallDataset()).folder;
    const { runId } = await scoreAndSave({ folder, settings: quickSettings }, { progress: silentProgress, cancel: new CancelFlag() });
    const persistPath = path.join(await fs.mkdtemp(path.join(os.tmpdir(), 'applied-review-')), 'pending-decisions.json');
    const load = (f: string) => loadDataset(f);
    const first = new ReviewRegistry();
    const opened = await first.open({ folder, runId, persistPath }, load);
    const candidateId = opened.session.currentCandidateId;
    assert.ok(candidateId, 'the run has a candidate to decide on');
    await first.message(opened.reviewId, { type: 'decide', requestId: 1, decision: { kind: 'dismiss', candidateId } });
    const appliedIds = first.decisions(opened.reviewId).decisions.map((d) => d.id);
    assert.equal(appliedIds.length, 1);
    const reopened = await new ReviewRegistry().open({ folder, runId, persistPath, appliedIds }, load);
    assert.equal(reopened.restoredFrom, 'file');
    assert.equal(reopened.session.applied, 1);
    const onDisk = JSON.parse(await fs.readFile(persistPath, 'utf8')) as ReviewSessionJson;
    assert.equal(onDisk.applied, 1, 'written back, so a later reload keeps the mark');
    assert.notEqual(reopened.session.currentCandidateId, candidateId, 'the dismissed candidate left the open queue');
  });

  it('in the worker: a review reopened after an apply reads the labels on disk, not the dataset kept from scoring', async function () {
    this.timeout(120_000);
    const folder = (await smallDataset()).folder;
    const registry = new ReviewRegistry();
    const { runId } = await scoreAndSave(
      { folder, settings: quickSettings },
      { progress: silentProgress, cancel: new CancelFlag() },
      (fit) => registry.rememberFit(fit),
    );
    const persistPath = path.join(await fs.mkdtemp(path.join(os.tmpdir(), 'applied-review-')), 'pending-decisions.json');
    let loads = 0;
    const load = (f: string) => {
      loads++;
      return loadDataset(f);
    };
    const opened = await registry.open({ folder, runId, persistPath }, load);
    assert.equal(loads, 0, 'right after scoring the review uses the dataset the worker already holds');
    assert.equal(opened.previewAvailable, true);
    const reopened = await registry.open({ folder, runId, persistPath, appliedIds: [] }, load);
    assert.equal(loads, 1, 'after an apply the dataset is read again');
    assert.equal(reopened.previewAvailable, true, 'the remembered fit still serves the previews');
  });
});
