import type { Queryable, Tx } from '../connection';

// Loading a validated batch: regions, plots, visits, stems and strata. Every function takes arrays as
// single parameters (unnest), so the statement count does not grow with the batch.

/** Adds regions that are new; returns the id of every named region. */
export async function upsertRegions(db: Queryable, names: readonly string[]): Promise<Map<string, number>> {
  if (!names.length) return new Map();
  await db.query(`insert into regions (name) select distinct unnest($1::text[]) on conflict (name) do nothing`, [names]);
  const rows = await db.query<{ id: number; name: string }>(`select id, name from regions where name = any($1::text[])`, [names]);
  return new Map(rows.map((r) => [r.name, r.id]));
}

export interface StoredVisit {
  plotKey: string;
  surveyDate: string;
  visitId: number;
  batchId: string;
  region: string;
}

/** Visits already stored for these plots on these dates (pairs given as two parallel arrays). */
export async function findStoredVisits(db: Queryable, plotKeys: readonly string[], dates: readonly string[]): Promise<StoredVisit[]> {
  if (!plotKeys.length) return [];
  const rows = await db.query<{ plotKey: string; surveyDate: string; visitId: string | number; batchId: string; region: string }>(
    `select p.plot_key "plotKey", v.survey_date::text "surveyDate", v.id "visitId", v.batch_id "batchId", r.name region
       from unnest($1::text[], $2::date[]) as k(plot_key, survey_date)
       join plots p on p.plot_key = k.plot_key
       join plot_visits v on v.plot_id = p.id and v.survey_date = k.survey_date
       join regions r on r.id = p.region_id`,
    [plotKeys, dates],
  );
  return rows.map((r) => ({ ...r, visitId: Number(r.visitId) }));
}

export interface StoredPlot {
  plotKey: string;
  region: string;
  /** The plot's latest visit, which trees of a later batch without a plots row attach to. */
  visitId: number;
  surveyDate: string;
  dbhMinCm: number;
  subplotAreaHa: number;
  subplotDbhMinCm: number;
}

/** Stored plots by key, each with its latest visit (plots without any visit are left out). */
export async function findStoredPlots(db: Queryable, plotKeys: readonly string[]): Promise<StoredPlot[]> {
  if (!plotKeys.length) return [];
  const rows = await db.query<StoredPlot & { visitId: string | number }>(
    `select distinct on (p.plot_key) p.plot_key "plotKey", r.name region, v.id "visitId", v.survey_date::text "surveyDate",
            v.dbh_min_cm "dbhMinCm", v.subplot_area_ha "subplotAreaHa", v.subplot_dbh_min_cm "subplotDbhMinCm"
       from plots p join plot_visits v on v.plot_id = p.id join regions r on r.id = p.region_id
      where p.plot_key = any($1::text[])
      order by p.plot_key, v.survey_date desc`,
    [plotKeys],
  );
  return rows.map((r) => ({ ...r, visitId: Number(r.visitId) }));
}

/** Tree ids already stored on these visits (a later batch may add stems to a stored plot's latest visit). */
export async function stemTreeIdsOfVisits(db: Queryable, visitIds: readonly number[]): Promise<Array<{ visitId: number; treeId: string }>> {
  if (!visitIds.length) return [];
  const rows = await db.query<{ visitId: string | number; treeId: string }>(
    `select visit_id "visitId", tree_id "treeId" from stems where visit_id = any($1::bigint[])`,
    [visitIds],
  );
  return rows.map((r) => ({ visitId: Number(r.visitId), treeId: r.treeId }));
}

/** Regions the given plots belong to now (before an upsert may move them). */
export async function regionsOfPlots(db: Queryable, plotKeys: readonly string[]): Promise<string[]> {
  if (!plotKeys.length) return [];
  const rows = await db.query<{ name: string }>(
    `select distinct r.name from plots p join regions r on r.id = p.region_id where p.plot_key = any($1::text[])`,
    [plotKeys],
  );
  return rows.map((r) => r.name);
}

/** Stored plots (other than the given keys) at exactly these coordinates. */
export async function findPlotsAtCoordinates(
  db: Queryable,
  latitudes: readonly number[],
  longitudes: readonly number[],
  excludeKeys: readonly string[],
): Promise<Array<{ plotKey: string; latitude: number; longitude: number }>> {
  if (!latitudes.length) return [];
  return db.query(
    `select p.plot_key "plotKey", p.latitude, p.longitude
       from plots p join (select distinct * from unnest($1::float8[], $2::float8[])) as c(lat, lon)
         on p.latitude = c.lat and p.longitude = c.lon
      where not (p.plot_key = any($3::text[]))`,
    [latitudes, longitudes, excludeKeys],
  );
}

export interface PlotColumns {
  keys: string[];
  regionIds: number[];
  forestTypes: string[];
  latitudes: number[];
  longitudes: number[];
  elevations: Array<number | null>;
}

/** Inserts new plots and updates stored ones (region, forest type, position); returns key → id. */
export async function upsertPlots(db: Queryable, p: PlotColumns): Promise<Map<string, number>> {
  if (!p.keys.length) return new Map();
  const rows = await db.query<{ id: string | number; plot_key: string }>(
    `insert into plots (plot_key, region_id, forest_type, latitude, longitude, elevation_m)
     select * from unnest($1::text[], $2::int[], $3::text[], $4::float8[], $5::float8[], $6::float8[])
     on conflict (plot_key) do update set region_id = excluded.region_id, forest_type = excluded.forest_type,
       latitude = excluded.latitude, longitude = excluded.longitude, elevation_m = excluded.elevation_m
     returning id, plot_key`,
    [p.keys, p.regionIds, p.forestTypes, p.latitudes, p.longitudes, p.elevations],
  );
  return new Map(rows.map((r) => [r.plot_key, Number(r.id)]));
}

/** Deletes visits (their stems and metrics go with them: ON DELETE CASCADE). */
export async function deleteVisits(db: Queryable, visitIds: readonly number[]): Promise<number> {
  if (!visitIds.length) return 0;
  const rows = await db.query<{ n: number }>(
    `with d as (delete from plot_visits where id = any($1::bigint[]) returning 1) select count(*)::int n from d`,
    [visitIds],
  );
  return rows[0].n;
}

export interface VisitColumns {
  plotIds: number[];
  surveyDates: string[];
  areaHa: number[];
  dbhMinCm: number[];
  subplotAreaHa: number[];
  subplotDbhMinCm: number[];
  loggingClass: number[];
  fireClass: number[];
}

/** Inserts visits of one batch; returns plot id → visit id. */
export async function insertVisits(db: Queryable, batchId: string, v: VisitColumns): Promise<Map<number, number>> {
  if (!v.plotIds.length) return new Map();
  const rows = await db.query<{ id: string | number; plot_id: string | number }>(
    `insert into plot_visits (plot_id, survey_date, batch_id, area_ha, dbh_min_cm, subplot_area_ha, subplot_dbh_min_cm, logging_class, fire_class, stale)
     select p, d, $1::uuid, a, m, sa, sm, l, f, true
       from unnest($2::bigint[], $3::date[], $4::float8[], $5::float8[], $6::float8[], $7::float8[], $8::smallint[], $9::smallint[])
         as t(p, d, a, m, sa, sm, l, f)
     returning id, plot_id`,
    [batchId, v.plotIds, v.surveyDates, v.areaHa, v.dbhMinCm, v.subplotAreaHa, v.subplotDbhMinCm, v.loggingClass, v.fireClass],
  );
  return new Map(rows.map((r) => [Number(r.plot_id), Number(r.id)]));
}

/** COPY of stems in PostgreSQL's text format, one line per stem in STEM_COPY_COLUMNS order. */
export const STEM_COPY_COLUMNS = ['visit_id', 'tree_id', 'species', 'dbh_cm', 'height_m', 'status', 'stump_cause', 'fire_damage', 'in_subplot'] as const;

/**
 * Chunks may be bytes: the ingest hands COPY ready-encoded buffers, so its text never waits on the V8
 * heap long enough to be promoted (measured: peak heap 70 instead of 150 MB per million stems). Both
 * engines take bytes (pg-copy-streams writes them, PGlite's Blob joins them); Tx.copyFrom is typed for
 * strings only, hence the cast.
 */
export async function copyStems(tx: Tx, chunks: AsyncIterable<string | Uint8Array>): Promise<void> {
  await tx.copyFrom(`copy stems (${STEM_COPY_COLUMNS.join(', ')}) from stdin`, chunks as AsyncIterable<string>);
}

export interface StemColumns {
  visitIds: number[];
  treeIds: string[];
  species: Array<string | null>;
  dbhCm: number[];
  heightM: Array<number | null>;
  status: string[];
  stumpCause: Array<string | null>;
  fireDamage: number[];
  inSubplot: boolean[];
}

/** Batched insert of stems (the engine-neutral path; used on PGlite, where COPY gathers everything in memory). */
export async function insertStems(db: Queryable, s: StemColumns): Promise<void> {
  if (!s.visitIds.length) return;
  await db.query(
    `insert into stems (${STEM_COPY_COLUMNS.join(', ')})
     select * from unnest($1::bigint[], $2::text[], $3::text[], $4::float8[], $5::float8[], $6::text[], $7::text[], $8::smallint[], $9::boolean[])`,
    [s.visitIds, s.treeIds, s.species, s.dbhCm, s.heightM, s.status, s.stumpCause, s.fireDamage, s.inSubplot],
  );
}

/** Forest areas of strata; a later batch's value replaces an earlier one. */
export async function upsertStrata(
  db: Queryable,
  batchId: string,
  s: { regionIds: number[]; forestTypes: string[]; areasHa: number[] },
): Promise<void> {
  if (!s.regionIds.length) return;
  await db.query(
    `insert into strata (region_id, forest_type, forest_area_ha, batch_id)
     select r, f, a, $1::uuid from unnest($2::int[], $3::text[], $4::float8[]) as t(r, f, a)
     on conflict (region_id, forest_type) do update set forest_area_ha = excluded.forest_area_ha, batch_id = excluded.batch_id`,
    [batchId, s.regionIds, s.forestTypes, s.areasHa],
  );
}

/** Row counts of the tables a batch writes (tests compare them before and after a rejected batch). */
export async function loadedRowCounts(db: Queryable): Promise<Record<'regions' | 'plots' | 'plot_visits' | 'stems' | 'strata' | 'species_versions', number>> {
  const [r] = await db.query<Record<'regions' | 'plots' | 'plot_visits' | 'stems' | 'strata' | 'species_versions', number>>(
    `select (select count(*)::int from regions) regions, (select count(*)::int from plots) plots,
            (select count(*)::int from plot_visits) plot_visits, (select count(*)::int from stems) stems,
            (select count(*)::int from strata) strata, (select count(*)::int from species_versions) species_versions`,
  );
  return r;
}

export interface PreviousStem {
  treeId: string;
  status: string;
  stumpCause: string | null;
  dbhCm: number;
  species: string | null;
}

export interface PreviousVisit {
  plotKey: string;
  surveyDate: string;
  batchId: string;
  stems: Map<string, PreviousStem>;
}

/** Of each plot, its latest stored visit before the given date, with that visit's stems by tree id (re-measurement checks). */
export async function findPreviousVisits(db: Queryable, plotKeys: readonly string[], dates: readonly string[]): Promise<PreviousVisit[]> {
  if (!plotKeys.length) return [];
  const rows = await db.query<{ plot_key: string; survey_date: string; batch_id: string; tree_id: string | null; status: string; stump_cause: string | null; dbh_cm: number; species: string | null }>(
    `with prev as (
       select distinct on (p.plot_key) p.plot_key, v.id, v.survey_date, v.batch_id
         from unnest($1::text[], $2::date[]) as k(plot_key, survey_date)
         join plots p on p.plot_key = k.plot_key
         join plot_visits v on v.plot_id = p.id and v.survey_date < k.survey_date
        order by p.plot_key, v.survey_date desc)
     select prev.plot_key, prev.survey_date::text survey_date, prev.batch_id::text batch_id, s.tree_id, s.status, s.stump_cause, s.dbh_cm, s.species
       from prev left join stems s on s.visit_id = prev.id`,
    [plotKeys, dates],
  );
  const out = new Map<string, PreviousVisit>();
  for (const r of rows) {
    let v = out.get(r.plot_key);
    if (!v) out.set(r.plot_key, (v = { plotKey: r.plot_key, surveyDate: r.survey_date, batchId: r.batch_id, stems: new Map() }));
    if (r.tree_id !== null) v.stems.set(r.tree_id, { treeId: r.tree_id, status: r.status, stumpCause: r.stump_cause, dbhCm: Number(r.dbh_cm), species: r.species });
  }
  return [...out.values()];
}
