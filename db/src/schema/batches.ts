import { bigint, bigserial, check, index, integer, jsonb, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';

export const BATCH_STATES = ['received', 'validating', 'rejected', 'loaded', 'computed', 'failed'] as const;

/** One upload: its files live in the storage folder under its id; its state is the source of truth. */
export const batches = pgTable(
  'batches',
  {
    id: uuid('id').primaryKey(),
    state: text('state').notNull().default('received'),
    contentHash: text('content_hash').notNull(),
    /** Which files came, their names and sizes, and the options (skip_invalid, replace, delimiter…). */
    files: jsonb('files').notNull(),
    options: jsonb('options').notNull().default({}),
    submittedBy: text('submitted_by').notNull().default('cli'),
    plotsRows: integer('plots_rows').notNull().default(0),
    treesRows: integer('trees_rows').notNull().default(0),
    plotsLoaded: integer('plots_loaded').notNull().default(0),
    stemsLoaded: integer('stems_loaded').notNull().default(0),
    rowsSkipped: integer('rows_skipped').notNull().default(0),
    nErrors: integer('n_errors').notNull().default(0),
    nWarnings: integer('n_warnings').notNull().default(0),
    bytesTotal: bigint('bytes_total', { mode: 'number' }).notNull().default(0),
    bytesRead: bigint('bytes_read', { mode: 'number' }).notNull().default(0),
    rowsChecked: integer('rows_checked').notNull().default(0),
    rowsLoaded: integer('rows_loaded').notNull().default(0),
    attempts: integer('attempts').notNull().default(0),
    failureReason: text('failure_reason'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
    loadedAt: timestamp('loaded_at', { withTimezone: true }),
  },
  (t) => [
    check('batches_state_chk', sql`${t.state} in ('received','validating','rejected','loaded','computed','failed')`),
    // The same content is one batch, unless the earlier one was rejected or failed.
    uniqueIndex('batches_live_content_uq').on(t.contentHash).where(sql`${t.state} not in ('rejected','failed')`),
    index('batches_state_idx').on(t.state),
  ],
);

/** Row errors and warnings of a batch, each with its rule code, file, line and column. */
export const batchIssues = pgTable(
  'batch_issues',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    batchId: uuid('batch_id')
      .notNull()
      .references(() => batches.id, { onDelete: 'cascade' }),
    severity: text('severity').notNull(),
    rule: text('rule').notNull(),
    file: text('file').notNull(),
    line: integer('line'),
    column: text('column'),
    value: text('value'),
    message: text('message').notNull(),
  },
  (t) => [
    check('batch_issues_severity_chk', sql`${t.severity} in ('error','warning')`),
    index('batch_issues_batch_idx').on(t.batchId, t.severity, t.rule),
  ],
);

/** Names of a batch's stems that did not resolve against the species reference, with stem counts. */
export const batchUnresolvedNames = pgTable(
  'batch_unresolved_names',
  {
    batchId: uuid('batch_id')
      .notNull()
      .references(() => batches.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    level: text('level').notNull(),
    stems: integer('stems').notNull(),
  },
  (t) => [uniqueIndex('batch_unresolved_uq').on(t.batchId, t.name)],
);
