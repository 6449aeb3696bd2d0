// Entry of dist/engine-worker.js: the worker thread that runs all engine computation for the
// extension host, so that the host's own thread never blocks.
import { parentPort } from 'node:worker_threads';
import { requestHandlers } from './requestHandlers';
import { WorkerSession } from './workerSession';

const port = parentPort;
if (!port) throw new Error('engine-worker.js must be started as a worker thread.');

const session = new WorkerSession((message) => port.postMessage(message), requestHandlers);
port.on('message', (message: unknown) => {
  void session.receive(message);
});
