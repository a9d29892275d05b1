import { check, doublePrecision, integer, jsonb, pgTable, primaryKey, text, timestamp } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';

/**
 * Diversity–disturbance fits. `scope_kind` says what was fitted: `forest_type` (the forest type as a
 * whole; `scope` holds the label `all`) or `region` (`scope` holds the region's name). The kind is part
 * of the key, so a region may have any name, `all` included.
 */
export const curveFits = pgTable(
  'curve_fits',
  {
    scopeKind: text('scope_kind').notNull().default('region'),
    scope: text('scope').notNull(),
    forestType: text('forest_type').notNull(),
    metric: text('metric').notNull(),
    axis: text('axis').notNull(),
    model: text('model').notNull(),
    n: integer('n').notNull(),
    b0: doublePrecision('b0'),
    b1: doublePrecision('b1'),
    b2: doublePrecision('b2'),
    seB0: doublePrecision('se_b0'),
    seB1: doublePrecision('se_b1'),
    seB2: doublePrecision('se_b2'),
    pB1: doublePrecision('p_b1'),
    pB2: doublePrecision('p_b2'),
    r2: doublePrecision('r2'),
    adjR2: doublePrecision('adj_r2'),
    aicc: doublePrecision('aicc'),
    peakX: doublePrecision('peak_x'),
    peakCiLow: doublePrecision('peak_ci_low'),
    peakCiHigh: doublePrecision('peak_ci_high'),
    verdict: text('verdict').notNull(),
    /** Tests, reasons, bootstrap interval, chart SVG. */
    details: jsonb('details').notNull().default({}),
    computedAt: timestamp('computed_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    primaryKey({ name: 'curve_fits_pk', columns: [t.scopeKind, t.scope, t.forestType, t.metric, t.axis, t.model] }),
    check('curve_fits_scope_kind_chk', sql`${t.scopeKind} in ('forest_type','region')`),
  ],
);

/**
 * What the chart of a forest type's fit shows (its points with their region, the drawn curve and band,
 * the turning point and interval), stored by the fits job with the fit so the report never fits again.
 * One row per forest type × metric × axis; `chart` is a StoredFitChart (@stemwise/core).
 */
export const fitCharts = pgTable(
  'fit_charts',
  {
    forestType: text('forest_type').notNull(),
    metric: text('metric').notNull(),
    axis: text('axis').notNull(),
    chart: jsonb('chart').notNull(),
    computedAt: timestamp('computed_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ name: 'fit_charts_pk', columns: [t.forestType, t.metric, t.axis] })],
);
