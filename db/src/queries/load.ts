import { getTableColumns } from 'drizzle-orm';
import type { Queryable, Tx } from '../connection';
import { stems, type plots, type plotVisits } from '../schema/plots';
import type { regions } from '../schema/regions';
import { int8, int8Row, type Int8Wire, type Wire } from './rows';

type Plot = typeof plots.$inferSelect;
type Visit = typeof plotVisits.$inferSelect;
type Region = typeof regions.$inferSelect;

// Loading a validated batch: regions, plots, visits, stems and strata. Every function takes arrays as
// single parameters (unnest), so the statement count does not grow with the batch.

/** Adds regions that are new; returns the id of every named region. */
export async function upsertRegions(db: Queryable, names: readonly string[]): Promise<Map<string, number>> {
  if (!names.length) return new Map();
  await db.query(`insert into regions (name) select distinct unnest($1::text[]) on conflict (name) do nothing`, [names]);
  const rows = await db.query<Region>(`select id, name from regions where name = any($1::text[])`, [names]);
  return new Map(rows.map((r) => [r.name, r.id]));
}

export interface StoredVisit extends Pick<Plot, 'plotKey'>, Pick<Visit, 'surveyDate' | 'batchId'> {
  visitId: Visit['id'];
  region: Region['name'];
}
const storedVisit = int8Row<StoredVisit, 'visitId'>('visitId');

/** Visits already stored for these plots on these dates (pairs given as two parallel arrays). */
export async function findStoredVisits(db: Queryable, plotKeys: readonly string[], dates: readonly string[]): Promise<StoredVisit[]> {
  if (!plotKeys.length) return [];
  const rows = await db.query<Wire<StoredVisit, 'visitId'>>(
    `select p.plot_key "plotKey", v.survey_date::text "surveyDate", v.id "visitId", v.batch_id "batchId", r.name region
       from unnest($1::text[], $2::date[]) as k(plot_key, survey_date)
       join plots p on p.plot_key = k.plot_key
       join plot_visits v on v.plot_id = p.id and v.survey_date = k.survey_date
       join regions r on r.id = p.region_id`,
    [plotKeys, dates],
  );
  return rows.map(storedVisit);
}

export interface StoredPlot extends Pick<Plot, 'plotKey'>, Pick<Visit, 'surveyDate' | 'dbhMinCm' | 'subplotAreaHa' | 'subplotDbhMinCm'> {
  region: Region['name'];
  /** The plot's latest visit, which trees of a later batch without a plots row attach to. */
  visitId: Visit['id'];
}
const storedPlot = int8Row<StoredPlot, 'visitId'>('visitId');

/** Stored plots by key, each with its latest visit (plots without any visit are left out). */
export async function findStoredPlots(db: Queryable, plotKeys: readonly string[]): Promise<StoredPlot[]> {
  if (!plotKeys.length) return [];
  const rows = await db.query<Wire<StoredPlot, 'visitId'>>(
    `select distinct on (p.plot_key) p.plot_key "plotKey", r.name region, v.id "visitId", v.survey_date::text "surveyDate",
            v.dbh_min_cm "dbhMinCm", v.subplot_area_ha "subplotAreaHa", v.subplot_dbh_min_cm "subplotDbhMinCm"
       from plots p join plot_visits v on v.plot_id = p.id join regions r on r.id = p.region_id
      where p.plot_key = any($1::text[])
      order by p.plot_key, v.survey_date desc`,
    [plotKeys],
  );
  return rows.map(storedPlot);
}

type StemTreeId = Pick<typeof stems.$inferSelect, 'visitId' | 'treeId'>;
const stemTreeId = int8Row<StemTreeId, 'visitId'>('visitId');

/** Tree ids already stored on these visits (a later batch may add stems to a stored plot's latest visit). */
export async function stemTreeIdsOfVisits(db: Queryable, visitIds: readonly number[]): Promise<StemTreeId[]> {
  if (!visitIds.length) return [];
  const rows = await db.query<Wire<StemTreeId, 'visitId'>>(
    `select visit_id "visitId", tree_id "treeId" from stems where visit_id = any($1::bigint[])`,
    [visitIds],
  );
  return rows.map(stemTreeId);
}

/** Regions the given plots belong to now (before an upsert may move them). */
export async function regionsOfPlots(db: Queryable, plotKeys: readonly string[]): Promise<string[]> {
  if (!plotKeys.length) return [];
  const rows = await db.query<Pick<Region, 'name'>>(
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
): Promise<Array<Pick<Plot, 'plotKey' | 'latitude' | 'longitude'>>> {
  if (!latitudes.length) return [];
  return db.query<Pick<Plot, 'plotKey' | 'latitude' | 'longitude'>>(
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
  const rows = await db.query<{ id: Int8Wire; plotKey: Plot['plotKey'] }>(
    `insert into plots (plot_key, region_id, forest_type, latitude, longitude, elevation_m)
     select * from unnest($1::text[], $2::int[], $3::text[], $4::float8[], $5::float8[], $6::float8[])
     on conflict (plot_key) do update set region_id = excluded.region_id, forest_type = excluded.forest_type,
       latitude = excluded.latitude, longitude = excluded.longitude, elevation_m = excluded.elevation_m
     returning id, plot_key "plotKey"`,
    [p.keys, p.regionIds, p.forestTypes, p.latitudes, p.longitudes, p.elevations],
  );
  return new Map(rows.map((r) => [r.plotKey, int8(r.id)]));
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
  const rows = await db.query<{ id: Int8Wire; plotId: Int8Wire }>(
    `insert into plot_visits (plot_id, survey_date, batch_id, area_ha, dbh_min_cm, subplot_area_ha, subplot_dbh_min_cm, logging_class, fire_class, stale)
     select p, d, $1::uuid, a, m, sa, sm, l, f, true
       from unnest($2::bigint[], $3::date[], $4::float8[], $5::float8[], $6::float8[], $7::float8[], $8::smallint[], $9::smallint[])
         as t(p, d, a, m, sa, sm, l, f)
     returning id, plot_id "plotId"`,
    [batchId, v.plotIds, v.surveyDates, v.areaHa, v.dbhMinCm, v.subplotAreaHa, v.subplotDbhMinCm, v.loggingClass, v.fireClass],
  );
  return new Map(rows.map((r) => [int8(r.plotId), int8(r.id)]));
}

/** A stem as loaded: one field per stems column (the ingest's stem sink takes these). */
export type StemRecord = typeof stems.$inferSelect;
/** The stems columns in schema order: their record fields, SQL names and SQL types. */
const STEM_COLUMN_LIST = Object.entries(getTableColumns(stems)).map(([field, c]) => ({ field: field as keyof StemRecord, name: c.name, sqlType: c.getSQLType() }));
/** The record fields of the stems columns, in STEM_COPY_COLUMNS order. */
export const STEM_FIELDS: ReadonlyArray<keyof StemRecord> = STEM_COLUMN_LIST.map((c) => c.field);
/** COPY of stems in PostgreSQL's text format, one line per stem in this column order (the schema's). */
export const STEM_COPY_COLUMNS: readonly string[] = STEM_COLUMN_LIST.map((c) => c.name);

/**
 * Chunks may be bytes: the ingest hands COPY ready-encoded buffers, so its text never waits on the V8
 * heap long enough to be promoted (measured: peak heap 70 instead of 150 MB per million stems). Both
 * engines take bytes (pg-copy-streams writes them, PGlite's Blob joins them).
 */
export async function copyStems(tx: Tx, chunks: AsyncIterable<string | Uint8Array>): Promise<void> {
  await tx.copyFrom(`copy stems (${STEM_COPY_COLUMNS.join(', ')}) from stdin`, chunks);
}

/** Stems column by column: one array per record field. */
export type StemColumns = { [K in keyof StemRecord]: Array<StemRecord[K]> };

const INSERT_STEMS_SQL = `insert into stems (${STEM_COPY_COLUMNS.join(', ')})
  select * from unnest(${STEM_COLUMN_LIST.map((c, i) => `$${i + 1}::${c.sqlType}[]`).join(', ')})`;

/** Batched insert of stems (the engine-neutral path; used on PGlite, where COPY gathers everything in memory). */
export async function insertStems(db: Queryable, s: StemColumns): Promise<void> {
  if (!s.visitId.length) return;
  await db.query(INSERT_STEMS_SQL, STEM_FIELDS.map((f) => s[f]));
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

export type PreviousStem = Pick<StemRecord, 'treeId' | 'status' | 'stumpCause' | 'dbhCm' | 'species'>;

export interface PreviousVisit extends Pick<Plot, 'plotKey'>, Pick<Visit, 'surveyDate' | 'batchId'> {
  stems: Map<string, PreviousStem>;
}

/** Of each plot, its latest stored visit before the given date, with that visit's stems by tree id (re-measurement checks). */
export async function findPreviousVisits(db: Queryable, plotKeys: readonly string[], dates: readonly string[]): Promise<PreviousVisit[]> {
  if (!plotKeys.length) return [];
  // A visit without stems gives one row of nulls in the stem fields (left join).
  const rows = await db.query<Omit<PreviousVisit, 'stems'> & (PreviousStem | { [K in keyof PreviousStem]: null })>(
    `with prev as (
       select distinct on (p.plot_key) p.plot_key, v.id, v.survey_date, v.batch_id
         from unnest($1::text[], $2::date[]) as k(plot_key, survey_date)
         join plots p on p.plot_key = k.plot_key
         join plot_visits v on v.plot_id = p.id and v.survey_date < k.survey_date
        order by p.plot_key, v.survey_date desc)
     select prev.plot_key "plotKey", prev.survey_date::text "surveyDate", prev.batch_id "batchId",
            s.tree_id "treeId", s.status, s.stump_cause "stumpCause", s.dbh_cm "dbhCm", s.species
       from prev left join stems s on s.visit_id = prev.id`,
    [plotKeys, dates],
  );
  const out = new Map<string, PreviousVisit>();
  for (const { plotKey, surveyDate, batchId, ...stem } of rows) {
    let v = out.get(plotKey);
    if (!v) out.set(plotKey, (v = { plotKey, surveyDate, batchId, stems: new Map() }));
    if (stem.treeId !== null) v.stems.set(stem.treeId, stem);
  }
  return [...out.values()];
}
