// A small shared argument parser: positionals plus long flags (`--out FILE`, `--out=FILE`,
// `--json`). Anything not declared by the command is a usage error (exit code 2).

export interface FlagSpec {
  name: string;
  /** Placeholder for the flag's value (e.g. "FILE"); absent for a boolean flag. */
  value?: string;
  description: string;
}

export interface PositionalSpec {
  name: string;
  optional?: boolean;
}

export interface CommandSpec {
  name: string;
  /** One line for the command list. */
  summary: string;
  positionals: PositionalSpec[];
  flags: FlagSpec[];
  /** Extra paragraphs for `help <command>`. */
  details?: string;
}

export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

export class ParsedArgs {
  constructor(
    readonly positionals: string[],
    private readonly flags: Map<string, string | true>,
  ) {}

  has(name: string): boolean {
    return this.flags.has(name);
  }

  /** The value of a flag that takes one, or undefined when not given. */
  value(name: string): string | undefined {
    const v = this.flags.get(name);
    return typeof v === 'string' ? v : undefined;
  }
}

export function parseArgs(args: readonly string[], spec: CommandSpec): ParsedArgs {
  const positionals: string[] = [];
  const flags = new Map<string, string | true>();
  const known = new Map(spec.flags.map((f) => [f.name, f]));
  let onlyPositionals = false;
  for (let k = 0; k < args.length; k++) {
    const arg = args[k];
    if (onlyPositionals || !arg.startsWith('--') || arg === '-') {
      if (!onlyPositionals && arg.startsWith('-') && arg !== '-') throw new UsageError(`unknown option ${arg}`);
      positionals.push(arg);
      continue;
    }
    if (arg === '--') {
      onlyPositionals = true;
      continue;
    }
    const equals = arg.indexOf('=');
    const name = arg.slice(2, equals < 0 ? undefined : equals);
    const flag = known.get(name);
    if (!flag) throw new UsageError(`unknown option --${name} for "${spec.name}"`);
    if (flags.has(name)) throw new UsageError(`option --${name} given twice`);
    if (flag.value === undefined) {
      if (equals >= 0) throw new UsageError(`option --${name} takes no value`);
      flags.set(name, true);
    } else if (equals >= 0) {
      flags.set(name, arg.slice(equals + 1));
    } else {
      const next = args[k + 1];
      if (next === undefined || next.startsWith('--')) throw new UsageError(`option --${name} needs a value (${flag.value})`);
      flags.set(name, next);
      k++;
    }
  }
  const required = spec.positionals.filter((p) => !p.optional).length;
  if (positionals.length < required) throw new UsageError(`missing ${spec.positionals[positionals.length].name}`);
  if (positionals.length > spec.positionals.length) throw new UsageError(`unexpected argument "${positionals[spec.positionals.length]}"`);
  return new ParsedArgs(positionals, flags);
}

/** "graph-curator validate <folder> [--json]" */
export function usageLine(spec: CommandSpec): string {
  const parts = ['graph-curator', spec.name];
  for (const p of spec.positionals) parts.push(p.optional ? `[${p.name}]` : `<${p.name}>`);
  for (const f of spec.flags) parts.push(f.value ? `[--${f.name} ${f.value}]` : `[--${f.name}]`);
  return parts.join(' ');
}

/** Full help for one command. */
export function commandHelp(spec: CommandSpec): string {
  const lines = [`Usage: ${usageLine(spec)}`, '', spec.summary];
  if (spec.details) lines.push('', spec.details);
  if (spec.flags.length > 0) {
    lines.push('', 'Options:');
    const labels = spec.flags.map((f) => `--${f.name}${f.value ? ` ${f.value}` : ''}`);
    const width = Math.max(...labels.map((l) => l.length));
    spec.flags.forEach((f, k) => lines.push(`  ${labels[k].padEnd(width)}  ${f.description}`));
  }
  return lines.join('\n') + '\n';
}
