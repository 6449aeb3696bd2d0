import * as assert from 'node:assert/strict';
import type { Decision } from '../../src/engine/decisions/types';
import { adjustedRandIndex } from '../../src/engine/discovery';
import { summariseMembers } from '../../src/review/reviewCandidate';
import { ReviewError, ReviewSession } from '../../src/review/reviewSession';
import { buildSnapshot } from '../../src/review/snapshot';
import { buildScenario, scenarioCandidates, type ReviewScenario } from './reviewScenario';

const fixedClock = () => {
  let tick = 0;
  return () => new Date(Date.UTC(2024, 9, 1, 12, 0, tick++));
};

describe('review/reviewSession', () => {
  let scenario: ReviewScenario;
  let newSession: () => ReviewSession;

  before(() => {
    scenario = buildScenario();
    const candidates = scenarioCandidates(scenario);
    assert.equal(candidates.length, 3, 'the scenario should give three candidates');
    newSession = () => new ReviewSession(scenario.context, candidates, fixedClock());
  });

  const ids = (session: ReviewSession) =>
    session
      .queue()
      .filter((q) => q.status === 'open')
      .map((q) => q.candidate.id);
  const sizes = (session: ReviewSession) =>
    session
      .queue()
      .filter((q) => q.status === 'open')
      .map((q) => q.candidate.members.length);
  const nodeIdsOf = (nodes: ArrayLike<number>) => Array.from(nodes, (n) => scenario.context.nodeIds[n]);

  it('queues candidates largest first and starts at the largest', () => {
    const session = newSession();
    assert.deepEqual(sizes(session), [18, 12, 8]);
    assert.equal(session.current?.id, ids(session)[0]);
    assert.equal(session.canUndo, false);
    assert.equal(session.canRedo, false);
  });

  it('steps next and previous through the open candidates, wrapping around', () => {
    const session = newSession();
    const [a, b, c] = ids(session);
    session.step(1);
    assert.equal(session.current?.id, b);
    session.step(1);
    session.step(1);
    assert.equal(session.current?.id, a);
    session.step(-1);
    assert.equal(session.current?.id, c);
    assert.throws(() => session.select('no-such'), ReviewError);
  });

  it('name-new-class labels every member, registers the class and moves on', () => {
    const session = newSession();
    const [a, b] = ids(session);
    const members = nodeIdsOf(session.current!.members);
    const decision = session.decide({
      kind: 'name-new-class',
      candidateId: a,
      className: ' rotor icing ',
      description: 'ice on blades and sensors',
    });
    assert.equal(decision.kind, 'name-new-class');
    assert.equal(decision.id, 'd-0001');
    assert.equal(decision.madeAt, '2024-10-01T12:00:00.000Z');
    assert.ok(decision.kind === 'name-new-class' && decision.className === 'rotor icing');
    assert.deepEqual(decision.kind === 'name-new-class' && [...decision.members].sort(), [...members].sort());
    assert.equal(session.candidate(a)?.status, 'named');
    assert.equal(session.current?.id, b);
    assert.deepEqual(session.classes().at(-1), { name: 'rotor icing', status: 'pending', description: 'ice on blades and sensors' });
    const node = scenario.context.nodeIds.indexOf(members[0]);
    assert.equal(session.pendingLabelOf(node), 'rotor icing');
    // A second class of the same name is refused and leaves the state as it was.
    assert.throws(
      () => session.decide({ kind: 'name-new-class', candidateId: b, className: 'rotor icing', description: '' }),
      /exists already/,
    );
    assert.throws(
      () => session.decide({ kind: 'name-new-class', candidateId: b, className: 'blade-crack', description: '' }),
      /exists already/,
    );
    assert.equal(session.pendingDecisions().length, 1);
    assert.equal(session.candidate(b)?.status, 'open');
  });

  it('merge-into-class needs an existing (or pending) class', () => {
    const session = newSession();
    const [a, b] = ids(session);
    assert.throws(() => session.decide({ kind: 'merge-into-class', candidateId: a, className: 'no such class' }), /no class/);
    session.decide({ kind: 'merge-into-class', candidateId: a, className: 'grid-fault' });
    assert.equal(session.candidate(a)?.status, 'merged-into-class');
    session.decide({ kind: 'name-new-class', candidateId: b, className: 'wildlife', description: 'birds' });
    const [c] = ids(session);
    session.decide({ kind: 'merge-into-class', candidateId: c, className: 'wildlife' });
    assert.equal(session.current, null, 'nothing is left open');
    assert.throws(() => session.decide({ kind: 'dismiss', candidateId: a }), /already decided/);
  });

  it('move-members takes nodes out of their candidate and can create a class', () => {
    const session = newSession();
    const [a] = ids(session);
    const before = session.current!.members;
    const moved = nodeIdsOf(before.slice(0, 3));
    assert.throws(() => session.decide({ kind: 'move-members', members: moved, className: 'frost' }), /give a description/);
    assert.throws(
      () => session.decide({ kind: 'move-members', members: moved, className: 'grid-fault', description: 'x' }),
      /exists already/,
    );
    assert.throws(() => session.decide({ kind: 'move-members', members: ['nope'], className: 'grid-fault' }), /no node "nope"/);
    session.decide({ kind: 'move-members', members: moved, className: 'frost', description: 'frost on sensors' });
    assert.equal(session.candidate(a)?.candidate.members.length, before.length - 3);
    assert.equal(session.current?.id, a, 'the candidate stays in view');
    assert.ok(session.classes().some((c) => c.name === 'frost' && c.status === 'pending'));
    // Moving every remaining member closes the candidate.
    session.decide({ kind: 'move-members', members: nodeIdsOf(session.current.members), className: 'frost' });
    assert.equal(session.candidate(a)?.status, 'emptied');
    assert.notEqual(session.current?.id, a);
  });

  it('merge-candidates makes one candidate with the union of the members', () => {
    const session = newSession();
    const [a, b, c] = ids(session);
    const union = new Set([...nodeIdsOf(session.candidate(b)!.candidate.members), ...nodeIdsOf(session.candidate(c)!.candidate.members)]);
    const decision = session.decide({ kind: 'merge-candidates', candidateIds: [b, c] });
    assert.ok(decision.kind === 'merge-candidates');
    assert.equal(decision.resultId, `${b}+${c}`);
    assert.equal(session.current?.id, decision.resultId);
    assert.deepEqual(new Set(nodeIdsOf(session.current.members)), union);
    assert.equal(session.candidate(b)?.status, 'merged');
    assert.deepEqual(ids(session), [decision.resultId, a], 'the merged candidate (20) queues before the 18');
    assert.equal(session.current?.cohesion, null);
    assert.equal(
      session.current?.sliceCounts.reduce((s, x) => s + x.count, 0),
      union.size,
    );
    assert.throws(() => session.decide({ kind: 'merge-candidates', candidateIds: [a, b] }), /already decided/);
  });

  it('split-candidate re-groups a candidate into its two planted halves, ids `${id}.1` and `${id}.2`', () => {
    const session = newSession();
    const [a, b] = ids(session);
    session.decide({ kind: 'merge-candidates', candidateIds: [a, b] });
    const merged = session.current!.id;
    const decision = session.decide({ kind: 'split-candidate', candidateId: merged });
    assert.ok(decision.kind === 'split-candidate');
    assert.equal(decision.parts.length, 2);
    assert.equal(session.current?.id, `${merged}.1`);
    assert.equal(session.candidate(`${merged}.2`)?.status, 'open');
    assert.equal(session.candidate(merged)?.status, 'split');
    // The split should undo the merge: same two groups (ARI 1 against the original candidates).
    const truth = new Map<string, number>();
    nodeIdsOf(session.candidate(a)!.candidate.members).forEach((id) => truth.set(id, 0));
    nodeIdsOf(session.candidate(b)!.candidate.members).forEach((id) => truth.set(id, 1));
    const order = [...truth.keys()];
    const found = new Map<string, number>();
    decision.parts.forEach((part, k) => part.forEach((id) => found.set(id, k)));
    assert.equal(
      adjustedRandIndex(
        order.map((id) => truth.get(id)!),
        order.map((id) => found.get(id)!),
      ),
      1,
    );
    // Seeded: the same split twice gives the same parts.
    const again = newSession();
    again.decide({ kind: 'merge-candidates', candidateIds: [a, b] });
    const second = again.decide({ kind: 'split-candidate', candidateId: merged });
    assert.deepEqual(second.kind === 'split-candidate' && second.parts, decision.parts);
  });

  it('dismiss closes a candidate; skip sends it to the back of the queue', () => {
    const session = newSession();
    const [a, b, c] = ids(session);
    session.decide({ kind: 'skip', candidateId: a });
    assert.deepEqual(ids(session), [b, c, a]);
    assert.equal(session.current?.id, b);
    session.decide({ kind: 'dismiss', candidateId: b });
    assert.equal(session.candidate(b)?.status, 'dismissed');
    assert.equal(session.current?.id, c);
    session.decide({ kind: 'dismiss', candidateId: c });
    assert.equal(session.current?.id, a, 'the skipped candidate comes round again');
  });

  it('merge-classes and keep-label are recorded without changing the queue', () => {
    const session = newSession();
    session.decide({ kind: 'merge-classes', from: 'grid-fault', into: 'gearbox-wear' });
    assert.equal(session.classes().find((c) => c.name === 'grid-fault')?.status, 'merged');
    assert.throws(
      () => session.decide({ kind: 'merge-into-class', candidateId: session.current!.id, className: 'grid-fault' }),
      /merged into another/,
    );
    session.decide({ kind: 'keep-label', node: scenario.context.nodeIds[0] });
    assert.throws(() => session.decide({ kind: 'keep-label', node: 'missing' }), /no node/);
    assert.deepEqual(sizes(session), [18, 12, 8]);
    assert.deepEqual(
      session.pendingDecisions().map((d) => d.kind),
      ['merge-classes', 'keep-label'],
    );
  });

  it('undo and redo walk back and forth through a sequence of every kind', () => {
    const session = newSession();
    const [a, b, c] = ids(session);
    const states: string[] = [];
    const state = () =>
      JSON.stringify({
        queue: session.queue().map((q) => [q.candidate.id, q.status, q.skips, q.candidate.members.length]),
        current: session.current?.id,
        classes: session.classes(),
      });
    states.push(state());
    session.decide({ kind: 'skip', candidateId: a });
    states.push(state());
    session.decide({ kind: 'merge-candidates', candidateIds: [b, c] });
    states.push(state());
    const merged = session.current!.id;
    session.decide({ kind: 'split-candidate', candidateId: merged });
    states.push(state());
    session.decide({
      kind: 'move-members',
      members: nodeIdsOf(session.current!.members.slice(0, 2)),
      className: 'wildlife',
      description: 'animals',
    });
    states.push(state());
    session.decide({ kind: 'name-new-class', candidateId: session.current!.id, className: 'storms', description: 'lightning damage' });
    states.push(state());
    session.decide({ kind: 'dismiss', candidateId: session.current!.id });
    states.push(state());
    session.decide({ kind: 'merge-into-class', candidateId: session.current!.id, className: 'wildlife' });
    states.push(state());
    for (let k = states.length - 2; k >= 0; k--) {
      assert.ok(session.undo());
      assert.equal(state(), states[k], `after undoing back to step ${k}`);
    }
    assert.equal(session.undo(), null);
    assert.equal(session.canUndo, false);
    for (let k = 1; k < states.length; k++) {
      assert.ok(session.redo());
      assert.equal(state(), states[k], `after redoing step ${k}`);
    }
    assert.equal(session.redo(), null);
    // A new decision after an undo drops the redo stack.
    session.undo();
    session.undo();
    assert.equal(session.canRedo, true);
    session.decide({ kind: 'skip', candidateId: session.current!.id });
    assert.equal(session.canRedo, false);
    assert.deepEqual(
      session.pendingDecisions().map((d) => d.id),
      ['d-0001', 'd-0002', 'd-0003', 'd-0004', 'd-0005', 'd-0006'],
    );
  });

  it('round-trips through JSON: same queue, decisions, current candidate and redo stack', () => {
    const session = newSession();
    const [a, b, c] = ids(session);
    session.decide({ kind: 'merge-candidates', candidateIds: [a, c] });
    session.decide({ kind: 'split-candidate', candidateId: session.current!.id });
    session.decide({ kind: 'name-new-class', candidateId: session.current!.id, className: 'icing', description: 'ice' });
    session.decide({ kind: 'dismiss', candidateId: b });
    session.undo();
    session.select(ids(session)[0]);
    const json = JSON.parse(JSON.stringify(session.toJSON())) as { format: string; version: number };
    assert.equal(json.format, 'graph-curator-review-session');
    assert.equal(json.version, 1);
    const restored = ReviewSession.fromJSON(json, scenario.context, scenarioCandidates(scenario));
    assert.deepEqual(buildSnapshot(restored), buildSnapshot(session));
    assert.deepEqual(restored.toJSON(), session.toJSON());
    assert.ok(restored.redo());
    assert.equal(restored.candidate(b)?.status, 'dismissed');
  });

  it('refuses a saved session for another run, a newer version or with a damaged decision', () => {
    const session = newSession();
    session.decide({ kind: 'dismiss', candidateId: ids(session)[0] });
    const json = session.toJSON();
    const candidates = scenarioCandidates(scenario);
    const load = (value: unknown) => ReviewSession.fromJSON(value, scenario.context, candidates);
    assert.throws(() => load({ ...json, runId: 'other-run' }), /is for run other-run, not run-test-1/);
    assert.throws(() => load({ ...json, version: 2 }), /has version 2/);
    assert.throws(() => load({ ...json, format: 'x' }), /has format "x"/);
    assert.throws(() => load({ ...json, decisions: [{ ...json.decisions[0], kind: 'explode' }] }), /unknown kind "explode"/);
    assert.throws(
      () => load({ ...json, decisions: [{ ...json.decisions[0], candidateId: 'gone' }] }),
      /decision d-0001 no longer fits run run-test-1: no candidate "gone"/,
    );
    assert.throws(() => load(null), /not a JSON object/);
  });

  it('exports the pending decisions as a DecisionsFile', () => {
    const session = newSession();
    const [a] = ids(session);
    session.decide({ kind: 'name-new-class', candidateId: a, className: 'icing', description: 'ice', note: 'clear cold-weather pattern' });
    const file = session.exportDecisions();
    assert.equal(file.format, 'graph-curator-decisions');
    assert.equal(file.version, 1);
    assert.equal(file.dataset, 'wind-farm-review');
    assert.equal(file.runId, 'run-test-1');
    assert.equal(file.settingsHash, 'abc123');
    assert.equal(file.slice, '2024-Q4');
    assert.deepEqual(file.baseHashes, scenario.context.baseHashes);
    assert.equal(file.decisions.length, 1);
    const [decision] = file.decisions as [Decision];
    assert.equal(decision.note, 'clear cold-weather pattern');
    // The export is a copy: changing it does not reach the session.
    (decision as { note?: string }).note = 'changed';
    assert.equal(session.pendingDecisions()[0].note, 'clear cold-weather pattern');
  });

  it('summarises a made-up candidate like discovery: counts per slice, nearest members, neighbour classes', () => {
    const group = scenario.groups[3];
    const summary = summariseMembers(scenario.context, 'x', group);
    assert.equal(summary.members.length, group.length);
    assert.deepEqual(
      summary.sliceCounts.map((s) => s.slice),
      scenario.context.sliceKeys,
    );
    assert.equal(summary.sliceCounts[0].count + summary.sliceCounts[1].count, 0, 'this group starts in the third slice');
    assert.equal(summary.nearestMembers.length, 5);
    assert.ok(summary.nearestMembers.every((m, k) => k === 0 || m.distance >= summary.nearestMembers[k - 1].distance));
    assert.ok(['icing', 'frost', 'sensor', 'anemometer', 'cold'].includes(summary.topTerms[0].term), summary.topTerms[0].term);
  });
});
