import {
  bigint,
  doublePrecision,
  integer,
  jsonb,
  pgTable,
  text,
  timestamp,
  type PgDoublePrecisionBuilderInitial,
  type PgIntegerBuilderInitial,
} from 'drizzle-orm/pg-core';
import { PLOT_METRICS, type PlotMetricEntry } from '../catalogue/plot-metrics';
import { plotVisits } from './plots';
import { speciesVersions } from './species';

/** One column builder per catalogue entry, typed by its SQL type and named by its column. */
type PlotMetricColumnBuilders = {
  [E in PlotMetricEntry as E['key']]: E['sqlType'] extends 'int' ? PgIntegerBuilderInitial<E['column']> : PgDoublePrecisionBuilderInitial<E['column']>;
};

// The metric columns of plot_metrics come from the catalogue (nullable: a visit's row is written whole).
function plotMetricColumns(): PlotMetricColumnBuilders {
  return Object.fromEntries(PLOT_METRICS.map((m) => [m.key, m.sqlType === 'int' ? integer(m.column) : doublePrecision(m.column)])) as PlotMetricColumnBuilders;
}

/** Per-visit figures (the `export plots` columns) and their diagnostics; a rerun overwrites the row. */
export const plotMetrics = pgTable('plot_metrics', {
  visitId: bigint('visit_id', { mode: 'number' })
    .primaryKey()
    .references(() => plotVisits.id, { onDelete: 'cascade' }),
  speciesVersionId: integer('species_version_id').references(() => speciesVersions.id, { onDelete: 'set null' }),
  ...plotMetricColumns(),
  /** Wood-density level shares, height sources, unresolved names. */
  diagnostics: jsonb('diagnostics').notNull().default({}),
  /**
   * Accepted name → live main-plot stems (any diameter) of the visit, resolved against the reference of
   * species_version_id: what the region summaries count species from, so they never read stems. Null: the
   * row was written before this column existed (its visit is due again).
   */
  speciesStems: jsonb('species_stems').$type<Record<string, number>>(),
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
