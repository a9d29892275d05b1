import { oneLine, StemwiseError } from '@stemwise/platform';
import { Runtime } from './runtime';

type Command = { summary: string; run(args: string[], rt: Runtime): Promise<number> };

// One module per command, loaded when it runs.
const COMMANDS: Record<string, () => Promise<Command>> = {
  migrate: () => import('./commands/migrate'),
  species: () => import('./commands/species'),
  upload: () => import('./commands/upload'),
  batch: () => import('./commands/batch'),
  recompute: () => import('./commands/recompute'),
  export: () => import('./commands/export'),
  serve: () => import('./commands/serve'),
  token: () => import('./commands/token'),
  demo: () => import('./commands/demo'),
};

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
