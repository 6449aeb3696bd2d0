import type { CliIo } from '../io';
import { EXIT } from '../io';
import { parseArgs, type CommandSpec } from '../args';
import { formatProblemLines, reportError } from '../command';
import { validateDatasetFolder } from '../../engine/dataset/validate';

export const spec: CommandSpec = {
  name: 'validate',
  summary: 'Check a dataset folder and list every problem as file:line:column (writes nothing).',
  positionals: [{ name: 'folder' }],
  flags: [{ name: 'json', description: 'Print the problems as a JSON array.' }],
  details: 'Exit code 0 when the dataset is valid, 1 when it has problems, 2 for a usage error.',
};

export async function run(args: string[], io: CliIo): Promise<number> {
  let folder = '';
  try {
    const parsed = parseArgs(args, spec);
    folder = parsed.positionals[0];
    const problems = await validateDatasetFolder(folder, { cancel: io.cancel });
    if (parsed.has('json')) {
      io.stdout(JSON.stringify(problems, null, 2) + '\n');
      return problems.length === 0 ? EXIT.ok : EXIT.failure;
    }
    if (problems.length === 0) {
      io.stdout(`OK: ${folder} is a valid dataset\n`);
      return EXIT.ok;
    }
    io.stdout(formatProblemLines(problems, folder));
    return EXIT.failure;
  } catch (error) {
    return reportError(error, io, spec, folder);
  }
}
