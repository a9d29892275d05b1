import { doublePrecision, integer, jsonb, pgTable, primaryKey, text, timestamp } from 'drizzle-orm/pg-core';

/** Diversity–disturbance fits; `scope` is `all` for a forest type as a whole or a region name. */
export const curveFits = pgTable(
  'curve_fits',
  {
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
  (t) => [primaryKey({ name: 'curve_fits_pk', columns: [t.scope, t.forestType, t.metric, t.axis, t.model] })],
);
