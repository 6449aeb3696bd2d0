// The second-look queues in the review: the worker's secondLook request on a scored run, keeping
// and changing labels through the session's decisions (undo, redo, a saved session restored),
// and the pending decisions going through the plan/apply path into labels.csv. labels.csv and
// label-log.jsonl are read back with csv-parse and JSON.parse, independently of the code under test.
import * as assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as path from 'node:path';
import { parse } from 'csv-parse/sync';
import { loadDataset } from '../../src/engine/dataset/load';
import { CancelFlag, CancelledError } from '../../src/engine/util/progress';
import type { DecisionsFile } from '../../src/engine/decisions/types';
import type { HostToWebviewMessage, ReviewSnapshot, SecondLookItemView } from '../../src/protocol/webview';
import { isWebviewToHostMessage } from '../../src/protocol/webview';
import { isEngineRequest, type OpenReviewOutcome, type SecondLookOutcome } from '../../src/protocol/worker';
import { ReviewError, ReviewSession } from '../../src/review/reviewSession';
import { secondLookItemCap, secondLookQueuesOf, type SecondLookQueues } from '../../src/review/secondLookQueues';
import { buildSnapshot } from '../../src/review/snapshot';
import {
  requestContext,
  reviewInputsOf,
  scoreSecondLookRun,
  secondLookCount,
  secondLookFolds,
  type SecondLookRun,
} from './secondLookFixture';

const readLabels = async (folder: string) =>
  new Map(
    parse<{ id: string; label: string }>(await fs.readFile(path.join(folder, 'labels.csv')), { columns: true }).map((r) => [r.id, r.label]),
  );

function snapshotOf(posts: HostToWebviewMessage[]): ReviewSnapshot {
  const found = posts.filter((p): p is Extract<HostToWebviewMessage, { type: 'snapshot' }> => p.type === 'snapshot').pop();
  assert.ok(found, `expected a snapshot among ${posts.map((p) => p.type).join(', ')}`);
  return found.snapshot;
}

const itemOf = (snapshot: ReviewSnapshot, queue: 'doubts' | 'labelNext', node: string): SecondLookItemView => {
  const item = snapshot.secondLook?.[queue].items.find((i) => i.node === node);
  assert.ok(item, `no item for ${node} in ${queue}`);
  return item;
};

describe('review/second look through the worker’s requests', function () {
  this.timeout(120_000);
  let run: SecondLookRun;
  let persistPath: string;
  let opened: OpenReviewOutcome;
  let loaded: SecondLookOutcome;
  const stages = new Set<string>();
  let labelsBefore: Map<string, string>;

  const message = async (body: unknown) => run.handlers.reviewMessage({ reviewId: opened.reviewId, message: body }, requestContext());

  before(async () => {
    run = await scoreSecondLookRun('second-look-');
    persistPath = path.join(run.scored.runFolder, 'pending-decisions.json');
    labelsBefore = await readLabels(run.folder);
    opened = await run.handlers.openReview({ folder: run.folder, runId: run.scored.runId, persistPath }, requestContext());
    loaded = await run.handlers.secondLook(
      { reviewId: opened.reviewId, folds: secondLookFolds, count: secondLookCount },
      requestContext(stages),
    );
  });
  after(async () => {
    await run?.remove();
  });

  it('computes both queues for the run’s slice and settings, reporting progress of each, and saves them with the session', async () => {
    const seen = [...stages].join(', ');
    assert.ok(
      [...stages].some((s) => s.startsWith('doubtful labels: ')),
      seen,
    );
    assert.ok(
      [...stages].some((s) => s.startsWith('label next: ')),
      seen,
    );
    const view = snapshotOf(loaded.posts).secondLook;
    assert.ok(view, 'the snapshot carries the queues');
    const { doubts, labelNext } = view;
    assert.equal(doubts.problem, null);
    assert.equal(labelNext.problem, null);
    assert.ok(doubts.items.length > 0, 'the weak 20-epoch model doubts some labels');
    assert.equal(labelNext.items.length, secondLookCount);
    assert.equal(loaded.doubtful, doubts.items.length);
    assert.equal(loaded.suggested, secondLookCount);
    assert.match(loaded.summary, new RegExp(`^${doubts.items.length} doubtful labels? of \\d+ checked; 10 suggestions among`));
    // Ranked as the engine ranked them, each doubted label being the one labels.csv holds.
    for (const [k, item] of doubts.items.entries()) {
      assert.equal(item.rank, k + 1);
      assert.equal(item.currentLabel, labelsBefore.get(item.node), item.node);
      assert.notEqual(item.suggestedLabel, item.currentLabel);
      assert.equal(item.status, 'open');
      if (k > 0) assert.ok(item.score <= doubts.items[k - 1].score);
    }
    // Suggestions: unlabelled nodes of the run's slice only, most useful first.
    for (const [k, item] of labelNext.items.entries()) {
      assert.equal(labelsBefore.has(item.node), false, `${item.node} is unlabelled in labels.csv`);
      assert.equal(item.slice, run.scored.record.slice);
      assert.equal(item.currentLabel, null);
      if (k > 0) assert.ok(item.score <= labelNext.items[k - 1].score);
    }
    const saved = JSON.parse(await fs.readFile(persistPath, 'utf8')) as { secondLook?: SecondLookQueues };
    assert.deepEqual(saved, loaded.session, 'the worker wrote the session it returned');
    assert.equal(saved.secondLook?.doubts?.doubts.length, doubts.items.length);
  });

  it('keeps and changes labels as ordinary decisions, with undo and redo, and restores them from the saved session', async () => {
    const view = snapshotOf(loaded.posts).secondLook!;
    const [kept, changed] = view.doubts.items;
    assert.ok(changed, 'the test needs two doubtful labels');
    const labelled = view.labelNext.items[0];

    let outcome = await message({ type: 'decide', requestId: 1, decision: { kind: 'keep-label', node: kept.node, note: 'checked' } });
    assert.deepEqual(
      { ...itemOf(snapshotOf(outcome.posts), 'doubts', kept.node), text: '' },
      { ...kept, text: '', status: 'kept', decisionId: 'd-0001' },
    );
    outcome = await message({
      type: 'decide',
      requestId: 2,
      decision: { kind: 'move-members', members: [changed.node], className: changed.suggestedLabel },
    });
    let item = itemOf(snapshotOf(outcome.posts), 'doubts', changed.node);
    assert.equal(item.status, 'changed');
    assert.equal(item.pendingLabel, changed.suggestedLabel);
    assert.equal(item.decisionId, 'd-0002');
    // A label a pending decision replaces cannot also be kept: the session refuses, nothing changes.
    outcome = await message({ type: 'decide', requestId: 3, decision: { kind: 'keep-label', node: changed.node } });
    assert.equal(outcome.session, null);
    assert.match(
      (outcome.posts[0] as { message: string }).message,
      new RegExp(`node "${changed.node}" is given "${changed.suggestedLabel}" by a pending decision`),
    );
    const classes = snapshotOf(loaded.posts).classes.map((c) => c.name);
    const other = classes.find((c) => c !== labelled.suggestedLabel)!;
    outcome = await message({
      type: 'decide',
      requestId: 4,
      decision: { kind: 'move-members', members: [labelled.node], className: other },
    });
    assert.equal(itemOf(snapshotOf(outcome.posts), 'labelNext', labelled.node).pendingLabel, other);
    const afterThree = snapshotOf(outcome.posts);
    assert.equal(afterThree.secondLook!.labelNext.openCount, view.labelNext.openCount - 1);

    outcome = await message({ type: 'undo', requestId: 5 });
    item = itemOf(snapshotOf(outcome.posts), 'labelNext', labelled.node);
    assert.deepEqual([item.status, item.pendingLabel, item.decisionId], ['open', null, null]);
    outcome = await message({ type: 'redo', requestId: 6 });
    assert.deepEqual(snapshotOf(outcome.posts).secondLook, afterThree.secondLook, 'redo gives back the same queues');

    // Closed and opened again (a panel reopened, a window reloaded): the file in the run folder restores it all.
    assert.equal(await run.handlers.closeReview({ reviewId: opened.reviewId }, requestContext()), true);
    opened = await run.handlers.openReview({ folder: run.folder, runId: run.scored.runId, persistPath }, requestContext());
    assert.equal(opened.restoredFrom, 'file');
    const restored = snapshotOf((await message({ type: 'ready' })).posts);
    assert.deepEqual(restored.secondLook, afterThree.secondLook);
    assert.deepEqual(restored.pending, afterThree.pending);
  });

  it('applies the pending decisions: labels.csv changes for exactly the changed nodes, the kept label is only counted', async () => {
    const decisions: DecisionsFile = await run.handlers.reviewDecisions({ reviewId: opened.reviewId }, requestContext());
    assert.deepEqual(
      decisions.decisions.map((d) => d.kind),
      ['keep-label', 'move-members', 'move-members'],
    );
    const planned = await run.handlers.planApply(
      { folder: run.folder, decisions, source: `review of run ${run.scored.runId}` },
      requestContext(),
    );
    assert.deepEqual(planned.plan.reviewOnly, { 'keep-label': 1 });
    await run.handlers.applyPlan({ plan: planned.plan }, requestContext());

    const expected = new Map(labelsBefore);
    for (const d of decisions.decisions) if (d.kind === 'move-members') for (const node of d.members) expected.set(node, d.className);
    assert.deepEqual(await readLabels(run.folder), expected);
    const log = (await fs.readFile(path.join(run.folder, 'label-log.jsonl'), 'utf8'))
      .trim()
      .split('\n')
      .map((line) => JSON.parse(line) as Record<string, unknown>)
      .filter((entry) => typeof entry.node === 'string');
    assert.deepEqual(
      log.map((entry) => [entry.node, entry.oldLabel, entry.decisionId]).sort(),
      decisions.decisions
        .filter((d) => d.kind === 'move-members')
        .map((d) => [
          d.kind === 'move-members' ? d.members[0] : '',
          labelsBefore.get(d.kind === 'move-members' ? d.members[0] : '') ?? null,
          d.id,
        ])
        .sort(),
    );
    // The dataset loads with the new labels (the engine's own reader agrees with csv-parse).
    const dataset = await loadDataset(run.folder);
    for (const [node, label] of expected) assert.equal(dataset.classNames[dataset.labels[dataset.indexOfId.get(node)!]], label);
  });

  it('stops when cancelled during the cross-fitting, leaving the queues the session had', async () => {
    const before = (await message({ type: 'ready' })).posts;
    const cancel = new CancelFlag();
    const cancelling = {
      progress: {
        report: (stage: string) => {
          if (stage.startsWith('doubtful labels: ')) cancel.cancel();
        },
      },
      cancel,
    };
    await assert.rejects(run.handlers.secondLook({ reviewId: opened.reviewId }, cancelling), CancelledError);
    const after = (await message({ type: 'ready' })).posts;
    assert.equal(snapshotOf(after).secondLook?.computedAt, snapshotOf(before).secondLook?.computedAt);
  });

  it('validates the new messages: loadSecondLook needs a request id, secondLook a review id and sane folds and count', () => {
    assert.equal(isWebviewToHostMessage({ type: 'loadSecondLook', requestId: 4 }), true);
    assert.equal(isWebviewToHostMessage({ type: 'loadSecondLook' }), false);
    assert.equal(isWebviewToHostMessage({ type: 'loadSecondLook', requestId: -1 }), false);
    const request = (params: unknown) => isEngineRequest({ type: 'secondLook', id: 1, params });
    assert.equal(request({ reviewId: 1 }), true);
    assert.equal(request({ reviewId: 1, folds: 5, count: 20 }), true);
    assert.equal(request({ reviewId: 1, folds: 1 }), false);
    assert.equal(request({ reviewId: 1, count: 0 }), false);
    assert.equal(request({ reviewId: 1, count: 2.5 }), false);
    assert.equal(request({}), false);
  });
});

describe('review/second look in the session', function () {
  this.timeout(120_000);
  let run: SecondLookRun;
  let inputs: Awaited<ReturnType<typeof reviewInputsOf>>;
  const clock = () => new Date(Date.UTC(2024, 11, 1, 9, 0, 0));

  before(async () => {
    run = await scoreSecondLookRun('second-look-session-');
    inputs = await reviewInputsOf(run);
  });
  after(async () => {
    await run?.remove();
  });

  const newSession = () => {
    const session = new ReviewSession(inputs.context, inputs.candidates, clock);
    session.setSecondLook(inputs.queues);
    return session;
  };

  it('round-trips the queues and the decisions on them through JSON, and undoes back to an open queue', () => {
    const session = newSession();
    const doubt = inputs.queues.doubts!.doubts[0];
    const suggestion = inputs.queues.labelNext!.suggestions[0];
    session.decide({ kind: 'keep-label', node: doubt.node });
    session.decide({ kind: 'move-members', members: [suggestion.node], className: suggestion.predictedLabel });
    const json = JSON.parse(JSON.stringify(session.toJSON())) as unknown;
    const restored = ReviewSession.fromJSON(json, inputs.context, inputs.candidates, clock);
    assert.deepEqual(buildSnapshot(restored), buildSnapshot(session));
    assert.deepEqual(restored.toJSON(), session.toJSON());
    restored.undo();
    restored.undo();
    const view = buildSnapshot(restored).secondLook!;
    assert.equal(view.doubts.openCount, view.doubts.items.length);
    assert.equal(view.labelNext.openCount, view.labelNext.items.length);
    assert.deepEqual(restored.toJSON().secondLook, inputs.queues, 'undo leaves the queues themselves alone');
  });

  it('refuses damaged queues in a saved session, naming what is wrong, and in setSecondLook', () => {
    const json = newSession().toJSON();
    const load = (secondLook: unknown) => ReviewSession.fromJSON({ ...json, secondLook }, inputs.context, inputs.candidates);
    const firstDoubt = json.secondLook!.doubts!.doubts[0];
    assert.throws(
      () => load({ ...json.secondLook, doubts: { ...json.secondLook!.doubts, doubts: [{ ...firstDoubt, score: 'high' }] } }),
      /saved review session has damaged second-look queues: they doubtful label 1 is malformed/,
    );
    assert.throws(() => load({ ...json.secondLook, computedAt: 'yesterday' }), /has no ISO-8601 computedAt time/);
    assert.throws(() => load('queues'), /is not an object/);
    const session = new ReviewSession(inputs.context, inputs.candidates, clock);
    assert.throws(() => session.setSecondLook({ ...inputs.queues, labelNext: { format: 'x' } } as never), ReviewError);
    assert.equal(session.secondLookQueues, null, 'a refused set leaves the session without queues');
  });

  it('keeps at most secondLookItemCap items per queue, and says why a queue is missing', () => {
    const doubts = inputs.queues.doubts!;
    const many = { ...doubts, doubts: Array.from({ length: secondLookItemCap + 5 }, (_, k) => ({ ...doubts.doubts[0], rank: k + 1 })) };
    const queues = secondLookQueuesOf({ doubts: many, labelNext: new Error('no labels in the window'), computedAt: clock() });
    assert.equal(queues.doubts!.doubts.length, secondLookItemCap);
    assert.equal(queues.labelNext, null);
    const session = new ReviewSession(inputs.context, inputs.candidates, clock);
    session.setSecondLook(queues);
    const view = buildSnapshot(session).secondLook!;
    assert.equal(view.labelNext.problem, 'no labels in the window');
    assert.deepEqual(view.labelNext.items, []);
  });
});
