import { defineCommand } from '../command';
import { printOut } from '../output';

export const command = defineCommand({
  usage: `usage: stemwise migrate

Creates the database schema, or upgrades it to this version's; running it again changes nothing.
The database is DATABASE_URL, or the embedded one in STEMWISE_DATA_DIR when that is unset.
`,
  options: {},
  async run(_args, rt) {
    const db = await rt.db();
    const [{ n }] = await db.query<{ n: number }>(`select count(*)::int as n from drizzle.__drizzle_migrations`);
    printOut(`database ready (${db.kind === 'pglite' ? `embedded, ${rt.config.dataDir}` : 'PostgreSQL'}; ${n} migration${n === 1 ? '' : 's'} applied)\n`);
    return 0;
  },
});
