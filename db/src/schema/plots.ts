import { bigint, bigserial, boolean, check, date, doublePrecision, index, integer, pgTable, primaryKey, smallint, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';
import { batches } from './batches';
import { forestTypes } from './forest-types';
import { regions } from './regions';

/** A permanent sample plot; its measurements are visits. */
export const plots = pgTable(
  'plots',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    plotKey: text('plot_key').notNull().unique(),
    regionId: integer('region_id')
      .notNull()
      .references(() => regions.id),
    forestType: text('forest_type')
      .notNull()
      .references(() => forestTypes.code),
    latitude: doublePrecision('latitude').notNull(),
    longitude: doublePrecision('longitude').notNull(),
    elevationM: doublePrecision('elevation_m'),
  },
  (t) => [
    check('plots_key_chk', sql`${t.plotKey} ~ '^[A-Za-z0-9_.-]{1,64}$'`),
    check('plots_lat_chk', sql`${t.latitude} between -90 and 90`),
    check('plots_lon_chk', sql`${t.longitude} between -180 and 180`),
    index('plots_region_idx').on(t.regionId),
    index('plots_forest_type_idx').on(t.forestType),
  ],
);

/** One measurement of a plot; a re-measurement on a later date is a new visit of the same plot. */
export const plotVisits = pgTable(
  'plot_visits',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    plotId: bigint('plot_id', { mode: 'number' })
      .notNull()
      .references(() => plots.id, { onDelete: 'cascade' }),
    surveyDate: date('survey_date', { mode: 'string' }).notNull(),
    batchId: uuid('batch_id')
      .notNull()
      .references(() => batches.id),
    areaHa: doublePrecision('area_ha').notNull(),
    dbhMinCm: doublePrecision('dbh_min_cm').notNull().default(10),
    subplotAreaHa: doublePrecision('subplot_area_ha').notNull().default(0),
    subplotDbhMinCm: doublePrecision('subplot_dbh_min_cm').notNull().default(5),
    loggingClass: smallint('logging_class').notNull(),
    fireClass: smallint('fire_class').notNull(),
    /** Metrics must be (re)computed: set on load and by a new species reference version. */
    stale: boolean('stale').notNull().default(true),
    loadedAt: timestamp('loaded_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    unique('plot_visits_plot_date_uq').on(t.plotId, t.surveyDate),
    check('plot_visits_area_chk', sql`${t.areaHa} > 0 and ${t.areaHa} <= 25`),
    check('plot_visits_subplot_chk', sql`${t.subplotAreaHa} >= 0 and ${t.subplotAreaHa} < ${t.areaHa}`),
    check('plot_visits_dbh_min_chk', sql`${t.dbhMinCm} > 0 and ${t.subplotDbhMinCm} > 0`),
    check('plot_visits_logging_chk', sql`${t.loggingClass} between 0 and 3`),
    check('plot_visits_fire_chk', sql`${t.fireClass} between 0 and 3`),
    check('plot_visits_date_chk', sql`${t.surveyDate} >= date '1800-01-01'`),
    index('plot_visits_batch_idx').on(t.batchId),
    index('plot_visits_stale_idx').on(t.stale).where(sql`${t.stale}`),
  ],
);

/** One stem of a visit. */
export const stems = pgTable(
  'stems',
  {
    // References plot_visits.id, enforced by statement-level triggers (migration 0002) instead of a
    // declared foreign key: a per-row foreign key check costs 3.5 s per million stems loaded.
    visitId: bigint('visit_id', { mode: 'number' }).notNull(),
    treeId: text('tree_id').notNull(),
    species: text('species'),
    dbhCm: doublePrecision('dbh_cm').notNull(),
    heightM: doublePrecision('height_m'),
    status: text('status').notNull(),
    stumpCause: text('stump_cause'),
    fireDamage: smallint('fire_damage').notNull().default(0),
    inSubplot: boolean('in_subplot').notNull().default(false),
  },
  (t) => [
    // The natural key is the primary key: no surrogate id, so a bulk COPY maintains one index fewer.
    primaryKey({ name: 'stems_pkey', columns: [t.visitId, t.treeId] }),
    check('stems_tree_id_chk', sql`char_length(${t.treeId}) between 1 and 64`),
    check('stems_dbh_chk', sql`${t.dbhCm} > 0 and ${t.dbhCm} <= 500`),
    check('stems_height_chk', sql`${t.heightM} is null or (${t.heightM} > 1.3 and ${t.heightM} <= 100)`),
    check('stems_status_chk', sql`${t.status} in ('live','dead','stump')`),
    check(
      'stems_stump_cause_chk',
      sql`(${t.status} = 'stump' and ${t.stumpCause} in ('logged','natural','unknown')) or (${t.status} <> 'stump' and ${t.stumpCause} is null)`,
    ),
    check('stems_fire_chk', sql`${t.fireDamage} between 0 and 3`),
  ],
);
