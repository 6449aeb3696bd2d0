import * as path from 'node:path';
import { promises as fs } from 'node:fs';
import type { CliIo } from '../io';
import { EXIT } from '../io';
import { parseArgs, type CommandSpec } from '../args';
import { reportError } from '../command';
import { inferManifest } from '../../engine/dataset/inferManifest';
import { MANIFEST_FILE } from '../../engine/dataset/manifest';
import { writeFileAtomic } from '../../engine/io/atomicWrite';

export const spec: CommandSpec = {
  name: 'init',
  summary: 'Write a dataset.json guessed from the nodes.csv and edges.csv in a folder.',
  positionals: [{ name: 'folder' }],
  flags: [],
  details:
    'Columns: id, time, source, target (and weight) by their usual names. Granularity: "step" for integer times, ' +
    'otherwise the coarsest of year, quarter, month, week, day giving at least 6 slices. Features: features.npy if present, ' +
    'else numeric columns, else TF-IDF of the text columns. Never overwrites an existing dataset.json.',
};

export async function run(args: string[], io: CliIo): Promise<number> {
  let folder = '';
  try {
    const parsed = parseArgs(args, spec);
    folder = parsed.positionals[0];
    const target = path.join(folder, MANIFEST_FILE);
    if (
      await fs.stat(target).then(
        () => true,
        () => false,
      )
    ) {
      io.stderr(`${target} already exists; not overwriting it (edit it, or delete it and run init again)\n`);
      return EXIT.failure;
    }
    const { fileContent, notes } = await inferManifest(folder);
    await writeFileAtomic(target, JSON.stringify(fileContent, null, 2) + '\n');
    io.stdout(`wrote ${target}\n${notes.map((n) => `  ${n}\n`).join('')}check it with: graph-curator validate ${folder}\n`);
    return EXIT.ok;
  } catch (error) {
    return reportError(error, io, spec, folder);
  }
}
