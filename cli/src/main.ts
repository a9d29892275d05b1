import { oneLine, StemwiseError } from '@stemwise/platform';
import { Runtime } from './runtime';

type Command = { summary: string; run(args: string[], rt: Runtime): Promise<number> };

// One module per command; a command whose issue has not landed yet says so plainly.
const COMMANDS: Record<string, () => Promise<Command>> = {
  migrate: () => import('./commands/migrate'),
  species: () => notYet('species import', 'loads a species reference list'),
  upload: () => notYet('upload', 'submits a batch'),
  batch: () => notYet('batch show', 'shows a batch'),
  recompute: () => notYet('recompute', 'recomputes stale results'),
  export: () => notYet('export', 'writes plots, fits or regions'),
  serve: () => notYet('serve', 'runs services and workers'),
  token: () => notYet('token create', 'creates an access token'),
  demo: () => notYet('demo', 'runs the whole pipeline on the demo inventory'),
};

async function notYet(name: string, summary: string): Promise<Command> {
  return {
    summary,
    async run() {
      throw new StemwiseError('not_yet', `'stemwise ${name}' is not available yet in this version`);
    },
  };
}

async function usage(): Promise<string> {
  const lines = ['usage: stemwise <command> [options]', '', 'commands:'];
  for (const [name, load] of Object.entries(COMMANDS)) lines.push(`  ${name.padEnd(10)} ${(await load()).summary}`);
  lines.push('', 'Without DATABASE_URL the database is embedded (PGlite); without REDIS_URL jobs run in-process.');
  return lines.join('\n') + '\n';
}

/** Runs one command; returns the exit code. Errors are one line on stderr, never a stack trace. */
export async function main(argv: string[], env: Readonly<Record<string, string | undefined>> = process.env): Promise<number> {
  const [name, ...args] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    process.stdout.write(await usage());
    return name ? 0 : 2;
  }
  const load = COMMANDS[name];
  if (!load) {
    process.stderr.write(`stemwise: unknown command '${name}'\n${await usage()}`);
    return 2;
  }
  let rt: Runtime | null = null;
  try {
    rt = new Runtime(env);
    return await (await load()).run(args, rt);
  } catch (err) {
    process.stderr.write(`stemwise: ${oneLine(err)}\n`);
    if (!(err instanceof StemwiseError) && env.STEMWISE_LOG_LEVEL === 'debug') console.error(err);
    return err instanceof StemwiseError && err.code === 'usage' ? 2 : 1;
  } finally {
    await rt?.close();
  }
}
