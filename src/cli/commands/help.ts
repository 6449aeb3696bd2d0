import type { CliIo } from '../io';
import { EXIT } from '../io';
import { commandHelp, parseArgs, type CommandSpec } from '../args';
import { reportError } from '../command';
import { COMMANDS } from './index';

export const spec: CommandSpec = {
  name: 'help',
  summary: "List the commands, or show one command's options.",
  positionals: [{ name: 'command', optional: true }],
  flags: [],
};

export async function generalHelp(): Promise<string> {
  const modules = await Promise.all(Object.entries(COMMANDS).map(async ([name, load]) => [name, (await load()).spec] as const));
  const labels = modules.map(([name, s]) => `${name}${s.positionals.map((p) => (p.optional ? ` [${p.name}]` : ` <${p.name}>`)).join('')}`);
  const width = Math.max(...labels.map((l) => l.length));
  return [
    'graph-curator: curate node labels on graphs that grow in time slices',
    '',
    'Usage: graph-curator <command> [options]',
    '',
    'Commands:',
    ...modules.map(([, s], k) => `  ${labels[k].padEnd(width)}  ${s.summary}`),
    '',
    'Run "graph-curator help <command>" for a command\'s options.',
    '',
  ].join('\n');
}

export async function run(args: string[], io: CliIo): Promise<number> {
  try {
    const parsed = parseArgs(args, spec);
    const name = parsed.positionals[0];
    if (name === undefined) {
      io.stdout(await generalHelp());
      return EXIT.ok;
    }
    const load = Object.hasOwn(COMMANDS, name) ? COMMANDS[name] : undefined;
    if (!load) {
      io.stderr(`unknown command "${name}"\n\n${await generalHelp()}`);
      return EXIT.usage;
    }
    io.stdout(commandHelp((await load()).spec));
    return EXIT.ok;
  } catch (error) {
    return reportError(error, io, spec);
  }
}
