import { bigint, check, integer, jsonb, pgTable, primaryKey, text, timestamp } from 'drizzle-orm/pg-core';
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

/**
 * What a recompute could not compute, one row per subject: a plot visit whose metrics failed (`plot`),
 * a forest type or region × forest type whose fit failed (`fit`), a plot whose change between visits
 * failed (`change`, subject: the plot key), a region whose summary failed
 * (`summary`). The others are computed all the same; the subject's stale mark is cleared so no run
 * retries it until its data change. A later success removes the row; `run_id` is the run that met it.
 */
export const computeProblems = pgTable(
  'compute_problems',
  {
    stage: text('stage').notNull(),
    /** The key within the stage: the visit id, the forest type, the forest type and region, the region. */
    subject: text('subject').notNull(),
    runId: text('run_id').notNull(),
    forestType: text('forest_type'),
    region: text('region'),
    visitId: bigint('visit_id', { mode: 'number' }),
    plotKey: text('plot_key'),
    reason: text('reason').notNull(),
    recordedAt: timestamp('recorded_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    primaryKey({ name: 'compute_problems_pk', columns: [t.stage, t.subject] }),
    check('compute_problems_stage_chk', sql`${t.stage} in ('plot','fit','summary','change')`),
  ],
);
