import type { Runtime } from '../runtime';

export const summary = 'creates or upgrades the database schema';

export async function run(_args: string[], rt: Runtime): Promise<number> {
  const db = await rt.db();
  const [{ n }] = await db.query<{ n: number }>(`select count(*)::int as n from drizzle.__drizzle_migrations`);
  process.stdout.write(`database ready (${db.kind === 'pglite' ? `embedded, ${rt.config.dataDir}` : 'PostgreSQL'}; ${n} migration${n === 1 ? '' : 's'} applied)\n`);
  return 0;
}
