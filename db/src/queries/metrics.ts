import type { Climate } from '@stemwise/platform';
import { PLOT_METRICS, type PlotMetricColumn, type PlotMetricSpec } from '../catalogue/plot-metrics';
import type { Queryable } from '../connection';
import type { heightModels } from '../schema/metrics';
import type { plots, plotVisits, stems } from '../schema/plots';
import type { regions } from '../schema/regions';
import type { recomputeRuns } from '../schema/work';
import { int8, int8Row, type Int8Wire, type Wire } from './rows';

type Plot = typeof plots.$inferSelect;
type Visit = typeof plotVisits.$inferSelect;
type Stem = typeof stems.$inferSelect;
type Region = typeof regions.$inferSelect;

// Plot metrics: what the compute workers read (visits and stems, set-based), what they write (one
// upsert per chunk), height–diameter models per forest type, and the paged read behind `export plots`.

/** The numeric `export plots` columns as stored in plot_metrics, in export order, with their SQL type (from the catalogue). */
export const PLOT_METRIC_DB_COLUMNS: readonly (readonly [PlotMetricColumn, PlotMetricSpec['sqlType']])[] = PLOT_METRICS.map((m) => [m.column, m.sqlType] as const);

export type PlotMetricDbColumn = PlotMetricColumn;
/** The metric column names, in export order. */
export const METRIC_NAMES = PLOT_METRIC_DB_COLUMNS.map(([c]) => c);
// Built once from the constant above (never from input): the column list of every read of plot_metrics `m`.
export const METRIC_SELECT = METRIC_NAMES.map((c) => `m.${c}`).join(', ');

/** The metric columns of a row as read (float8 and int4 arrive as numbers on both engines; null when not computed). */
export type MetricColumns = Record<PlotMetricDbColumn, number | null>;

/**
 * The named numeric columns of a row (metrics, change), gathered into their own record; null where empty
 * (a left join without a match gives nulls). float8 and int4 arrive as numbers on both engines.
 */
export function numericColumns<C extends string>(row: Partial<Record<C, number | null>>, names: readonly C[]): Record<C, number | null> {
  const out: Partial<Record<C, number | null>> = {};
  for (const c of names) out[c] = row[c] ?? null;
  return out as Record<C, number | null>;
}

export interface ComputeVisitRow
  extends Pick<Visit, 'batchId' | 'areaHa' | 'dbhMinCm' | 'subplotAreaHa' | 'subplotDbhMinCm' | 'loggingClass' | 'fireClass'>,
    Pick<Plot, 'plotKey' | 'forestType'> {
  visitId: Visit['id'];
  region: Region['name'];
  /** One of the climates forest_types allows. */
  climate: Climate;
}
const computeVisitRow = int8Row<ComputeVisitRow, 'visitId'>('visitId');
/** The select list of a ComputeVisitRow over plot_visits v, plots p, regions r and forest_types f. */
export const COMPUTE_VISIT_SELECT = `v.id "visitId", p.plot_key "plotKey", v.batch_id "batchId", r.name region, p.forest_type "forestType", f.climate,
            v.area_ha "areaHa", v.dbh_min_cm "dbhMinCm", v.subplot_area_ha "subplotAreaHa", v.subplot_dbh_min_cm "subplotDbhMinCm",
            v.logging_class "loggingClass", v.fire_class "fireClass"`;

/**
 * The visits of a chunk with their plot, region and forest-type climate, locked for update until the
 * transaction ends (a concurrent load that marks one of them stale again waits, then wins).
 */
export async function lockVisitsForCompute(tx: Queryable, visitIds: readonly number[]): Promise<ComputeVisitRow[]> {
  const rows = await tx.query<Wire<ComputeVisitRow, 'visitId'>>(
    `select ${COMPUTE_VISIT_SELECT}
       from plot_visits v
       join plots p on p.id = v.plot_id
       join regions r on r.id = p.region_id
       join forest_types f on f.code = p.forest_type
      where v.id = any($1::bigint[])
      order by v.id
        for update of v`,
    [visitIds],
  );
  return rows.map(computeVisitRow);
}

/** A stem as the compute service reads it; the status and stump cause are those its check constraints allow. */
export interface ComputeStemRow extends Pick<Stem, 'visitId' | 'species' | 'dbhCm' | 'heightM' | 'fireDamage' | 'inSubplot'> {
  status: 'live' | 'dead' | 'stump';
  stumpCause: 'logged' | 'natural' | 'unknown' | null;
}
const computeStemRow = int8Row<ComputeStemRow, 'visitId'>('visitId');

const STATUS_OF: Record<string, [ComputeStemRow['status'], ComputeStemRow['stumpCause']]> = {
  l: ['live', null],
  d: ['dead', null],
  g: ['stump', 'logged'],
  n: ['stump', 'natural'],
  u: ['stump', 'unknown'],
};
const RS = '\x1e';
const US = '\x1f';

/** Orders a visit's stems by their content: a deterministic order whatever order the rows were loaded or read in. */
function byContent(a: ComputeStemRow, b: ComputeStemRow): number {
  return (
    a.dbhCm - b.dbhCm ||
    (a.heightM ?? -1) - (b.heightM ?? -1) ||
    (a.status < b.status ? -1 : a.status > b.status ? 1 : 0) ||
    ((a.stumpCause ?? '') < (b.stumpCause ?? '') ? -1 : (a.stumpCause ?? '') > (b.stumpCause ?? '') ? 1 : 0) ||
    a.fireDamage - b.fireDamage ||
    (a.inSubplot === b.inSubplot ? 0 : a.inSubplot ? 1 : -1) ||
    (a.species === b.species ? 0 : a.species === null ? -1 : b.species === null ? 1 : a.species < b.species ? -1 : 1)
  );
}

/**
 * The stems of many visits in one query, one row per visit: the server packs each visit's stems into
 * one text (records split by U+001E, fields by U+001F: status code, dbh, height, species), which is
 * far cheaper for the client than a row per stem. Floats travel in shortest round-trip text (the
 * transaction sets extra_float_digits), so every double arrives exact. Within a visit the stems are
 * sorted by content, so sums run in the same order on every engine. A visit with a species name
 * containing U+001E is read row by row instead. Call inside a transaction.
 */
export async function loadStemsForVisits(tx: Queryable, visitIds: readonly number[]): Promise<Map<number, ComputeStemRow[]>> {
  await tx.query(`set local extra_float_digits = 1`);
  const rows = await tx.query<{ v: Int8Wire; n: number; odd: boolean; r: string }>(
    `select visit_id v, count(*)::int n, coalesce(bool_or(strpos(species, E'\\x1e') > 0), false) odd,
            string_agg(case status when 'live' then 'l' when 'dead' then 'd'
                         else case stump_cause when 'logged' then 'g' when 'natural' then 'n' else 'u' end end
                       || fire_damage::text || case when in_subplot then '1' else '0' end
                       || E'\\x1f' || dbh_cm::text || E'\\x1f' || coalesce(height_m::text, '')
                       || E'\\x1f' || case when species is null then '-' else '+' || species end, E'\\x1e') r
       from stems
      where visit_id = any($1::bigint[])
      group by visit_id`,
    [visitIds],
  );
  const out = new Map<number, ComputeStemRow[]>();
  const odd: number[] = [];
  for (const row of rows) {
    const visitId = int8(row.v);
    if (row.odd) {
      odd.push(visitId);
      continue;
    }
    const records = row.r.split(RS);
    if (records.length !== row.n) throw new Error(`loadStemsForVisits: visit ${visitId} packed ${records.length} stems, expected ${row.n}`);
    const stems = new Array<ComputeStemRow>(records.length);
    for (let i = 0; i < records.length; i++) {
      const rec = records[i];
      const a = rec.indexOf(US);
      const b = rec.indexOf(US, a + 1);
      const c = rec.indexOf(US, b + 1);
      const [status, stumpCause] = STATUS_OF[rec[0]];
      const h = rec.slice(b + 1, c);
      stems[i] = {
        visitId,
        species: rec[c + 1] === '+' ? rec.slice(c + 2) : null,
        dbhCm: Number(rec.slice(a + 1, b)),
        heightM: h === '' ? null : Number(h),
        status,
        stumpCause,
        fireDamage: rec.charCodeAt(1) - 48,
        inSubplot: rec[2] === '1',
      };
    }
    out.set(visitId, stems.sort(byContent));
  }
  if (odd.length) {
    const plain = await tx.query<Wire<ComputeStemRow, 'visitId'>>(
      `select visit_id "visitId", species, dbh_cm "dbhCm", height_m "heightM", status, stump_cause "stumpCause", fire_damage "fireDamage", in_subplot "inSubplot"
         from stems where visit_id = any($1::bigint[])`,
      [odd],
    );
    for (const r of plain) {
      const stem = computeStemRow(r);
      const list = out.get(stem.visitId) ?? [];
      list.push(stem);
      out.set(stem.visitId, list);
    }
    for (const id of odd) out.get(id)?.sort(byContent);
  }
  return out;
}

export interface PlotMetricsWrite {
  visitId: number;
  speciesVersionId: number | null;
  /** One value per PLOT_METRIC_DB_COLUMNS entry, in that order; null where not computable. */
  values: ReadonlyArray<number | null>;
  diagnostics: unknown;
  /** Accepted name → live main-plot stems of the visit (plot_metrics.species_stems). */
  speciesStems: Readonly<Record<string, number>>;
}

const UPSERT_SQL = `insert into plot_metrics (visit_id, species_version_id, ${METRIC_NAMES.join(', ')}, diagnostics, species_stems, computed_at)
  select u.*, now() from (
    select u0 visit_id, u1 species_version_id, ${METRIC_NAMES.map((c, i) => `u${i + 2} ${c}`).join(', ')}, u${METRIC_NAMES.length + 2}::jsonb diagnostics, u${METRIC_NAMES.length + 3}::jsonb species_stems
      from unnest($1::bigint[], $2::int[], ${PLOT_METRIC_DB_COLUMNS.map(([, t], i) => `$${i + 3}::${t}[]`).join(', ')}, $${METRIC_NAMES.length + 3}::text[], $${METRIC_NAMES.length + 4}::text[])
        as t(u0, u1, ${METRIC_NAMES.map((_, i) => `u${i + 2}`).join(', ')}, u${METRIC_NAMES.length + 2}, u${METRIC_NAMES.length + 3})
  ) u
  on conflict (visit_id) do update set species_version_id = excluded.species_version_id,
    ${METRIC_NAMES.map((c) => `${c} = excluded.${c}`).join(', ')}, diagnostics = excluded.diagnostics, species_stems = excluded.species_stems, computed_at = excluded.computed_at`;

/** Writes the metrics of many visits in one statement; a rerun overwrites the same rows. */
export async function upsertPlotMetrics(tx: Queryable, rows: readonly PlotMetricsWrite[]): Promise<void> {
  if (!rows.length) return;
  const params: unknown[] = [rows.map((r) => r.visitId), rows.map((r) => r.speciesVersionId)];
  for (let c = 0; c < METRIC_NAMES.length; c++) params.push(rows.map((r) => r.values[c]));
  params.push(rows.map((r) => JSON.stringify(r.diagnostics ?? {})));
  params.push(rows.map((r) => JSON.stringify(r.speciesStems)));
  await tx.query(UPSERT_SQL, params);
}

/** Clears the stale mark of visits whose metrics were just written. */
export async function markVisitsComputed(tx: Queryable, visitIds: readonly number[]): Promise<void> {
  await tx.query(`update plot_visits set stale = false where id = any($1::bigint[]) and stale`, [visitIds]);
}

export interface UnresolvedNameCount {
  batchId: string;
  name: string;
  level: string;
  stems: number;
}

/**
 * Brings the per-batch unresolved-name counts up to date for visits whose metrics are about to be
 * rewritten: adds the new counts and takes away what the visits' stored diagnostics counted before,
 * so a rerun changes nothing and the cost is that of the chunk, not of its whole batch. Call in the
 * chunk's transaction, after the visits are locked and BEFORE their metrics are upserted.
 */
export async function applyUnresolvedNameCounts(tx: Queryable, visitIds: readonly number[], counts: readonly UnresolvedNameCount[]): Promise<void> {
  await tx.query(
    `with old as (
       select v.batch_id, u->>'name' as name, max(u->>'level') as level, sum((u->>'stems')::int)::int as stems
         from plot_metrics m
         join plot_visits v on v.id = m.visit_id
         cross join lateral jsonb_array_elements(coalesce(m.diagnostics->'unresolvedNames', '[]'::jsonb)) u
        where m.visit_id = any($1::bigint[])
        group by v.batch_id, u->>'name'),
     new as (
       select batch_id, name, max(level) as level, sum(stems)::int as stems
         from unnest($2::uuid[], $3::text[], $4::text[], $5::int[]) t(batch_id, name, level, stems)
        group by batch_id, name),
     delta as (
       select coalesce(n.batch_id, o.batch_id) batch_id, coalesce(n.name, o.name) as name,
              coalesce(n.level, o.level) as level, coalesce(n.stems, 0) - coalesce(o.stems, 0) as d
         from new n full join old o on o.batch_id = n.batch_id and o.name = n.name)
     insert into batch_unresolved_names (batch_id, name, level, stems)
     select batch_id, name, level, d from delta where d <> 0
     on conflict (batch_id, name) do update set stems = batch_unresolved_names.stems + excluded.stems, level = excluded.level`,
    [visitIds, counts.map((c) => c.batchId), counts.map((c) => c.name), counts.map((c) => c.level), counts.map((c) => c.stems)],
  );
  await tx.query(
    `delete from batch_unresolved_names where stems <= 0 and batch_id in (select batch_id from plot_visits where id = any($1::bigint[]))`,
    [visitIds],
  );
}

/** Adds one chunk's counts to its run (keyed by job id, so a retried chunk replaces its own entry). */
export async function recordChunkInRun(tx: Queryable, runId: string, jobId: string, counts: Record<string, number>): Promise<void> {
  await tx.query(
    `update recompute_runs
        set details = details || jsonb_build_object('chunks', coalesce(details->'chunks', '{}'::jsonb) || jsonb_build_object($2::text, $3::jsonb))
      where id = $1`,
    [runId, jobId, JSON.stringify(counts)],
  );
}

/**
 * Records how long one stage of a run took (`details.stages.<stage>`: `start`, epoch milliseconds on the
 * clock of the process that ran it, `ms`, and the stage's counts), keeping the other stages' entries.
 */
export async function recordRunStage(db: Queryable, runId: string, stage: string, time: { start: number; ms: number } & Record<string, number>): Promise<void> {
  await db.query(
    `update recompute_runs
        set details = details || jsonb_build_object('stages', coalesce(details->'stages', '{}'::jsonb) || jsonb_build_object($2::text, $3::jsonb))
      where id = $1`,
    [runId, stage, JSON.stringify(time)],
  );
}

/** Merges keys into a run's details (plan, stage counts). */
export async function mergeRunDetails(db: Queryable, runId: string, details: Record<string, unknown>): Promise<void> {
  await db.query(`update recompute_runs set details = details || $2::jsonb where id = $1`, [runId, JSON.stringify(details)]);
}

export interface RunRow extends Pick<typeof recomputeRuns.$inferSelect, 'id' | 'trigger' | 'state' | 'visits'> {
  details: Record<string, unknown>;
}

export async function getRecomputeRun(db: Queryable, runId: string): Promise<RunRow | null> {
  const rows = await db.query<RunRow>(`select id, trigger, state, visits, details from recompute_runs where id = $1`, [runId]);
  return rows[0] ?? null;
}

/**
 * Marks stale every visit whose metrics were computed against another species reference version than
 * `versionId` (a new list changes guilds, wood densities and what counts as identified).
 */
export async function markOutdatedSpeciesVisitsStale(db: Queryable, versionId: number | null): Promise<number> {
  const rows = await db.query<{ n: number }>(
    `with u as (
       update plot_visits v set stale = true
         from plot_metrics m
        where m.visit_id = v.id and not v.stale and m.species_version_id is distinct from $1::int
       returning 1)
     select count(*)::int n from u`,
    [versionId],
  );
  return rows[0].n;
}

// ---- height–diameter models -------------------------------------------------------------------

/** Forest types that have at least one stale visit. */
export async function forestTypesWithStaleVisits(db: Queryable): Promise<string[]> {
  const rows = await db.query<{ t: Plot['forestType'] }>(
    `select p.forest_type t from plot_visits v join plots p on p.id = v.plot_id where v.stale group by p.forest_type order by p.forest_type collate "C"`,
  );
  return rows.map((r) => r.t);
}

/** Forest types that have plots. */
export async function forestTypesWithPlots(db: Queryable): Promise<string[]> {
  return (await db.query<{ t: Plot['forestType'] }>(`select forest_type t from plots group by forest_type order by forest_type collate "C"`)).map((r) => r.t);
}

/**
 * dbh and measured height of every live stem of the given forest types (one scan for all of them),
 * ordered by value (dbh, then height), so a fit on the same data is bit-for-bit the same on every
 * engine and every run whatever order the rows were loaded in. The server packs each forest type's
 * pairs into one text (exact shortest round-trip floats); the sort runs here, where it is cheaper.
 * Call inside a transaction.
 */
export async function loadMeasuredHeights(tx: Queryable, forestTypes: readonly string[]): Promise<Map<string, { dbhCm: number[]; heightM: number[] }>> {
  await tx.query(`set local extra_float_digits = 1`);
  const rows = await tx.query<{ t: string; p: string }>(
    `select p.forest_type t, string_agg(s.dbh_cm::text || ' ' || s.height_m::text, ',') p
       from stems s join plot_visits v on v.id = s.visit_id join plots p on p.id = v.plot_id
      where p.forest_type = any($1::text[]) and s.status = 'live' and s.height_m is not null
      group by p.forest_type`,
    [forestTypes],
  );
  const out = new Map<string, { dbhCm: number[]; heightM: number[] }>();
  for (const t of forestTypes) out.set(t, { dbhCm: [], heightM: [] });
  for (const row of rows) {
    const pairs = row.p.split(',');
    const d = new Float64Array(pairs.length);
    const h = new Float64Array(pairs.length);
    for (let i = 0; i < pairs.length; i++) {
      const space = pairs[i].indexOf(' ');
      d[i] = Number(pairs[i].slice(0, space));
      h[i] = Number(pairs[i].slice(space + 1));
    }
    const order = Uint32Array.from({ length: pairs.length }, (_, i) => i).sort((a, b) => d[a] - d[b] || h[a] - h[b]);
    out.set(row.t, { dbhCm: Array.from(order, (i) => d[i]), heightM: Array.from(order, (i) => h[i]) });
  }
  return out;
}

export interface HeightModelRow extends Pick<typeof heightModels.$inferSelect, 'forestType' | 'form'> {
  coefficients: Record<string, number>;
  stats: Record<string, unknown>;
}

export async function listHeightModels(db: Queryable, forestTypes?: readonly string[]): Promise<HeightModelRow[]> {
  return db.query<HeightModelRow>(
    `select forest_type "forestType", form, coefficients, stats from height_models where $1::text[] is null or forest_type = any($1::text[]) order by forest_type`,
    [forestTypes ?? null],
  );
}

export async function upsertHeightModel(db: Queryable, m: HeightModelRow): Promise<void> {
  await db.query(
    `insert into height_models (forest_type, form, coefficients, stats, fitted_at) values ($1, $2, $3::jsonb, $4::jsonb, now())
     on conflict (forest_type) do update set form = excluded.form, coefficients = excluded.coefficients, stats = excluded.stats, fitted_at = excluded.fitted_at`,
    [m.forestType, m.form, JSON.stringify(m.coefficients), JSON.stringify(m.stats)],
  );
}

export async function deleteHeightModel(db: Queryable, forestType: string): Promise<void> {
  await db.query(`delete from height_models where forest_type = $1`, [forestType]);
}

/** Marks every visit of the given forest types stale (their modelled heights changed). */
export async function markForestTypeVisitsStale(db: Queryable, forestTypes: readonly string[]): Promise<number> {
  if (!forestTypes.length) return 0;
  const rows = await db.query<{ n: number }>(
    `with u as (
       update plot_visits v set stale = true from plots p
        where p.id = v.plot_id and p.forest_type = any($1::text[]) and not v.stale
       returning 1)
     select count(*)::int n from u`,
    [forestTypes],
  );
  return rows[0].n;
}

// ---- export plots -----------------------------------------------------------------------------

/** An `export plots` row: named as the export's columns, typed as the schema's. */
export interface PlotExportRow extends Pick<Plot, 'latitude' | 'longitude'>, Pick<Visit, 'stale'> {
  plot_id: Plot['plotKey'];
  survey_date: Visit['surveyDate'];
  region: Region['name'];
  forest_type: Plot['forestType'];
  /** false when the visit has no metrics yet (never computed). */
  computed: boolean;
  metrics: MetricColumns;
}

export interface PlotExportPage {
  region?: string | null;
  /** Keyset: the last (plot_id, survey_date) of the previous page, or null for the first page. */
  after?: { plotId: string; surveyDate: string } | null;
  limit: number;
}

/** One page of `export plots` rows, ordered by plot_id (byte order) then survey date. */
export async function pagePlotExport(db: Queryable, page: PlotExportPage): Promise<PlotExportRow[]> {
  const rows = await db.query<Omit<PlotExportRow, 'metrics'> & Partial<MetricColumns>>(
    `select p.plot_key plot_id, v.survey_date::text survey_date, r.name region, p.forest_type, p.latitude, p.longitude,
            m.visit_id is not null computed, v.stale, ${METRIC_SELECT}
       from plot_visits v
       join plots p on p.id = v.plot_id
       join regions r on r.id = p.region_id
       left join plot_metrics m on m.visit_id = v.id
      where ($1::text is null or r.name = $1)
        and ($2::text is null or (p.plot_key collate "C", v.survey_date) > ($2::text collate "C", $3::date))
      order by p.plot_key collate "C", v.survey_date
      limit $4`,
    [page.region ?? null, page.after?.plotId ?? null, page.after?.surveyDate ?? null, page.limit],
  );
  return rows.map((r) => ({
    plot_id: r.plot_id,
    survey_date: r.survey_date,
    region: r.region,
    forest_type: r.forest_type,
    latitude: r.latitude,
    longitude: r.longitude,
    computed: r.computed,
    stale: r.stale,
    metrics: numericColumns(r, METRIC_NAMES),
  }));
}

/** Visits (of a region, or all) whose metrics are due or missing. */
export async function countStaleVisits(db: Queryable, region?: string | null): Promise<number> {
  const rows = await db.query<{ n: number }>(
    `select count(*)::int n from plot_visits v join plots p on p.id = v.plot_id join regions r on r.id = p.region_id
      where v.stale and ($1::text is null or r.name = $1)`,
    [region ?? null],
  );
  return rows[0].n;
}

export async function regionExists(db: Queryable, name: string): Promise<boolean> {
  return (await db.query(`select 1 from regions where name = $1`, [name])).length > 0;
}

export async function listRegionNames(db: Queryable): Promise<string[]> {
  return (await db.query<Pick<Region, 'name'>>(`select name from regions order by name collate "C"`)).map((r) => r.name);
}

/** Regions having plots of the given forest types. */
export async function regionsOfForestTypes(db: Queryable, forestTypes: readonly string[]): Promise<string[]> {
  if (!forestTypes.length) return [];
  const rows = await db.query<Pick<Region, 'name'>>(
    `select r.name from plots p join regions r on r.id = p.region_id where p.forest_type = any($1::text[]) group by r.name order by r.name collate "C"`,
    [forestTypes],
  );
  return rows.map((r) => r.name);
}

