import { oneLine, StemwiseError } from '@stemwise/platform';
import { resolveCommand, type Command } from './command';
import { printErr, printOut } from './output';
import { Runtime } from './runtime';

// One module per command, each exporting `command` (its usage, options and run).
const COMMANDS: Record<string, () => Promise<Command>> = {
  migrate: async () => (await import('./commands/migrate')).command,
  species: async () => (await import('./commands/species')).command,
  upload: async () => (await import('./commands/upload')).command,
  batch: async () => (await import('./commands/batch')).command,
  recompute: async () => (await import('./commands/recompute')).command,
  export: async () => (await import('./commands/export')).command,
  serve: async () => (await import('./commands/serve')).command,
  token: async () => (await import('./commands/token')).command,
  demo: async () => (await import('./commands/demo')).command,
};

/** The command names, for tests that walk every command. */
export const COMMAND_NAMES = Object.keys(COMMANDS);

/** A command by name (with its subcommands), without running anything. */
export async function loadCommand(name: string): Promise<Command | undefined> {
  return COMMANDS[name]?.();
}

async function usage(): Promise<string> {
  const lines = ['usage: stemwise <command> [options]', '', 'commands:'];
  for (const [name, load] of Object.entries(COMMANDS)) lines.push(`  ${name.padEnd(10)} ${(await load()).summary}`);
  lines.push(
    '',
    "'stemwise <command> --help' shows the options of a command. An unknown option is a usage error (exit code 2).",
    'Without DATABASE_URL the database is embedded (PGlite); without REDIS_URL jobs run in-process.',
  );
  return lines.join('\n') + '\n';
}

/** Runs one command; returns the exit code. Errors are one line on stderr, never a stack trace. */
export async function main(argv: string[], env: Readonly<Record<string, string | undefined>> = process.env): Promise<number> {
  const [name, ...args] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    printOut(await usage());
    return name ? 0 : 2;
  }
  const load = COMMANDS[name];
  if (!load) {
    printErr(`stemwise: unknown command '${name}'\n${await usage()}`);
    return 2;
  }
  let rt: Runtime | null = null;
  try {
    const resolved = resolveCommand(name, await load(), args);
    if ('help' in resolved) {
      printOut(resolved.help);
      return 0;
    }
    rt = new Runtime(env, resolved.spec.logs ?? 'text');
    return await resolved.spec.run(resolved.parsed, rt);
  } catch (err) {
    printErr(`stemwise: ${oneLine(err)}\n`);
    if (!(err instanceof StemwiseError) && env.STEMWISE_LOG_LEVEL === 'debug') console.error(err);
    return err instanceof StemwiseError && err.code === 'usage' ? 2 : 1;
  } finally {
    await rt?.close();
  }
}
