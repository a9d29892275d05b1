import { oneLine, StemwiseError } from '@stemwise/platform';
import { resolveCommand, type Command } from './command';
import { printErr, printOut } from './output';
import type { Runtime } from './runtime';

// One module per command, each exporting `command` (its usage, options and run), loaded only when that
// command runs or shows its help. The one-line summaries live here, so `stemwise --help` loads no command
// module and none of what they import (the services, the database drivers, the queue, vega): compiled,
// it answers in well under a second (the build splits each command's code into chunks of its own).
const COMMANDS: Record<string, { summary: string; load: () => Promise<Command> }> = {
  migrate: { summary: 'creates or upgrades the database schema', load: async () => (await import('./commands/migrate')).command },
  species: { summary: 'loads the species reference list: species import FILE (a new version)', load: async () => (await import('./commands/species')).command },
  upload: { summary: 'submits a batch: upload DIR | --plots F --trees F [--strata F] [--species F] [--wait]', load: async () => (await import('./commands/upload')).command },
  batch: { summary: 'shows a batch: batch show ID [--format text|json] [--errors-csv FILE]', load: async () => (await import('./commands/batch')).command },
  recompute: { summary: 'recomputes what new plots made stale: recompute [--now] [--all]', load: async () => (await import('./commands/recompute')).command },
  export: {
    summary: 'writes results: export plots|change|fits|regions [--format csv|json|geojson] [--out FILE] [--axis A] [--metric M] [--region R]',
    load: async () => (await import('./commands/export')).command,
  },
  serve: { summary: 'runs services and workers: serve [ingest|compute|report|all]', load: async () => (await import('./commands/serve')).command },
  token: {
    summary: 'access tokens: token create --role admin|uploader|reader [--region R]… [--label L] | token list | token revoke ID',
    load: async () => (await import('./commands/token')).command,
  },
  demo: { summary: 'runs the whole pipeline on the demo inventory and writes a report folder', load: async () => (await import('./commands/demo')).command },
};

/** The command names, for tests that walk every command. */
export const COMMAND_NAMES = Object.keys(COMMANDS);

/** A command by name (with its subcommands), without running anything. */
export async function loadCommand(name: string): Promise<Command | undefined> {
  return COMMANDS[name]?.load();
}

function usage(): string {
  const lines = ['usage: stemwise <command> [options]', '', 'commands:'];
  for (const [name, { summary }] of Object.entries(COMMANDS)) lines.push(`  ${name.padEnd(10)} ${summary}`);
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
    printOut(usage());
    return name ? 0 : 2;
  }
  const entry = COMMANDS[name];
  if (!entry) {
    printErr(`stemwise: unknown command '${name}'\n${usage()}`);
    return 2;
  }
  let rt: Runtime | null = null;
  try {
    const resolved = resolveCommand(name, await entry.load(), args);
    if ('help' in resolved) {
      printOut(resolved.help);
      return 0;
    }
    rt = new (await import('./runtime')).Runtime(env, resolved.spec.logs ?? 'text');
    return await resolved.spec.run(resolved.parsed, rt);
  } catch (err) {
    printErr(`stemwise: ${oneLine(err)}\n`);
    if (!(err instanceof StemwiseError) && env.STEMWISE_LOG_LEVEL === 'debug') console.error(err);
    return err instanceof StemwiseError && err.code === 'usage' ? 2 : 1;
  } finally {
    await rt?.close();
  }
}
