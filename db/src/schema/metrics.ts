import { bigint, doublePrecision, integer, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';
import { plotVisits } from './plots';
import { speciesVersions } from './species';

/** Per-visit figures (the `export plots` columns) and their diagnostics; a rerun overwrites the row. */
export const plotMetrics = pgTable('plot_metrics', {
  visitId: bigint('visit_id', { mode: 'number' })
    .primaryKey()
    .references(() => plotVisits.id, { onDelete: 'cascade' }),
  speciesVersionId: integer('species_version_id').references(() => speciesVersions.id, { onDelete: 'set null' }),
  stemsHa: doublePrecision('stems_ha'),
  basalAreaM2Ha: doublePrecision('basal_area_m2_ha'),
  qmdCm: doublePrecision('qmd_cm'),
  agbMgHa: doublePrecision('agb_mg_ha'),
  carbonMgHa: doublePrecision('carbon_mg_ha'),
  nIdentified: integer('n_identified'),
  richness: integer('richness'),
  shannon: doublePrecision('shannon'),
  simpson: doublePrecision('simpson'),
  invSimpson: doublePrecision('inv_simpson'),
  pielou: doublePrecision('pielou'),
  fisherAlpha: doublePrecision('fisher_alpha'),
  rarefied50: doublePrecision('rarefied_50'),
  chao1: doublePrecision('chao1'),
  pioneerBaShare: doublePrecision('pioneer_ba_share'),
  lightDemanderBaShare: doublePrecision('light_demander_ba_share'),
  shadeTolerantBaShare: doublePrecision('shade_tolerant_ba_share'),
  unassignedBaShare: doublePrecision('unassigned_ba_share'),
  loggingRemovedBaFrac: doublePrecision('logging_removed_ba_frac'),
  loggingScore: doublePrecision('logging_score'),
  fireScore: doublePrecision('fire_score'),
  disturbanceIndex: doublePrecision('disturbance_index'),
  /** Wood-density level shares, height sources, unresolved names. */
  diagnostics: jsonb('diagnostics').notNull().default({}),
  computedAt: timestamp('computed_at', { withTimezone: true }).notNull().defaultNow(),
});

/** Height–diameter model per forest type, fitted on measured heights. */
export const heightModels = pgTable('height_models', {
  forestType: text('forest_type').primaryKey(),
  form: text('form').notNull(),
  coefficients: jsonb('coefficients').notNull(),
  stats: jsonb('stats').notNull(),
  fittedAt: timestamp('fitted_at', { withTimezone: true }).notNull().defaultNow(),
});
