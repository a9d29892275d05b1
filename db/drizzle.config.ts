import { defineConfig } from 'drizzle-kit';

// `npm run db:generate` writes SQL migrations from the schema; they are committed and never edited once merged.
export default defineConfig({
  dialect: 'postgresql',
  schema: './db/src/schema/index.ts',
  out: './db/migrations',
});
