import type { Queryable } from '../connection';
import type { curveFits, fitCharts } from '../schema/fits';
import type { plots } from '../schema/plots';
import type { regions } from '../schema/regions';
import { METRIC_NAMES, METRIC_SELECT, numericColumns, type MetricColumns, type PlotMetricDbColumn } from './metrics';

// Diversity–disturbance fits: the points they are fitted on, and the stored rows (curve_fits).


export interface LatestPlotMetrics extends Pick<typeof plots.$inferSelect, 'plotKey'> {
  region: (typeof regions.$inferSelect)['name'];
  metrics: Record<PlotMetricDbColumn, number | null>;
}

/**
 * The metrics of the latest computed visit of every plot of a forest type, in plot_id byte order (the
 * order is part of the result: the bootstrap resamples by position).
 */
export async function listLatestPlotMetrics(db: Queryable, forestType: string): Promise<LatestPlotMetrics[]> {
  const rows = await db.query<Omit<LatestPlotMetrics, 'metrics'> & MetricColumns>(
    `select * from (
       select distinct on (v.plot_id) p.plot_key "plotKey", r.name region, ${METRIC_SELECT}
         from plot_visits v
         join plots p on p.id = v.plot_id
         join regions r on r.id = p.region_id
         join plot_metrics m on m.visit_id = v.id
        where p.forest_type = $1
        order by v.plot_id, v.survey_date desc) latest
      order by "plotKey" collate "C"`,
    [forestType],
  );
  return rows.map((r) => ({ plotKey: r.plotKey, region: r.region, metrics: numericColumns(r, METRIC_NAMES) }));
}

/** What a fit was fitted on: the forest type as a whole, or the plots of one region (of any name). */
export type FitScopeKind = 'forest_type' | 'region';
/** The `scope` label of a whole-forest-type fit (in the API and snapshots); the kind, not the label, tells it from a region. */
export const WHOLE_FOREST_TYPE_SCOPE = 'all';
/** A scope to read: the whole forest type, or a region by name. */
export type FitScope = { kind: 'forest_type' } | { kind: 'region'; region: string };

/** A stored fit (`scope`: `all` for the whole forest type, else the region's name); the kinds and models are those its columns allow. */
export interface CurveFitRow extends Omit<typeof curveFits.$inferSelect, 'scopeKind' | 'model' | 'details' | 'computedAt'> {
  scopeKind: FitScopeKind;
  model: 'linear' | 'quadratic';
  details: Record<string, unknown>;
}

const FIT_FIELDS = [
  ['b0', 'b0'],
  ['b1', 'b1'],
  ['b2', 'b2'],
  ['seB0', 'se_b0'],
  ['seB1', 'se_b1'],
  ['seB2', 'se_b2'],
  ['pB1', 'p_b1'],
  ['pB2', 'p_b2'],
  ['r2', 'r2'],
  ['adjR2', 'adj_r2'],
  ['aicc', 'aicc'],
  ['peakX', 'peak_x'],
  ['peakCiLow', 'peak_ci_low'],
  ['peakCiHigh', 'peak_ci_high'],
] as const satisfies ReadonlyArray<readonly [keyof CurveFitRow, string]>;

const UPSERT_FITS_SQL = `insert into curve_fits (scope_kind, scope, forest_type, metric, axis, model, n, ${FIT_FIELDS.map(([, c]) => c).join(', ')}, verdict, details, computed_at)
  select t.*, now() from unnest($1::text[], $2::text[], $3::text[], $4::text[], $5::text[], $6::text[], $7::int[],
    ${FIT_FIELDS.map((_, i) => `$${i + 8}::float8[]`).join(', ')}, $${FIT_FIELDS.length + 8}::text[], $${FIT_FIELDS.length + 9}::jsonb[]) t
  on conflict (scope_kind, scope, forest_type, metric, axis, model) do update set n = excluded.n,
    ${FIT_FIELDS.map(([, c]) => `${c} = excluded.${c}`).join(', ')}, verdict = excluded.verdict, details = excluded.details, computed_at = excluded.computed_at`;

/** Writes fit rows in one statement (a rerun overwrites them). */
export async function upsertCurveFits(tx: Queryable, rows: readonly CurveFitRow[]): Promise<void> {
  if (!rows.length) return;
  const params: unknown[] = [
    rows.map((r) => r.scopeKind),
    rows.map((r) => r.scope),
    rows.map((r) => r.forestType),
    rows.map((r) => r.metric),
    rows.map((r) => r.axis),
    rows.map((r) => r.model),
    rows.map((r) => r.n),
  ];
  for (const [key] of FIT_FIELDS) params.push(rows.map((r) => r[key]));
  params.push(rows.map((r) => r.verdict));
  params.push(rows.map((r) => JSON.stringify(r.details)));
  await tx.query(UPSERT_FITS_SQL, params);
}

/** Removes the fits of a forest type × metric × axis other than the whole-type fit (when `keepWhole`) and the regions in `keepRegions` (a region fell below the minimum). */
export async function deleteCurveFitsExcept(tx: Queryable, forestType: string, metric: string, axis: string, keep: { whole: boolean; regions: readonly string[] }): Promise<void> {
  await tx.query(
    `delete from curve_fits where forest_type = $1 and metric = $2 and axis = $3
        and not ((scope_kind = 'forest_type' and $4::boolean) or (scope_kind = 'region' and scope = any($5::text[])))`,
    [forestType, metric, axis, keep.whole, keep.regions],
  );
}

/** Stored fits of a scope, metric and axis, by forest type then model (linear first). */
export async function listCurveFits(db: Queryable, filter: { scope: FitScope; metric: string; axis: string; forestTypes?: readonly string[] }): Promise<CurveFitRow[]> {
  const { kind } = filter.scope;
  const label = filter.scope.kind === 'region' ? filter.scope.region : WHOLE_FOREST_TYPE_SCOPE;
  return db.query<CurveFitRow>(
    `select scope_kind "scopeKind", scope, forest_type "forestType", metric, axis, model, n, ${FIT_FIELDS.map(([k, c]) => `${c} "${k}"`).join(', ')}, verdict, details
       from curve_fits
      where scope_kind = $1 and scope = $2 and metric = $3 and axis = $4 and ($5::text[] is null or forest_type = any($5::text[]))
      order by forest_type collate "C", model`,
    [kind, label, filter.metric, filter.axis, filter.forestTypes ?? null],
  );
}

/** The verdict stored for a forest type as a whole (its models share it), or null before its first fit. */
export async function getWholeTypeVerdict(db: Queryable, forestType: string, metric: string, axis: string): Promise<string | null> {
  const rows = await db.query<Pick<typeof curveFits.$inferSelect, 'verdict'>>(
    `select verdict from curve_fits where scope_kind = 'forest_type' and forest_type = $1 and metric = $2 and axis = $3 order by model limit 1`,
    [forestType, metric, axis],
  );
  return rows[0]?.verdict ?? null;
}

/** The stored chart of a forest type × metric × axis (fit_charts.chart, a StoredFitChart of @stemwise/core), or null. */
export async function getFitChart(db: Queryable, forestType: string, metric: string, axis: string): Promise<unknown> {
  const rows = await db.query<Pick<typeof fitCharts.$inferSelect, 'chart'>>(`select chart from fit_charts where forest_type = $1 and metric = $2 and axis = $3`, [forestType, metric, axis]);
  return rows[0]?.chart ?? null;
}

/** Stores (or replaces) the chart of a forest type × metric × axis. */
export async function upsertFitChart(tx: Queryable, forestType: string, metric: string, axis: string, chart: object): Promise<void> {
  await tx.query(
    `insert into fit_charts (forest_type, metric, axis, chart, computed_at) values ($1, $2, $3, $4::jsonb, now())
     on conflict (forest_type, metric, axis) do update set chart = excluded.chart, computed_at = excluded.computed_at`,
    [forestType, metric, axis, JSON.stringify(chart)],
  );
}

/** Removes the chart of a forest type × metric × axis (its whole-type fit was removed). */
export async function deleteFitChart(tx: Queryable, forestType: string, metric: string, axis: string): Promise<void> {
  await tx.query(`delete from fit_charts where forest_type = $1 and metric = $2 and axis = $3`, [forestType, metric, axis]);
}
