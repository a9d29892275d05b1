import { bigint, doublePrecision, index, integer, jsonb, pgTable, primaryKey, timestamp } from 'drizzle-orm/pg-core';
import { plots, plotVisits } from './plots';
import { speciesVersions } from './species';

/**
 * Change of a plot between two consecutive visits (the `export change` columns; rules in
 * docs/methods.md#change-between-visits). Rewritten for the whole plot whenever one of its visits is
 * computed, so an inserted, replaced or deleted visit leaves no pair that is no longer consecutive.
 */
export const plotChange = pgTable(
  'plot_change',
  {
    plotId: bigint('plot_id', { mode: 'number' })
      .notNull()
      .references(() => plots.id, { onDelete: 'cascade' }),
    visitFromId: bigint('visit_from_id', { mode: 'number' })
      .notNull()
      .references(() => plotVisits.id, { onDelete: 'cascade' }),
    visitToId: bigint('visit_to_id', { mode: 'number' })
      .notNull()
      .references(() => plotVisits.id, { onDelete: 'cascade' }),
    speciesVersionId: integer('species_version_id').references(() => speciesVersions.id, { onDelete: 'set null' }),
    years: doublePrecision('years').notNull(),
    dbhThresholdCm: doublePrecision('dbh_threshold_cm').notNull(),
    nStart: integer('n_start').notNull(),
    nSurvivors: integer('n_survivors').notNull(),
    nDied: integer('n_died').notNull(),
    nRemoved: integer('n_removed').notNull(),
    nRecruits: integer('n_recruits').notNull(),
    mortalityRate: doublePrecision('mortality_rate'),
    recruitmentRate: doublePrecision('recruitment_rate'),
    mortalityAnnual: doublePrecision('mortality_annual'),
    recruitmentAnnual: doublePrecision('recruitment_annual'),
    dbhIncrementCmYr: doublePrecision('dbh_increment_cm_yr'),
    baChangeM2HaYr: doublePrecision('ba_change_m2_ha_yr').notNull(),
    agbGrowthMgHaYr: doublePrecision('agb_growth_mg_ha_yr').notNull(),
    agbRecruitmentMgHaYr: doublePrecision('agb_recruitment_mg_ha_yr').notNull(),
    agbLossMgHaYr: doublePrecision('agb_loss_mg_ha_yr').notNull(),
    agbNetChangeMgHaYr: doublePrecision('agb_net_change_mg_ha_yr').notNull(),
    carbonNetChangeMgHaYr: doublePrecision('carbon_net_change_mg_ha_yr').notNull(),
    nAbsent: integer('n_absent').notNull(),
    baGrowthM2HaYr: doublePrecision('ba_growth_m2_ha_yr').notNull(),
    baRecruitmentM2HaYr: doublePrecision('ba_recruitment_m2_ha_yr').notNull(),
    baLossM2HaYr: doublePrecision('ba_loss_m2_ha_yr').notNull(),
    agbDiedMgHaYr: doublePrecision('agb_died_mg_ha_yr').notNull(),
    agbRemovedMgHaYr: doublePrecision('agb_removed_mg_ha_yr').notNull(),
    // Carbon pools (docs/methods.md#change-between-visits); empty in rows written before they existed.
    bgbNetChangeMgHaYr: doublePrecision('bgb_net_change_mg_ha_yr'),
    standingDeadNetChangeMgHaYr: doublePrecision('standing_dead_net_change_mg_ha_yr'),
    treeCarbonNetChangeMgHaYr: doublePrecision('tree_carbon_net_change_mg_ha_yr'),
    // The sums of the carbon change's whole uncertainty (core's CarbonSums; the tree pool change's, core's TreeChangeMoments, under
    // the key `trees`; docs/methods.md#carbon-uncertainty); null in rows written before they were kept.
    carbonMoments: jsonb('carbon_moments'),
    computedAt: timestamp('computed_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ name: 'plot_change_pk', columns: [t.visitFromId, t.visitToId] }), index('plot_change_plot_idx').on(t.plotId)],
);
