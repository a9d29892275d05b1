import { parseArgs, type ParseArgsConfig } from 'node:util';
import { StemwiseError, type LogFormat } from '@stemwise/platform';
import { printOut } from './output';
import type { Runtime } from './runtime';

// Every command declares what it accepts; main() answers --help and refuses unknown options for all of
// them the same way, before anything is opened (no configuration read, no database, no queue).

export type OptionSpecs = NonNullable<ParseArgsConfig['options']>;
type StrictConfig<O extends OptionSpecs> = { args: string[]; options: O; allowPositionals: true; strict: true };
export type Parsed<O extends OptionSpecs> = { values: ReturnType<typeof parseArgs<StrictConfig<O>>>['values']; positionals: string[] };

/** A command (or a subcommand) that does one thing. */
export interface CommandSpec<O extends OptionSpecs = OptionSpecs> {
  /** A subcommand's line in the usage of its group (a command's line in `stemwise --help` is in main.ts, so that help loads no command). */
  summary?: string;
  /** What `--help` prints: starts with `usage:`. */
  usage: string;
  options: O;
  /** Takes positional arguments (otherwise any is a usage error). */
  positionals?: boolean;
  /** Format of its logs when STEMWISE_LOG_FORMAT is unset: text for commands, json for services. */
  logs?: LogFormat;
  run(args: Parsed<O>, rt: Runtime): Promise<number>;
}

// A command's own option types matter only inside its run(); here any command fits.
type AnySpec = CommandSpec<any>;

/** A command made of subcommands (`token create|list|revoke`). */
export interface CommandGroup {
  usage: string;
  subcommands: Record<string, AnySpec>;
}

export type Command = AnySpec | CommandGroup;

/** Keeps the option types of a command for its run(). */
export const defineCommand = <O extends OptionSpecs>(spec: CommandSpec<O>): CommandSpec<O> => spec;

/** What to do with the arguments of one command: print its help, or run it with the parsed arguments. */
export type Resolved = { help: string } | { spec: AnySpec; parsed: Parsed<OptionSpecs> };

/** `--help` or `-h` anywhere before a `--`. */
function asksForHelp(args: readonly string[]): boolean {
  const end = args.indexOf('--');
  return (end < 0 ? args : args.slice(0, end)).some((a) => a === '--help' || a === '-h');
}

/** A usage error of one line, `<command> <message>` (main() exits 2); the whole usage is one `--help` away. */
export function usageError(path: string, message: string): StemwiseError {
  return new StemwiseError('usage', `${path} ${message} (see 'stemwise ${path} --help')`);
}

/** `a, b or c` */
const either = (names: string[]) => (names.length > 1 ? `${names.slice(0, -1).join(', ')} or ${names[names.length - 1]}` : names[0]);

/** Finds the (sub)command the arguments name and parses them strictly; throws a usage error. */
export function resolveCommand(name: string, command: Command, args: string[]): Resolved {
  let spec: AnySpec;
  let path = name;
  if ('subcommands' in command) {
    const [sub, ...rest] = args;
    const subs = Object.keys(command.subcommands);
    if (sub === undefined || !(sub in command.subcommands)) {
      if (asksForHelp(args)) return { help: command.usage };
      throw usageError(name, sub === undefined ? `needs ${either(subs)}` : `has no subcommand '${sub}' (it needs ${either(subs)})`);
    }
    spec = command.subcommands[sub];
    path = `${name} ${sub}`;
    args = rest;
  } else {
    spec = command;
  }
  if (asksForHelp(args)) return { help: spec.usage };
  try {
    const parsed = parseArgs({ args, options: spec.options, allowPositionals: true, strict: true });
    if (!spec.positionals && parsed.positionals.length) throw new Error(`Unexpected argument '${parsed.positionals[0]}'`);
    return { spec, parsed };
  } catch (err) {
    // Node's messages go on with advice about `--`; the first sentence is the point.
    throw new StemwiseError('usage', `${path}: ${(err as Error).message.split('\n')[0].replace(/\. .*$/, '')} (see 'stemwise ${path} --help')`);
  }
}

/** Resolves and runs a command on a runtime already open (as main() does, less the runtime and error line). */
export async function runCommand(name: string, command: Command, args: string[], rt: Runtime): Promise<number> {
  const resolved = resolveCommand(name, command, args);
  if ('help' in resolved) {
    printOut(resolved.help);
    return 0;
  }
  return resolved.spec.run(resolved.parsed, rt);
}
