import { check, doublePrecision, integer, jsonb, pgTable, primaryKey, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';
import { batches } from './batches';
import { regions } from './regions';

/** Forest area of a region × forest type (strata.csv), for stratified means and totals. */
export const strata = pgTable(
  'strata',
  {
    regionId: integer('region_id')
      .notNull()
      .references(() => regions.id),
    forestType: text('forest_type').notNull(),
    forestAreaHa: doublePrecision('forest_area_ha').notNull(),
    batchId: uuid('batch_id').references(() => batches.id, { onDelete: 'set null' }),
  },
  (t) => [primaryKey({ name: 'strata_pk', columns: [t.regionId, t.forestType] }), check('strata_area_chk', sql`${t.forestAreaHa} > 0`)],
);

/** A region's summary as assembled after a recompute; the API serves the latest or any earlier version. */
export const regionSummaries = pgTable(
  'region_summaries',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    regionId: integer('region_id')
      .notNull()
      .references(() => regions.id),
    version: integer('version').notNull(),
    etag: text('etag').notNull(),
    payload: jsonb('payload').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    /** Keys of the plots the version summarised (byte order), for "what changed" against the version before; null in versions made before it was kept. */
    plotKeys: text('plot_keys').array(),
    /** What the national summary needs of the version's plots without reading them (services/report region-aggregates.ts); kept on the latest version only, null on earlier ones and on versions made before it was kept. */
    aggregates: jsonb('aggregates'),
  },
  (t) => [unique('region_summaries_version_uq').on(t.regionId, t.version)],
);

/**
 * The national summary (all regions, stratified by region × forest type) as assembled by the same
 * report job as the region summaries; versioned like them, never updated.
 */
export const nationalSummaries = pgTable(
  'national_summaries',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    version: integer('version').notNull(),
    etag: text('etag').notNull(),
    payload: jsonb('payload').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [unique('national_summaries_version_uq').on(t.version)],
);
