// Dispatch: `graph-curator <command> [args]`, `--help`, `<command> --help`.
import { COMMANDS } from './commands/index';
import { generalHelp } from './commands/help';
import { commandHelp } from './args';
import { EXIT, type CliIo } from './io';

export async function runCli(argv: readonly string[], io: CliIo): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === '-h') {
    const text = await generalHelp();
    if (name === undefined) {
      io.stderr(text);
      return EXIT.usage;
    }
    io.stdout(text);
    return EXIT.ok;
  }
  if (name === '--version') {
    io.stdout(`${CLI_VERSION}\n`);
    return EXIT.ok;
  }
  const load = Object.hasOwn(COMMANDS, name) ? COMMANDS[name] : undefined;
  if (!load) {
    io.stderr(`graph-curator: unknown command "${name}"\n\n${await generalHelp()}`);
    return EXIT.usage;
  }
  const command = await load();
  if (rest.includes('--help') || rest.includes('-h')) {
    io.stdout(commandHelp(command.spec));
    return EXIT.ok;
  }
  return command.run(rest, io);
}

export const CLI_VERSION = '0.1.0';
