// The host's side of the second-look queues: the panel's loadSecondLook message is answered by
// the host (it runs the worker request with progress and cancel), never passed to the worker's
// session as a review message; the outcome reaches the panel and the saved session. The engine
// here is the worker's request handlers run in this process.
import * as assert from 'node:assert/strict';
import { ReviewRelay, type ReviewEngine } from '../../src/host/review/reviewRelay';
import type { HostToWebviewMessage } from '../../src/protocol/webview';
import type { ReviewSessionJson } from '../../src/protocol/worker';
import { requestContext, scoreSecondLookRun, type SecondLookRun } from '../review/secondLookFixture';

describe('host/review relay: loading the second-look queues', function () {
  this.timeout(120_000);
  let run: SecondLookRun;

  before(async () => {
    run = await scoreSecondLookRun('second-look-relay-');
  });
  after(async () => {
    await run?.remove();
  });

  const relayOf = (withSecondLook: boolean) => {
    const posts: HostToWebviewMessage[] = [];
    const saved: ReviewSessionJson[] = [];
    const messages: string[] = [];
    const { handlers } = run;
    const engine: ReviewEngine = {
      openReview: (params) => handlers.openReview(params, requestContext()),
      message: (reviewId, message) => {
        messages.push(message.type);
        return handlers.reviewMessage({ reviewId, message }, requestContext());
      },
      decisions: (reviewId) => handlers.reviewDecisions({ reviewId }, requestContext()),
      close: (reviewId) => handlers.closeReview({ reviewId }, requestContext()),
      ...(withSecondLook ? { secondLook: (reviewId: number) => handlers.secondLook({ reviewId, count: 5 }, requestContext()) } : {}),
    };
    const relay = new ReviewRelay(
      engine,
      {
        post: (message) => posts.push(message),
        saveSession: (session) => saved.push(session),
        exportDecisions: () => Promise.resolve(''),
        applyDecisions: () => Promise.resolve(''),
        openNode: () => undefined,
        log: () => undefined,
      },
      { folder: run.folder, runId: run.scored.runId, persistPath: null },
    );
    return { relay, posts, saved, messages };
  };

  it('runs the secondLook request, posts the new snapshot and a summary, and keeps the session with its queues', async () => {
    const { relay, posts, saved, messages } = relayOf(true);
    await relay.receive({ type: 'loadSecondLook', requestId: 3 });
    assert.deepEqual(messages, [], 'the worker session never sees loadSecondLook as a review message');
    const snapshot = posts.find((p) => p.type === 'snapshot');
    assert.ok(snapshot?.type === 'snapshot' && snapshot.snapshot.secondLook, 'the panel gets the queues');
    assert.equal(snapshot.snapshot.secondLook.labelNext.items.length, 5);
    const done = posts.at(-1);
    assert.ok(done?.type === 'done' && done.requestId === 3, JSON.stringify(done));
    assert.match(done.message, /doubtful labels? of \d+ checked; 5 suggestions among \d+ unlabelled nodes of 2024-Q4\.$/);
    assert.equal(saved.at(-1)?.secondLook?.labelNext?.suggestions.length, 5, 'workspace state gets the session with its queues');
    await relay.dispose();
  });

  it('answers with an error when the engine cannot compute the queues', async () => {
    const { relay, posts } = relayOf(false);
    await relay.receive({ type: 'loadSecondLook', requestId: 4 });
    assert.deepEqual(posts.at(-1), {
      type: 'error',
      requestId: 4,
      message: 'this review cannot compute doubtful labels and suggestions',
    });
    await relay.dispose();
  });
});
