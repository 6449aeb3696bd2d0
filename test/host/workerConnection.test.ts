// WorkerConnection against a scripted stand-in worker: crashes, stalls after cancellation,
// malformed replies and disposal. The real engine worker is exercised in engineWorker.test.ts.
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { RequestCancelledError, WorkerExitedError, EngineFailureError } from '../../src/host/engineErrors';
import { WorkerConnection } from '../../src/host/workerConnection';

const scriptedWorker = path.join(__dirname, 'fixtures', 'scriptedWorker.js');

function waitFor(condition: () => boolean, what: string): Promise<void> {
  return new Promise((resolve, reject) => {
    const started = Date.now();
    const poll = () => {
      if (condition()) resolve();
      else if (Date.now() - started > 10_000) reject(new Error(`gave up waiting for ${what}`));
      else setTimeout(poll, 10);
    };
    poll();
  });
}

describe('host/workerConnection with a scripted worker', () => {
  let connection: WorkerConnection;
  let log: string[];

  beforeEach(() => {
    log = [];
    connection = new WorkerConnection({ workerScript: scriptedWorker, cancelGraceMs: 100, log: (line) => log.push(line) });
  });

  afterEach(async () => {
    await connection.dispose();
  });

  it('starts the worker only on the first request, and matches replies to requests by id', async () => {
    assert.equal(connection.isRunning, false);
    const progress: string[] = [];
    const [a, b] = await Promise.all([
      connection.request('validate', { folder: 'a' }, { onProgress: (stage, fraction) => progress.push(`${stage}:${fraction}`) }),
      connection.request('validate', { folder: 'b' }),
    ]);
    assert.equal(connection.isRunning, true);
    assert.equal(a[0].file, 'a');
    assert.equal(b[0].file, 'b');
    assert.deepEqual(progress, ['echo:0.5']);
  });

  it('rejects open requests when the worker throws, then restarts on the next request', async () => {
    await assert.rejects(connection.request('validate', { folder: 'crash-throw' }), (error: unknown) => {
      assert.ok(error instanceof WorkerExitedError);
      assert.match(error.message, /scripted worker failure/);
      return true;
    });
    await waitFor(() => !connection.isRunning, 'the crashed worker to be forgotten');
    const problems = await connection.request('validate', { folder: 'after-crash' });
    assert.equal(problems[0].file, 'after-crash');
    assert.ok(log.some((line) => line.includes('scripted worker failure')));
  });

  it('rejects every open request when the worker exits, naming the exit code', async () => {
    const stalled = assert.rejects(connection.request('validate', { folder: 'stall' }), WorkerExitedError);
    const exiting = connection.request('validate', { folder: 'crash-exit' });
    await assert.rejects(exiting, (error: unknown) => error instanceof WorkerExitedError && /exit code 3/.test(error.message));
    await stalled;
  });

  it('rejects at once on cancellation and terminates a worker that does not stop', async () => {
    const abort = new AbortController();
    const stalled = connection.request('validate', { folder: 'stall' }, { signal: abort.signal });
    abort.abort();
    await assert.rejects(stalled, RequestCancelledError);
    await waitFor(() => !connection.isRunning, 'the stalled worker to be terminated');
    assert.ok(log.some((line) => line.includes('did not stop request')));
    const problems = await connection.request('validate', { folder: 'fresh' });
    assert.equal(problems[0].file, 'fresh');
  });

  it('does not start a worker for a request cancelled before it was sent', async () => {
    const abort = new AbortController();
    abort.abort();
    await assert.rejects(connection.request('validate', { folder: 'a' }, { signal: abort.signal }), RequestCancelledError);
    assert.equal(connection.isRunning, false);
  });

  it('ignores and logs a malformed reply, then accepts the good one', async () => {
    const problems = await connection.request('validate', { folder: 'malformed-first' });
    assert.equal(problems[0].file, 'malformed-first');
    assert.ok(log.some((line) => line.includes('malformed message')));
  });

  it('rejects a result of the wrong kind', async () => {
    await assert.rejects(connection.request('validate', { folder: 'wrong-kind' }), EngineFailureError);
  });

  it('rejects open and later requests once disposed', async () => {
    const stalled = assert.rejects(connection.request('validate', { folder: 'stall' }), WorkerExitedError);
    await connection.dispose();
    await stalled;
    await assert.rejects(connection.request('validate', { folder: 'a' }), WorkerExitedError);
    assert.equal(connection.isRunning, false);
  });
});
