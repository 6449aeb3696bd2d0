// The shape of a command module (src/cli/commands/<name>.ts) and the shared helpers commands use.
import * as path from 'node:path';
import { DatasetError, type LocatedProblem } from '../engine/dataset/types';
import { CancelledError } from '../engine/util/progress';
import { UsageError, commandHelp, type CommandSpec } from './args';
import { EXIT, type CliIo } from './io';

export interface CommandModule {
  spec: CommandSpec;
  /** Returns the exit code: 0 success, 1 failure, 2 usage error. */
  run(args: string[], io: CliIo): Promise<number>;
}

/** Lines shown at most before "… and N more problems". */
export const MAX_PROBLEM_LINES = 50;

/**
 * One line per problem, `path:line:column: message`, with the path joined to the dataset folder
 * as given on the command line (so terminals and editors can open it); no position when unknown.
 */
export function formatProblemLines(problems: readonly LocatedProblem[], folder: string): string {
  const lines = problems.slice(0, MAX_PROBLEM_LINES).map((p) => {
    const file = path.isAbsolute(p.file) || p.file === folder ? p.file : path.join(folder, p.file);
    return p.line > 0 ? `${file}:${p.line}:${p.column}: ${p.message}` : `${file}: ${p.message}`;
  });
  if (problems.length > MAX_PROBLEM_LINES) {
    const more = problems.length - MAX_PROBLEM_LINES;
    lines.push(`… and ${more} more problem${more === 1 ? '' : 's'}`);
  }
  return lines.join('\n') + '\n';
}

/** Maps the errors every command can meet to messages and exit codes. */
export function reportError(error: unknown, io: CliIo, spec: CommandSpec, folder = ''): number {
  if (error instanceof UsageError) {
    io.stderr(`graph-curator ${spec.name}: ${error.message}\n\n${commandHelp(spec)}`);
    return EXIT.usage;
  }
  if (error instanceof DatasetError) {
    io.stderr(formatProblemLines(error.problems, folder));
    return EXIT.failure;
  }
  if (error instanceof CancelledError) {
    io.stderr('cancelled\n');
    return EXIT.cancelled;
  }
  io.stderr(`graph-curator ${spec.name}: ${error instanceof Error ? error.message : String(error)}\n`);
  return EXIT.failure;
}
