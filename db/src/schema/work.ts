import { check, integer, jsonb, pgTable, primaryKey, text, timestamp } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';

/**
 * Stale marks after plot metrics: fits of a forest type, summaries of a region. A plot-chunk job sets
 * them in the transaction that writes its metrics; the fits and summaries jobs clear them.
 */
export const staleWork = pgTable(
  'stale_work',
  {
    kind: text('kind').notNull(),
    key: text('key').notNull(),
    since: timestamp('since', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    check('stale_work_kind_chk', sql`${t.kind} in ('fits','summary')`),
    primaryKey({ name: 'stale_work_pk', columns: [t.kind, t.key] }),
  ],
);

/** A recompute: what triggered it, its state, and what it covered. */
export const recomputeRuns = pgTable(
  'recompute_runs',
  {
    id: text('id').primaryKey(),
    trigger: text('trigger').notNull(),
    state: text('state').notNull().default('queued'),
    visits: integer('visits').notNull().default(0),
    details: jsonb('details').notNull().default({}),
    startedAt: timestamp('started_at', { withTimezone: true }).notNull().defaultNow(),
    finishedAt: timestamp('finished_at', { withTimezone: true }),
  },
  (t) => [check('recompute_runs_state_chk', sql`${t.state} in ('queued','running','done','failed')`)],
);
