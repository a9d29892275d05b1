import type { Queryable } from '../connection';
import type { plots, plotVisits } from '../schema/plots';
import type { plotMetrics } from '../schema/metrics';
import type { regions } from '../schema/regions';
import type { regionSummaries, strata } from '../schema/reports';
import type { batches } from '../schema/batches';
import type { recomputeRuns } from '../schema/work';
import type { PlotChangeDbColumn } from './change';
import { METRIC_NAMES, METRIC_SELECT, numericColumns, type MetricColumns } from './metrics';

type Plot = typeof plots.$inferSelect;
type Region = typeof regions.$inferSelect;
type Summary = typeof regionSummaries.$inferSelect;
type Run = typeof recomputeRuns.$inferSelect;

// Region summaries: what the report job reads to assemble a region's snapshot (latest computed visit
// of each plot with its metrics and species, forest areas), the snapshots themselves (versioned, never updated),
// and the few service figures the report service shows at /metrics.


// The latest visit that has metrics, per plot of one region $1 (a visit not computed yet is skipped); also read by carbon-moments.ts.
export const LATEST_VISITS = `
  select distinct on (v.plot_id) v.id visit_id, v.plot_id, v.survey_date
    from plot_visits v
    join plots p on p.id = v.plot_id
    join regions r on r.id = p.region_id
    join plot_metrics m on m.visit_id = v.id
   where r.name = $1
   order by v.plot_id, v.survey_date desc`;

export interface RegionPlotRow
  extends Pick<Plot, 'plotKey' | 'forestType' | 'latitude' | 'longitude' | 'elevationM'>,
    Pick<typeof plotVisits.$inferSelect, 'surveyDate'>,
    Pick<typeof plotMetrics.$inferSelect, 'speciesStems'> {
  metrics: MetricColumns;
  /** Change from the previous visit to this one (docs/methods.md#change-between-visits); every value null when the plot has no earlier visit. */
  change: Record<RegionChangeColumn, number | null>;
  /** The visit's stand table by diameter class as its metrics stored it (diagnostics `standTable`); null for metrics computed before stand tables. */
  standTable: unknown;
  /** The pair of visits that change comes from: the earlier visit's date and the years between; null when the plot has no earlier visit. */
  pair: { dateFrom: NonNullable<(typeof plotVisits.$inferSelect)['surveyDate']>; years: number } | null;
}

/** The per-plot change columns the region and national estimates of change use. */
export const REGION_CHANGE_COLUMNS = [
  'carbon_net_change_mg_ha_yr',
  'agb_net_change_mg_ha_yr',
  'agb_growth_mg_ha_yr',
  'agb_recruitment_mg_ha_yr',
  'agb_loss_mg_ha_yr',
  'mortality_annual',
  'recruitment_annual',
  'dbh_increment_cm_yr',
  // Carbon pools (docs/methods.md#change-between-visits)
  'bgb_net_change_mg_ha_yr',
  'standing_dead_net_change_mg_ha_yr',
  'tree_carbon_net_change_mg_ha_yr',
  'agb_died_mg_ha_yr',
  'agb_removed_mg_ha_yr',
] as const satisfies readonly PlotChangeDbColumn[];
export type RegionChangeColumn = (typeof REGION_CHANGE_COLUMNS)[number];

/** The latest computed visit of every plot of a region with its metrics and its change from the visit before, by plot key (byte order). */
export async function listRegionLatestPlots(db: Queryable, region: string): Promise<RegionPlotRow[]> {
  const rows = await db.query<Omit<RegionPlotRow, 'metrics' | 'change' | 'pair'> & MetricColumns & Partial<Record<RegionChangeColumn, number | null>> & { pairFrom: string | null; pairYears: number | null }>(
    `with latest as (${LATEST_VISITS})
     select p.plot_key "plotKey", p.forest_type "forestType", p.latitude, p.longitude, p.elevation_m "elevationM", l.survey_date::text "surveyDate", m.species_stems "speciesStems", ${METRIC_SELECT},
            ${REGION_CHANGE_COLUMNS.map((x) => `c.${x}`).join(', ')}, m.diagnostics->'standTable' "standTable", a.survey_date::text "pairFrom", c.years "pairYears"
       from latest l
       join plots p on p.id = l.plot_id
       join plot_metrics m on m.visit_id = l.visit_id
       left join plot_change c on c.visit_to_id = l.visit_id
       left join plot_visits a on a.id = c.visit_from_id
      order by p.plot_key collate "C"`,
    [region],
  );
  return rows.map((r) => ({
    plotKey: r.plotKey,
    forestType: r.forestType,
    latitude: r.latitude,
    longitude: r.longitude,
    elevationM: r.elevationM,
    surveyDate: r.surveyDate,
    speciesStems: r.speciesStems,
    metrics: numericColumns(r, METRIC_NAMES),
    change: numericColumns(r, REGION_CHANGE_COLUMNS),
    standTable: r.standTable ?? null,
    pair: r.pairFrom === null || r.pairYears === null ? null : { dateFrom: r.pairFrom, years: Number(r.pairYears) },
  }));
}

/** Forest area (ha) per forest type of a region, from strata.csv. */
export async function listRegionForestAreas(db: Queryable, region: string): Promise<Record<string, number>> {
  const rows = await db.query<Pick<typeof strata.$inferSelect, 'forestType' | 'forestAreaHa'>>(
    `select s.forest_type "forestType", s.forest_area_ha "forestAreaHa" from strata s join regions r on r.id = s.region_id where r.name = $1 order by 1`,
    [region],
  );
  return Object.fromEntries(rows.map((r) => [r.forestType, r.forestAreaHa]));
}

export interface SummarySnapshot extends Pick<Summary, 'version' | 'etag' | 'payload' | 'createdAt'> {
  region: Region['name'];
}

export type SnapshotHead = Omit<SummarySnapshot, 'payload'>;

/**
 * Stores a region's summary as its next version, unless the latest version has the same etag (the
 * content did not change). Returns the version now latest and whether it was created. Two writers at
 * once: the unique (region, version) constraint makes one of them fail and retry. The aggregates (what
 * the national summary needs of the plots) are stored with a new version, and replace those of the
 * latest when the content did not change: they always describe the plots last summarised. Only the
 * latest version keeps them (the national summary is assembled from the latest versions): a new version
 * clears those of the versions before it.
 */
export async function insertSummarySnapshot(db: Queryable, region: string, etag: string, payload: unknown, aggregates: unknown = null): Promise<{ version: number; created: boolean }> {
  const rows = await db.query<Pick<Summary, 'version'> & { created: boolean }>(
    `with reg as (select id from regions where name = $1),
          last as (select s.id, s.version, s.etag from region_summaries s join reg on reg.id = s.region_id order by s.version desc limit 1),
          ins as (
            insert into region_summaries (region_id, version, etag, payload, aggregates)
            select reg.id, coalesce((select version from last), 0) + 1, $2, $3::jsonb, $4::jsonb from reg
             where not exists (select 1 from last where last.etag = $2)
            returning version),
          upd as (
            update region_summaries s set aggregates = $4::jsonb from last
             where s.id = last.id and last.etag = $2 and $4::jsonb is not null
            returning s.version),
          superseded as (
            update region_summaries s set aggregates = null from reg
             where s.region_id = reg.id and s.aggregates is not null and exists (select 1 from ins)
            returning s.version)
     select version, true created from ins
     union all
     select version, false from last where etag = $2`,
    [region, etag, JSON.stringify(payload), aggregates === null ? null : JSON.stringify(aggregates)],
  );
  if (!rows.length) throw new Error(`insertSummarySnapshot: no region named ${region}`);
  return rows[0];
}

/** A region's snapshot: the latest, or the given version; null when there is none. */
export async function getSummarySnapshot(db: Queryable, region: string, version?: number): Promise<SummarySnapshot | null> {
  const rows = await db.query<SummarySnapshot>(
    `select r.name region, s.version, s.etag, s.payload, s.created_at "createdAt"
       from region_summaries s join regions r on r.id = s.region_id
      where r.name = $1 and ($2::int is null or s.version = $2)
      order by s.version desc limit 1`,
    [region, version ?? null],
  );
  return rows[0] ?? null;
}

/** Every version of a region's summary, newest first (without payloads). */
export async function listSummaryVersions(db: Queryable, region: string): Promise<Array<Pick<Summary, 'version' | 'etag' | 'createdAt'>>> {
  return db.query(
    `select s.version, s.etag, s.created_at "createdAt" from region_summaries s join regions r on r.id = s.region_id
      where r.name = $1 order by s.version desc`,
    [region],
  );
}

/** Every region with its plot count and latest snapshot head (null fields when it has none yet), by name. */
export async function listRegionHeads(db: Queryable): Promise<Array<{ region: string; plots: number; head: SnapshotHead | null }>> {
  // A region without a snapshot has nulls where the head would be (left join).
  type HeadRow = SnapshotHead | { [K in keyof SnapshotHead]: K extends 'region' ? Region['name'] : null };
  const rows = await db.query<HeadRow & { plots: number }>(
    `select r.name region, (select count(*)::int from plots p where p.region_id = r.id) plots, s.version, s.etag, s.created_at "createdAt"
       from regions r
       left join lateral (select version, etag, created_at from region_summaries s where s.region_id = r.id order by version desc limit 1) s on true
      order by r.name collate "C"`,
  );
  return rows.map(({ plots, ...head }) => ({ region: head.region, plots, head: head.version === null ? null : head }));
}

/** Every region with the version of its latest snapshot (null before the first): one cheap query. */
export async function listLatestSummaryVersions(db: Queryable): Promise<Map<string, number | null>> {
  const rows = await db.query<Pick<Region, 'name'> & { version: Summary['version'] | null }>(
    `select r.name, (select max(s.version) from region_summaries s where s.region_id = r.id) version from regions r`,
  );
  return new Map(rows.map((r) => [r.name, r.version]));
}

/** The aggregates kept with the given version of each region (null where that version has none); regions or versions not found are left out. */
export async function listSummaryAggregates(db: Queryable, versions: ReadonlyMap<string, number>): Promise<Map<string, unknown>> {
  const rows = await db.query<{ region: Region['name']; aggregates: Summary['aggregates'] }>(
    `select r.name region, s.aggregates
       from unnest($1::text[], $2::int[]) q(name, version)
       join regions r on r.name = q.name
       join region_summaries s on s.region_id = r.id and s.version = q.version`,
    [[...versions.keys()], [...versions.values()]],
  );
  return new Map(rows.map((r) => [r.region, r.aggregates]));
}

/** Latest snapshot of every region that has one (for `export regions`), by region name. */
export async function listLatestSnapshots(db: Queryable, region?: string | null): Promise<SummarySnapshot[]> {
  return db.query<SummarySnapshot>(
    `select r.name region, s.version, s.etag, s.payload, s.created_at "createdAt"
       from regions r
       join lateral (select * from region_summaries s where s.region_id = r.id order by version desc limit 1) s on true
      where $1::text is null or r.name = $1
      order by r.name collate "C"`,
    [region ?? null],
  );
}

// ---- service figures for /metrics --------------------------------------------------------------

export async function countBatchesByState(db: Queryable): Promise<Record<string, number>> {
  const rows = await db.query<Pick<typeof batches.$inferSelect, 'state'> & { n: number }>(`select state, count(*)::int n from batches group by state order by state`);
  return Object.fromEntries(rows.map((r) => [r.state, r.n]));
}

/** The last recompute run that finished (done or failed), or null. */
export async function lastFinishedRecompute(db: Queryable): Promise<(Pick<Run, 'id' | 'state'> & { finishedAt: NonNullable<Run['finishedAt']> }) | null> {
  const rows = await db.query<Pick<Run, 'id' | 'state'> & { finishedAt: NonNullable<Run['finishedAt']> }>(
    `select id, state, finished_at "finishedAt" from recompute_runs where finished_at is not null order by finished_at desc limit 1`,
  );
  return rows[0] ?? null;
}
