// ReviewRelay on its own, with an engine that records what reaches it: refused messages never
// reach the engine, messages are answered in order, and a review the worker forgot (after a
// restart) is opened again from the newest session. The real worker path is in reviewWorkflow.test.ts.
import * as assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import type { DecisionsFile } from '../../src/engine/decisions/types';
import { isForgottenReview, ReviewRelay, type ReviewEngine } from '../../src/host/review/reviewRelay';
import { isReviewTarget, reviewSessionStateKey } from '../../src/host/review/reviewState';
import { isRunId, listRunRecords, pendingDecisionsPath, runToReview } from '../../src/host/runFiles';
import type { HostToWebviewMessage, WebviewToHostMessage } from '../../src/protocol/webview';
import type { OpenReviewParams, ReviewSessionJson } from '../../src/protocol/worker';

/** A session told apart by the candidate in view (the relay never looks inside it). */
function session(version: number): ReviewSessionJson {
  return {
    format: 'graph-curator-review-session',
    version: 1,
    dataset: 'd',
    runId: 'r1',
    slice: 's',
    currentCandidateId: `c${version}`,
    decisions: [],
    currentBefore: [],
    redo: [],
  };
}

class RecordingEngine implements ReviewEngine {
  opened: OpenReviewParams[] = [];
  messages: string[] = [];
  forgetNext = false;
  private nextId = 1;

  openReview(params: OpenReviewParams) {
    this.opened.push(params);
    return Promise.resolve({
      reviewId: this.nextId++,
      restoredFrom: 'none' as const,
      session: session(0),
      dataset: 'd',
      slice: 's',
      previewAvailable: false,
    });
  }

  async message(reviewId: number, message: WebviewToHostMessage) {
    if (this.forgetNext) {
      this.forgetNext = false;
      throw new Error(`review ${reviewId} is not open in the engine worker (it restarted?); reopen the review panel`);
    }
    // Answers slowly for the first message, so that order is tested.
    if (this.messages.length === 0) await new Promise((resolve) => setTimeout(resolve, 20));
    this.messages.push(`${reviewId}:${message.type}`);
    return {
      posts: [{ type: 'error', message: message.type } as HostToWebviewMessage],
      session: message.type === 'decide' ? session(1) : null,
    };
  }

  decisions(): Promise<DecisionsFile> {
    return Promise.resolve({
      format: 'graph-curator-decisions',
      version: 1,
      dataset: 'd',
      runId: 'r1',
      settingsHash: null,
      slice: 's',
      baseHashes: {},
      decisions: [],
    });
  }

  close() {
    return Promise.resolve(true);
  }
}

function relayWith(engine: RecordingEngine, posts: HostToWebviewMessage[], saved: ReviewSessionJson[], logs: string[]) {
  return new ReviewRelay(
    engine,
    {
      post: (m) => posts.push(m),
      saveSession: (s) => saved.push(s),
      exportDecisions: () => Promise.resolve(''),
      applyDecisions: () => Promise.resolve(''),
      openNode: () => undefined,
      log: (line) => logs.push(line),
    },
    { folder: '/d', runId: 'r1', persistPath: null },
  );
}

describe('ReviewRelay', () => {
  it('refuses malformed messages before they reach the engine, and says why', async () => {
    const engine = new RecordingEngine();
    const posts: HostToWebviewMessage[] = [];
    const logs: string[] = [];
    const relay = relayWith(engine, posts, [], logs);
    for (const message of [
      null,
      'ready',
      { type: 'decide', requestId: 1, decision: { kind: 'name-new-class', candidateId: 'c1' } },
      { type: 'undo' },
      { type: 'openNode', nodeId: '' },
    ]) {
      await relay.receive(message);
    }
    assert.deepEqual(engine.messages, []);
    assert.deepEqual(engine.opened, [], 'not even opened');
    assert.equal(posts.length, 5);
    assert.ok(posts.every((p) => p.type === 'error'));
    assert.match(logs[2], /refused a malformed "name-new-class" decision/);
  });

  it('answers messages in the order they came, and saves changed sessions', async () => {
    const engine = new RecordingEngine();
    const posts: HostToWebviewMessage[] = [];
    const saved: ReviewSessionJson[] = [];
    const relay = relayWith(engine, posts, saved, []);
    await Promise.all([
      relay.receive({ type: 'ready' }),
      relay.receive({ type: 'decide', requestId: 1, decision: { kind: 'skip', candidateId: 'c1' } }),
      relay.receive({ type: 'undo', requestId: 2 }),
    ]);
    assert.deepEqual(engine.messages, ['1:ready', '1:decide', '1:undo']);
    assert.deepEqual(
      posts.map((p) => (p.type === 'error' ? p.message : p.type)),
      ['ready', 'decide', 'undo'],
    );
    assert.equal(engine.opened.length, 1, 'the review is opened once');
    assert.equal(saved.length, 2, 'the opened session and the one the decision changed');
  });

  it('opens the review again, from the newest session, when the worker forgot it', async () => {
    const engine = new RecordingEngine();
    const logs: string[] = [];
    const relay = relayWith(engine, [], [], logs);
    await relay.receive({ type: 'decide', requestId: 1, decision: { kind: 'skip', candidateId: 'c1' } });
    engine.forgetNext = true;
    await relay.receive({ type: 'redo', requestId: 2 });
    assert.deepEqual(engine.messages, ['1:decide', '2:redo']);
    assert.equal(engine.opened.length, 2);
    assert.deepEqual(engine.opened[1].saved, session(1), 'reopened with the session after the decision');
    assert.match(logs.join('\n'), /restarted; reopening/);
    assert.equal(isForgottenReview(Object.assign(new Error('gone'), { name: 'WorkerExitedError' })), true);
    assert.equal(isForgottenReview(new Error('no candidate "c9" in this review')), false);
  });
});

describe('run files and review state on the host', () => {
  let folder: string;

  before(async () => {
    folder = await fs.mkdtemp(path.join(os.tmpdir(), 'run-files-'));
    const write = async (runId: string, record: object | string) => {
      await fs.mkdir(path.join(folder, 'runs', runId), { recursive: true });
      await fs.writeFile(path.join(folder, 'runs', runId, 'run.json'), typeof record === 'string' ? record : JSON.stringify(record));
    };
    const record = (runId: string, createdAt: string, candidates: boolean) => ({
      runId,
      createdAt,
      slice: '2024-Q4',
      files: { scores: 'scores.csv', embeddings: 'embeddings.npy', ...(candidates ? { candidates: 'candidates.json' } : {}) },
    });
    await write('old', record('old', '2026-01-01T00:00:00.000Z', true));
    await write('new', record('new', '2026-02-01T00:00:00.000Z', false));
    await write('broken', '{ "runId": ');
    await write('renamed', record('other-name', '2026-03-01T00:00:00.000Z', true));
    await fs.mkdir(path.join(folder, 'runs', 'incomplete'));
  });

  after(() => fs.rm(folder, { recursive: true, force: true }));

  it('lists complete runs newest first and reviews the newest run with candidates', async () => {
    const runs = await listRunRecords(folder);
    assert.deepEqual(
      runs.map((r) => r.runId),
      ['new', 'old'],
    );
    assert.equal(runToReview(runs)?.runId, 'old');
    assert.equal(runToReview(runs.slice(0, 1))?.runId, 'new');
    assert.deepEqual(await listRunRecords(path.join(folder, 'missing')), []);
  });

  it('keeps pending decisions inside the run folder and refuses run ids that leave it', () => {
    assert.equal(pendingDecisionsPath('/data/wind', 'r1'), path.join('/data/wind', 'runs', 'r1', 'pending-decisions.json'));
    for (const bad of ['..', '../r1', 'r1/../../x', '']) {
      assert.equal(isRunId(bad), false, bad);
      assert.throws(() => pendingDecisionsPath('/data/wind', bad), /is not a run id/);
    }
    assert.equal(isReviewTarget({ folder: '/data/wind', runId: 'r1' }), true);
    assert.equal(isReviewTarget({ folder: '/data/wind', runId: '../r1' }), false);
    assert.equal(isReviewTarget({ folder: '', runId: 'r1' }), false);
    assert.notEqual(reviewSessionStateKey('/a', 'r1'), reviewSessionStateKey('/b', 'r1'));
  });
});
