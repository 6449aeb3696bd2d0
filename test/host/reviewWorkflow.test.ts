// The review workflow through the real engine worker bundle, as the extension drives it: score a
// slice of a small generated dataset, open the review, decide, persist and restore the pending
// decisions, plan and apply them, and commit the label files with git. Also: cancelling a score.
import * as assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { parse } from 'csv-parse/sync';
import { generateDemoDataset } from '../../demo-data/generator/writeDataset';
import { DEFAULT_DEMO_OPTIONS } from '../../demo-data/generator/options';
import { defaultRunSettings, type RunSettings } from '../../src/engine/pipeline/runSettings';
import { LabelFilesConflictError, RequestCancelledError } from '../../src/host/engineErrors';
import { listRunRecords, pendingDecisionsPath, runToReview } from '../../src/host/runFiles';
import { WorkerConnection } from '../../src/host/workerConnection';
import type { HostToWebviewMessage, SnapshotMessage } from '../../src/protocol/webview';
import type { ReviewSessionJson, ScoreOutcome } from '../../src/protocol/worker';
import { ReviewRelay, type ReviewEngine } from '../../src/host/review/reviewRelay';
import { buildNodeBundle } from './fixtures/buildBundle';

const fastSettings: RunSettings = { ...defaultRunSettings, epochs: 20, thresholdFolds: 0 };

function snapshotOf(posts: HostToWebviewMessage[]): SnapshotMessage['snapshot'] {
  const snapshot = posts.filter((p): p is SnapshotMessage => p.type === 'snapshot').pop();
  assert.ok(snapshot, `expected a snapshot among ${posts.map((p) => p.type).join(', ')}`);
  return snapshot.snapshot;
}

const gitIdentity: Record<string, string> = {
  GIT_AUTHOR_NAME: 'Curator',
  GIT_AUTHOR_EMAIL: 'curator@example.org',
  GIT_COMMITTER_NAME: 'Curator',
  GIT_COMMITTER_EMAIL: 'curator@example.org',
};

function git(cwd: string, ...args: string[]): string {
  return execFileSync('git', args, { cwd, encoding: 'utf8', env: { ...process.env, ...gitIdentity } });
}

describe('review workflow through the engine worker (real bundle)', function () {
  this.timeout(120_000);
  let workerScript: string;
  let root: string;
  let folder: string;
  let connection: WorkerConnection;
  let scored: ScoreOutcome;
  const savedEnv: Record<string, string | undefined> = {};

  before(async () => {
    workerScript = (await buildNodeBundle('src/engine/worker/engineWorker.ts', 'engine-worker.js')).outfile;
    root = await fs.mkdtemp(path.join(os.tmpdir(), 'review-workflow-'));
    folder = path.join(root, 'wind-farm');
    await generateDemoDataset({ ...DEFAULT_DEMO_OPTIONS, nodes: 300, out: folder });
    // The worker thread copies process.env when it starts (on the first request): git's identity
    // for the commit test has to be there by then.
    for (const [key, value] of Object.entries(gitIdentity)) {
      savedEnv[key] = process.env[key];
      process.env[key] = value;
    }
    connection = new WorkerConnection({ workerScript });
  });

  after(async () => {
    for (const [key, value] of Object.entries(savedEnv)) {
      if (value === undefined) delete process.env[key];
      else process.env[key] = value;
    }
    await connection.dispose();
    await fs.rm(root, { recursive: true, force: true });
  });

  it('scores the newest slice: a run record, its files, progress stages, and a candidates file', async () => {
    const stages = new Set<string>();
    scored = await connection.request('score', { folder, settings: fastSettings }, { onProgress: (stage) => stages.add(stage) });
    const { record } = scored;
    assert.equal(record.dataset, 'wind-farm');
    assert.deepEqual(record.settings, fastSettings, 'the run stores the settings it was made with');
    assert.equal(scored.runFolder, path.join(folder, 'runs', scored.runId));
    for (const file of ['run.json', 'scores.csv', 'embeddings.npy']) await fs.access(path.join(scored.runFolder, file));
    assert.ok(scored.candidatesFile, 'discovery ran');
    await fs.access(scored.candidatesFile);
    // scores.csv read back with csv-parse (an independent RFC 4180 reader): one row per scored node.
    const rows = parse<Record<string, string>>(await fs.readFile(path.join(scored.runFolder, 'scores.csv'), 'utf8'), { columns: true });
    assert.equal(rows.length, record.counts.scored);
    assert.equal(rows.filter((r) => r.rejected === '1').length, record.counts.rejected);
    assert.ok(stages.has('discover') && stages.has('save'), `stages seen: ${[...stages].join(', ')}`);
    // The host lists the run the same way from run.json alone.
    const runs = await listRunRecords(folder);
    assert.equal(runToReview(runs)?.runId, scored.runId);
  });

  it('refuses a slice the dataset does not have', async () => {
    await assert.rejects(connection.request('score', { folder, slice: '1999-Q1', settings: fastSettings }), /"1999-Q1" is not a slice/);
  });

  it('opens a review, records a decision, writes pending-decisions.json, and restores it after closing', async () => {
    const persistPath = pendingDecisionsPath(folder, scored.runId);
    const opened = await connection.request('openReview', { folder, runId: scored.runId, persistPath });
    assert.equal(opened.restoredFrom, 'none');
    assert.equal(opened.previewAvailable, true, 'the fit of a run scored in this worker is kept for previews');
    const ready = await connection.request('reviewMessage', { reviewId: opened.reviewId, message: { type: 'ready' } });
    const first = snapshotOf(ready.posts);
    assert.ok(first.queue.length > 0, 'the run has candidates to review');
    assert.ok(first.threshold, 'the baseline threshold preview is in the snapshot');
    const candidate = first.queue[0];

    const decided = await connection.request('reviewMessage', {
      reviewId: opened.reviewId,
      message: {
        type: 'decide',
        requestId: 1,
        decision: { kind: 'name-new-class', candidateId: candidate.id, className: 'bird-strike', description: 'birds hit the blades' },
      },
    });
    assert.ok(decided.session, 'a decision changes the session');
    assert.equal(decided.session.decisions.length, 1);
    assert.equal(snapshotOf(decided.posts).pending.length, 1);
    const saved = JSON.parse(await fs.readFile(persistPath, 'utf8')) as unknown;
    assert.deepEqual(saved, decided.session, 'the worker wrote the session it returned');

    const preview = await connection.request('reviewMessage', {
      reviewId: opened.reviewId,
      message: { type: 'previewThreshold', requestId: 2, setting: { mode: 'quantile', alpha: 3, quantile: 0.5, lambda: 0.5 } },
    });
    const answer = preview.posts.find((p) => p.type === 'thresholdPreview');
    assert.ok(answer && answer.type === 'thresholdPreview');
    // Rejecting the top half by novelty sets aside about half of the scored nodes (ties aside).
    assert.ok(Math.abs(answer.preview.rejected - answer.preview.scored / 2) <= 1, `${answer.preview.rejected} of ${answer.preview.scored}`);
    assert.equal(preview.session, null, 'a preview does not change the session');

    const refused = await connection.request('reviewMessage', {
      reviewId: opened.reviewId,
      message: { type: 'decide', requestId: 3, decision: { kind: 'dismiss' } },
    });
    assert.deepEqual(
      refused.posts.map((p) => p.type),
      ['error'],
    );

    assert.equal(await connection.request('closeReview', { reviewId: opened.reviewId }), true);
    await assert.rejects(connection.request('reviewDecisions', { reviewId: opened.reviewId }), /is not open in the engine worker/);

    const reopened = await connection.request('openReview', { folder, runId: scored.runId, persistPath });
    assert.equal(reopened.restoredFrom, 'file');
    assert.equal(reopened.session.decisions.length, 1);
    assert.equal(reopened.session.decisions[0].kind, 'name-new-class');
    await connection.request('closeReview', { reviewId: reopened.reviewId });
  });

  it('restores from the host copy when nothing may be written (Restricted Mode), and ignores a session of another run', async () => {
    const saved = JSON.parse(await fs.readFile(pendingDecisionsPath(folder, scored.runId), 'utf8')) as ReviewSessionJson;
    const fromState = await connection.request('openReview', { folder, runId: scored.runId, persistPath: null, saved });
    assert.equal(fromState.restoredFrom, 'state');
    assert.equal(fromState.session.decisions.length, 1);
    await connection.request('closeReview', { reviewId: fromState.reviewId });

    const foreign = await connection.request('openReview', {
      folder,
      runId: scored.runId,
      persistPath: null,
      saved: { ...saved, runId: 'another-run' },
    });
    assert.equal(foreign.restoredFrom, 'none');
    assert.match(foreign.restoreProblem ?? '', /is for run another-run/);
    assert.equal(foreign.session.decisions.length, 0);
    await connection.request('closeReview', { reviewId: foreign.reviewId });
  });

  it('routes the panel messages through ReviewRelay: checked, forwarded to the worker or kept on the host', async () => {
    const posts: HostToWebviewMessage[] = [];
    const saved: ReviewSessionJson[] = [];
    const onHost: string[] = [];
    const engine: ReviewEngine = {
      openReview: (params) => connection.request('openReview', params),
      message: (reviewId, message) => connection.request('reviewMessage', { reviewId, message }),
      decisions: (reviewId) => connection.request('reviewDecisions', { reviewId }),
      close: (reviewId) => connection.request('closeReview', { reviewId }),
    };
    const relay = new ReviewRelay(
      engine,
      {
        post: (message) => posts.push(message),
        saveSession: (session) => saved.push(session),
        exportDecisions: (file) => {
          onHost.push(`export ${file.decisions.length}`);
          return Promise.resolve('exported');
        },
        applyDecisions: (file) => {
          onHost.push(`apply ${file.decisions.length}`);
          return Promise.resolve('applied');
        },
        openNode: (nodeId) => onHost.push(`open ${nodeId}`),
        log: () => undefined,
      },
      { folder, runId: scored.runId, persistPath: null },
    );
    await relay.receive({ type: 'ready' });
    const queue = snapshotOf(posts).queue;
    await relay.receive({ type: 'decide', requestId: 1, decision: { kind: 'dismiss', candidateId: queue[0].id } });
    assert.equal(snapshotOf(posts).pending.length, 1);
    assert.equal(saved[saved.length - 1].decisions.length, 1, 'the host keeps every changed session');
    posts.length = 0;
    await relay.receive({ type: 'decide', requestId: 2, decision: { kind: 'dismiss', candidateId: 42 } });
    await relay.receive({ type: 'bogus' });
    assert.deepEqual(
      posts.map((p) => p.type),
      ['error', 'error'],
    );
    await relay.receive({ type: 'applyDecisions', requestId: 3 });
    await relay.receive({ type: 'exportDecisions', requestId: 4 });
    await relay.receive({ type: 'openNode', nodeId: 'R000001' });
    assert.deepEqual(onHost, ['apply 1', 'export 1', 'open R000001']);
    assert.deepEqual(
      posts.slice(2).map((p) => (p.type === 'done' ? `${p.requestId} ${p.message}` : p.type)),
      ['3 applied', '4 exported'],
    );
    await relay.receive({ type: 'undo', requestId: 5 });
    assert.equal((await relay.decisions()).decisions.length, 0);
    posts.length = 0;
    await relay.receive({ type: 'applyDecisions', requestId: 6 });
    assert.deepEqual(posts, [{ type: 'error', requestId: 6, message: 'no pending decisions to apply' }]);
    await relay.dispose();
  });

  it('plans, applies and commits the pending decisions; a label file changed meanwhile is a conflict', async () => {
    const opened = await connection.request('openReview', {
      folder,
      runId: scored.runId,
      persistPath: pendingDecisionsPath(folder, scored.runId),
    });
    const decisions = await connection.request('reviewDecisions', { reviewId: opened.reviewId });
    assert.equal(decisions.runId, scored.runId);
    assert.equal(decisions.decisions.length, 1);
    const members = (decisions.decisions[0] as { members: string[] }).members;

    const planned = await connection.request('planApply', { folder, decisions, source: 'review' });
    assert.equal(planned.plan.hasChanges, true);
    assert.ok(planned.plan.classesAdded.some((c) => c.name === 'bird-strike'));
    assert.match(planned.summary, /bird-strike/);

    // A conflicting edit between plan and apply: nothing is written, the host is told which file.
    const labelsPath = path.join(folder, 'labels.csv');
    const original = await fs.readFile(labelsPath, 'utf8');
    const touched = original.split('\n');
    touched.splice(1, 1);
    await fs.writeFile(labelsPath, touched.join('\n'));
    await assert.rejects(
      connection.request('applyPlan', { plan: planned.plan }),
      (error: unknown) => error instanceof LabelFilesConflictError && error.files.includes('labels.csv'),
    );
    await fs.writeFile(labelsPath, original);

    git(folder, 'init', '--quiet');
    git(folder, 'add', '--', 'dataset.json', 'nodes.csv', 'edges.csv', 'labels.csv', 'classes.json');
    git(folder, 'commit', '--quiet', '-m', 'dataset');
    // Someone's unrelated staged work must stay out of the label commit.
    await fs.writeFile(path.join(folder, 'notes.txt'), 'draft\n');
    git(folder, 'add', 'notes.txt');

    const applied = await connection.request('applyPlan', { plan: planned.plan });
    assert.deepEqual(applied.result.written.sort(), ['classes.json', 'labels.csv']);
    assert.match(applied.commitMessage, /^Labels: \+1 class \(bird-strike\)/);
    const labels = parse<{ id: string; label: string }>(await fs.readFile(labelsPath, 'utf8'), { columns: true });
    for (const id of members) assert.equal(labels.find((row) => row.id === id)?.label, 'bird-strike', id);

    const committed = await connection.request('commitLabels', { folder, message: applied.commitMessage });
    assert.equal(committed.outcome, 'committed');
    assert.ok(committed.outcome === 'committed');
    assert.deepEqual(committed.files.sort(), ['classes.json', 'label-log.jsonl', 'labels.csv']);
    assert.deepEqual(
      git(folder, 'diff', '--cached', '--name-only').trim().split('\n'),
      ['notes.txt'],
      'the unrelated staged file is still staged, uncommitted',
    );
    assert.equal(git(folder, 'log', '-1', '--format=%B').trim(), applied.commitMessage.trim());
    assert.deepEqual(await connection.request('commitLabels', { folder, message: 'again' }), { outcome: 'nothing-to-commit' });
    await connection.request('closeReview', { reviewId: opened.reviewId });
  });

  it('says when the folder is in no repository', async () => {
    const lone = path.join(root, 'lone');
    await fs.mkdir(lone);
    await fs.copyFile(path.join(folder, 'dataset.json'), path.join(lone, 'dataset.json'));
    assert.deepEqual(await connection.request('commitLabels', { folder: lone, message: 'labels' }), { outcome: 'no-repository' });
  });

  it('cancelling a score rejects at once and leaves no complete run behind', async () => {
    const before = (await listRunRecords(folder)).length;
    const abort = new AbortController();
    const pending = connection.request(
      'score',
      { folder, settings: { ...fastSettings, epochs: 400 } },
      {
        signal: abort.signal,
        onProgress: (stage) => {
          if (stage !== 'load') abort.abort();
        },
      },
    );
    await assert.rejects(pending, RequestCancelledError);
    // The worker answers the cancel (or is terminated) and serves the next request.
    assert.deepEqual(await connection.request('validate', { folder }), []);
    assert.equal((await listRunRecords(folder)).length, before);
  });
});
