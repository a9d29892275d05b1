import type { Queryable } from '../connection';
import type { PlotChangeDbColumn } from './change';
import { numericColumns, PLOT_METRIC_DB_COLUMNS, type PlotMetricDbColumn } from './metrics';

// Region summaries: what the report job reads to assemble a region's snapshot (latest computed visit
// of each plot, forest areas, species names), the snapshots themselves (versioned, never updated),
// and the few service figures the report service shows at /metrics.

const METRIC_NAMES = PLOT_METRIC_DB_COLUMNS.map(([c]) => c);
// Built once from the constant (never from input).
const METRIC_SELECT = METRIC_NAMES.map((c) => `m.${c}`).join(', ');

// The latest visit that has metrics, per plot of one region (a visit not computed yet is skipped).
const LATEST_VISITS = `
  select distinct on (v.plot_id) v.id visit_id, v.plot_id, v.survey_date
    from plot_visits v
    join plots p on p.id = v.plot_id
    join regions r on r.id = p.region_id
    join plot_metrics m on m.visit_id = v.id
   where r.name = $1
   order by v.plot_id, v.survey_date desc`;

export interface RegionPlotRow {
  plotKey: string;
  forestType: string;
  latitude: number;
  longitude: number;
  elevationM: number | null;
  surveyDate: string;
  metrics: Record<PlotMetricDbColumn, number | null>;
  /** Change from the previous visit to this one (docs/methods.md#change-between-visits); every value null when the plot has no earlier visit. */
  change: Record<RegionChangeColumn, number | null>;
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
] as const satisfies readonly PlotChangeDbColumn[];
export type RegionChangeColumn = (typeof REGION_CHANGE_COLUMNS)[number];

/** The latest computed visit of every plot of a region with its metrics and its change from the visit before, by plot key (byte order). */
export async function listRegionLatestPlots(db: Queryable, region: string): Promise<RegionPlotRow[]> {
  const rows = await db.query<Record<string, unknown>>(
    `with latest as (${LATEST_VISITS})
     select p.plot_key, p.forest_type, p.latitude, p.longitude, p.elevation_m, l.survey_date::text survey_date, ${METRIC_SELECT},
            ${REGION_CHANGE_COLUMNS.map((x) => `c.${x}`).join(', ')}
       from latest l
       join plots p on p.id = l.plot_id
       join plot_metrics m on m.visit_id = l.visit_id
       left join plot_change c on c.visit_to_id = l.visit_id
      order by p.plot_key collate "C"`,
    [region],
  );
  return rows.map((r) => {
    const metrics = {} as Record<PlotMetricDbColumn, number | null>;
    for (const c of METRIC_NAMES) metrics[c] = r[c] === null || r[c] === undefined ? null : Number(r[c]);
    return {
      plotKey: r.plot_key as string,
      forestType: r.forest_type as string,
      latitude: Number(r.latitude),
      longitude: Number(r.longitude),
      elevationM: r.elevation_m === null ? null : Number(r.elevation_m),
      surveyDate: r.survey_date as string,
      metrics,
      change: numericColumns(r, REGION_CHANGE_COLUMNS),
    };
  });
}

/** Distinct recorded names of live main-plot stems per plot (latest computed visit), for species counts. */
export async function listRegionStemNames(db: Queryable, region: string): Promise<Array<{ plotKey: string; name: string }>> {
  const rows = await db.query<{ plot_key: string; name: string }>(
    `with latest as (${LATEST_VISITS})
     select distinct p.plot_key, s.species name
       from latest l
       join plots p on p.id = l.plot_id
       join stems s on s.visit_id = l.visit_id
      where s.status = 'live' and not s.in_subplot and s.species is not null
      order by 1, 2`,
    [region],
  );
  return rows.map((r) => ({ plotKey: r.plot_key, name: r.name }));
}

/** Forest area (ha) per forest type of a region, from strata.csv. */
export async function listRegionForestAreas(db: Queryable, region: string): Promise<Record<string, number>> {
  const rows = await db.query<{ forest_type: string; forest_area_ha: number }>(
    `select s.forest_type, s.forest_area_ha from strata s join regions r on r.id = s.region_id where r.name = $1 order by 1`,
    [region],
  );
  return Object.fromEntries(rows.map((r) => [r.forest_type, Number(r.forest_area_ha)]));
}

export interface SummarySnapshot {
  region: string;
  version: number;
  etag: string;
  payload: unknown;
  createdAt: Date;
}

export interface SnapshotHead {
  region: string;
  version: number;
  etag: string;
  createdAt: Date;
}

/**
 * Stores a region's summary as its next version, unless the latest version has the same etag (the
 * content did not change). Returns the version now latest and whether it was created. Two writers at
 * once: the unique (region, version) constraint makes one of them fail and retry.
 */
export async function insertSummarySnapshot(db: Queryable, region: string, etag: string, payload: unknown): Promise<{ version: number; created: boolean }> {
  const rows = await db.query<{ version: number; created: boolean }>(
    `with reg as (select id from regions where name = $1),
          last as (select s.version, s.etag from region_summaries s join reg on reg.id = s.region_id order by s.version desc limit 1),
          ins as (
            insert into region_summaries (region_id, version, etag, payload)
            select reg.id, coalesce((select version from last), 0) + 1, $2, $3::jsonb from reg
             where not exists (select 1 from last where last.etag = $2)
            returning version)
     select version, true created from ins
     union all
     select version, false from last where etag = $2`,
    [region, etag, JSON.stringify(payload)],
  );
  if (!rows.length) throw new Error(`insertSummarySnapshot: no region named ${region}`);
  return { version: Number(rows[0].version), created: rows[0].created };
}

/**
 * The charts (SVG) of a region's latest snapshot with the key of the specification each was drawn from
 * (payload.charts.fits[].drawn_from, payload.charts.drawn_from.means and .guilds): the report reuses a
 * chart whose key is unchanged instead of drawing it again.
 */
export async function listLatestChartSvgs(db: Queryable, region: string): Promise<Array<{ key: string; svg: string }>> {
  return db.query<{ key: string; svg: string }>(
    `select k.key, k.svg
       from (select s.payload->'charts' c from region_summaries s join regions r on r.id = s.region_id
              where r.name = $1 order by s.version desc limit 1) latest,
            lateral (
              select f->>'drawn_from' key, f->>'svg' svg
                from jsonb_array_elements(case when jsonb_typeof(latest.c->'fits') = 'array' then latest.c->'fits' else '[]'::jsonb end) f
              union all select latest.c->'drawn_from'->>'means', latest.c->>'means'
              union all select latest.c->'drawn_from'->>'guilds', latest.c->>'guilds') k
      where k.key is not null and k.svg is not null`,
    [region],
  );
}

/** A region's snapshot: the latest, or the given version; null when there is none. */
export async function getSummarySnapshot(db: Queryable, region: string, version?: number): Promise<SummarySnapshot | null> {
  const rows = await db.query<{ version: number; etag: string; payload: unknown; created_at: Date }>(
    `select s.version, s.etag, s.payload, s.created_at
       from region_summaries s join regions r on r.id = s.region_id
      where r.name = $1 and ($2::int is null or s.version = $2)
      order by s.version desc limit 1`,
    [region, version ?? null],
  );
  if (!rows.length) return null;
  const r = rows[0];
  return { region, version: Number(r.version), etag: r.etag, payload: r.payload, createdAt: new Date(r.created_at) };
}

/** Every version of a region's summary, newest first (without payloads). */
export async function listSummaryVersions(db: Queryable, region: string): Promise<Array<{ version: number; etag: string; createdAt: Date }>> {
  const rows = await db.query<{ version: number; etag: string; created_at: Date }>(
    `select s.version, s.etag, s.created_at from region_summaries s join regions r on r.id = s.region_id
      where r.name = $1 order by s.version desc`,
    [region],
  );
  return rows.map((r) => ({ version: Number(r.version), etag: r.etag, createdAt: new Date(r.created_at) }));
}

/** Every region with its plot count and latest snapshot head (null fields when it has none yet), by name. */
export async function listRegionHeads(db: Queryable): Promise<Array<{ region: string; plots: number; head: SnapshotHead | null }>> {
  const rows = await db.query<{ name: string; plots: number; version: number | null; etag: string | null; created_at: Date | null }>(
    `select r.name, (select count(*)::int from plots p where p.region_id = r.id) plots, s.version, s.etag, s.created_at
       from regions r
       left join lateral (select version, etag, created_at from region_summaries s where s.region_id = r.id order by version desc limit 1) s on true
      order by r.name collate "C"`,
  );
  return rows.map((r) => ({
    region: r.name,
    plots: Number(r.plots),
    head: r.version === null ? null : { region: r.name, version: Number(r.version), etag: r.etag as string, createdAt: new Date(r.created_at as Date) },
  }));
}

/** Every region with the version of its latest snapshot (null before the first): one cheap query. */
export async function listLatestSummaryVersions(db: Queryable): Promise<Map<string, number | null>> {
  const rows = await db.query<{ name: string; version: number | null }>(
    `select r.name, (select max(s.version) from region_summaries s where s.region_id = r.id) version from regions r`,
  );
  return new Map(rows.map((r) => [r.name, r.version === null ? null : Number(r.version)]));
}

/** Latest snapshot of every region that has one (for `export regions`), by region name. */
export async function listLatestSnapshots(db: Queryable, region?: string | null): Promise<SummarySnapshot[]> {
  const rows = await db.query<{ name: string; version: number; etag: string; payload: unknown; created_at: Date }>(
    `select r.name, s.version, s.etag, s.payload, s.created_at
       from regions r
       join lateral (select * from region_summaries s where s.region_id = r.id order by version desc limit 1) s on true
      where $1::text is null or r.name = $1
      order by r.name collate "C"`,
    [region ?? null],
  );
  return rows.map((r) => ({ region: r.name, version: Number(r.version), etag: r.etag, payload: r.payload, createdAt: new Date(r.created_at) }));
}

// ---- service figures for /metrics --------------------------------------------------------------

export async function countBatchesByState(db: Queryable): Promise<Record<string, number>> {
  const rows = await db.query<{ state: string; n: number }>(`select state, count(*)::int n from batches group by state order by state`);
  return Object.fromEntries(rows.map((r) => [r.state, Number(r.n)]));
}

/** The last recompute run that finished (done or failed), or null. */
export async function lastFinishedRecompute(db: Queryable): Promise<{ id: string; state: string; finishedAt: Date } | null> {
  const rows = await db.query<{ id: string; state: string; finished_at: Date }>(
    `select id, state, finished_at from recompute_runs where finished_at is not null order by finished_at desc limit 1`,
  );
  return rows.length ? { id: rows[0].id, state: rows[0].state, finishedAt: new Date(rows[0].finished_at) } : null;
}
