// The real engine worker (bundled from src/engine/worker/engineWorker.ts) driven through
// WorkerConnection, and once through a bare worker_threads Worker to see its raw replies.
import * as assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { Worker } from 'node:worker_threads';
import { DatasetProblemsError, RequestCancelledError } from '../../src/host/engineErrors';
import { WorkerConnection } from '../../src/host/workerConnection';
import { isWorkerToHostMessage, type DatasetSummary, type WorkerToHostMessage } from '../../src/protocol/worker';
import { buildNodeBundle } from './fixtures/buildBundle';
import { karateEdgeCount, karateNodeCount, writeKarateDataset } from './fixtures/karateDataset';
import { writeLargeDataset } from './fixtures/largeDataset';

describe('engine worker (real bundle)', function () {
  let workerScript: string;
  let root: string;
  let karate: string;
  let duplicateId: string;
  let brokenManifest: string;
  let large: string;
  let connection: WorkerConnection;
  let log: string[];

  before(async () => {
    workerScript = (await buildNodeBundle('src/engine/worker/engineWorker.ts', 'engine-worker.js')).outfile;
    root = await fs.mkdtemp(path.join(os.tmpdir(), 'engine-worker-'));
    karate = (await writeKarateDataset(path.join(root, 'karate'))).folder;

    // Line 4 of nodes.csv repeats the id of line 2 (line 1 is the header).
    duplicateId = (await writeKarateDataset(path.join(root, 'duplicate-id'))).folder;
    const nodesPath = path.join(duplicateId, 'nodes.csv');
    const nodeLines = (await fs.readFile(nodesPath, 'utf8')).split('\n');
    nodeLines[3] = nodeLines[1];
    await fs.writeFile(nodesPath, nodeLines.join('\n'));

    brokenManifest = (await writeKarateDataset(path.join(root, 'broken-manifest'))).folder;
    await fs.writeFile(path.join(brokenManifest, 'dataset.json'), '{ "name": "karate-club", }\n');

    large = await writeLargeDataset(path.join(root, 'large'));
  });

  after(async () => {
    await fs.rm(root, { recursive: true, force: true });
  });

  beforeEach(() => {
    log = [];
    connection = new WorkerConnection({ workerScript, log: (line) => log.push(line) });
  });

  afterEach(async () => {
    await connection.dispose();
  });

  it('validates a good dataset with no problems', async () => {
    assert.deepEqual(await connection.request('validate', { folder: karate }), []);
    assert.deepEqual(log, []);
  });

  it('reports a duplicate node id at its file and line', async () => {
    const problems = await connection.request('validate', { folder: duplicateId });
    const atLine4 = problems.filter((p) => path.basename(p.file) === 'nodes.csv' && p.line === 4);
    assert.equal(atLine4.length, 1, JSON.stringify(problems));
    assert.match(atLine4[0].message, /m00/);
  });

  it('reports a malformed dataset.json as a problem in dataset.json', async () => {
    const problems = await connection.request('validate', { folder: brokenManifest });
    assert.ok(problems.length > 0);
    assert.ok(
      problems.every((p) => path.basename(p.file) === 'dataset.json'),
      JSON.stringify(problems),
    );
    assert.equal(problems[0].line, 1);
  });

  it('summarizes a dataset, reporting progress on the way', async () => {
    const progress: Array<{ stage: string; fraction: number }> = [];
    const summary = await connection.request(
      'summary',
      { folder: karate },
      { onProgress: (stage, fraction) => progress.push({ stage, fraction }) },
    );
    assert.ok(progress.length >= 2, JSON.stringify(progress));
    assert.ok(progress.every((p) => p.fraction >= 0 && p.fraction <= 1));
    assert.deepEqual(progress[progress.length - 1], { stage: 'summarize', fraction: 1 });
    assertKarateSummary(summary);
  });

  it('turns a DatasetError from loading into a rejection carrying the located problems', async () => {
    await assert.rejects(connection.request('summary', { folder: duplicateId }), (error: unknown) => {
      assert.ok(error instanceof DatasetProblemsError);
      assert.ok(
        error.problems.some((p) => path.basename(p.file) === 'nodes.csv' && p.line === 4),
        JSON.stringify(error.problems),
      );
      return true;
    });
  });

  it('rejects a cancelled request, and the worker stops it and serves the next one', async () => {
    const abort = new AbortController();
    let progressCount = 0;
    const cancelled = connection.request(
      'summary',
      { folder: large },
      {
        signal: abort.signal,
        onProgress: () => {
          progressCount++;
          abort.abort();
        },
      },
    );
    await assert.rejects(cancelled, RequestCancelledError);
    assert.equal(progressCount, 1);
    // The same worker answers the next request: it was not terminated for ignoring the cancel.
    assert.deepEqual(await connection.request('validate', { folder: karate }), []);
    assert.deepEqual(
      log.filter((line) => line.includes('did not stop')),
      [],
    );
  });

  it('answers a cancel message with a cancelled error, and a malformed message with an error naming it', async () => {
    const worker = new Worker(workerScript);
    try {
      const replies: WorkerToHostMessage[] = [];
      let cancelSent = false;
      const finished = new Promise<void>((resolve, reject) => {
        worker.on('error', reject);
        worker.on('message', (message: unknown) => {
          assert.ok(isWorkerToHostMessage(message), JSON.stringify(message));
          replies.push(message);
          if (message.type === 'progress' && !cancelSent) {
            cancelSent = true;
            worker.postMessage({ type: 'cancel', id: 1 });
          }
          if (message.type !== 'progress' && message.id === 1) resolve();
        });
      });
      worker.postMessage({ type: 'summary', id: 1, params: { folder: large } });
      await finished;
      const final = replies[replies.length - 1];
      assert.equal(final.type, 'error');
      assert.equal(final.type === 'error' && final.error.kind, 'cancelled');
      // The engine stopped inside loading: loading never reported completion, summarizing never began.
      const progress = replies.filter((r) => r.type === 'progress');
      assert.ok(
        progress.every((p) => p.stage === 'load' && p.fraction < 1),
        JSON.stringify(progress),
      );

      const reply = new Promise<WorkerToHostMessage>((resolve) => worker.once('message', resolve));
      worker.postMessage({ type: 'summary', id: 2, params: { directory: large } });
      const malformedReply = await reply;
      assert.equal(malformedReply.type, 'error');
      assert.equal(malformedReply.id, 2);
      assert.ok(
        malformedReply.type === 'error' && malformedReply.error.kind === 'internal' && /malformed/.test(malformedReply.error.message),
      );
    } finally {
      await worker.terminate();
    }
  });
});

function assertKarateSummary(summary: DatasetSummary): void {
  assert.equal(summary.name, 'karate-club');
  assert.equal(summary.nodeCount, karateNodeCount);
  assert.equal(summary.edgeCount, karateEdgeCount);
  // Every member is labelled with one of the two factions (Zachary 1977, via graphology-generators).
  assert.equal(summary.labelledCount, karateNodeCount);
  assert.deepEqual(summary.classes.map((c) => c.name).sort(), ['Mr. Hi', 'Officer']);
  assert.deepEqual(
    summary.slices.map((s) => [s.key, s.nodes]),
    [
      ['0', 17],
      ['1', 17],
    ],
  );
}
