// Entry point of the bundled CLI (dist/cli.js, launched by bin/graph-curator.js).
import { runCli } from './run';
import { CancelFlag } from '../engine/util/progress';

const cancel = new CancelFlag();
process.once('SIGINT', () => cancel.cancel());

runCli(process.argv.slice(2), {
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
  cancel,
}).then(
  (code) => {
    process.exitCode = code;
  },
  (error: unknown) => {
    process.stderr.write(`graph-curator: internal error: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
    process.exitCode = 1;
  },
);
