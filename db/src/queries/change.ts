import { plotChangeLockKey } from '../advisory-locks';
import type { Queryable } from '../connection';
import { computeVisitRow, numericColumns, type ComputeStemRow, type ComputeVisitRow } from './metrics';

// Change between visits (plot_change): what the plot-chunk stage reads (every visit of the chunk's
// plots, their stems with tree ids), what it writes (the plot's pairs, replaced as a whole), and the
// paged read behind `export change`.

/** The numeric `export change` columns as stored in plot_change, in column order, with their SQL type. */
export const PLOT_CHANGE_DB_COLUMNS = [
  ['years', 'float8'],
  ['dbh_threshold_cm', 'float8'],
  ['n_start', 'int'],
  ['n_survivors', 'int'],
  ['n_died', 'int'],
  ['n_removed', 'int'],
  ['n_recruits', 'int'],
  ['mortality_rate', 'float8'],
  ['recruitment_rate', 'float8'],
  ['mortality_annual', 'float8'],
  ['recruitment_annual', 'float8'],
  ['dbh_increment_cm_yr', 'float8'],
  ['ba_change_m2_ha_yr', 'float8'],
  ['agb_growth_mg_ha_yr', 'float8'],
  ['agb_recruitment_mg_ha_yr', 'float8'],
  ['agb_loss_mg_ha_yr', 'float8'],
  ['agb_net_change_mg_ha_yr', 'float8'],
  ['carbon_net_change_mg_ha_yr', 'float8'],
  ['n_absent', 'int'],
  ['ba_growth_m2_ha_yr', 'float8'],
  ['ba_recruitment_m2_ha_yr', 'float8'],
  ['ba_loss_m2_ha_yr', 'float8'],
  ['agb_died_mg_ha_yr', 'float8'],
  ['agb_removed_mg_ha_yr', 'float8'],
] as const;

export type PlotChangeDbColumn = (typeof PLOT_CHANGE_DB_COLUMNS)[number][0];
const CHANGE_NAMES = PLOT_CHANGE_DB_COLUMNS.map(([c]) => c);

/** A visit as change needs it: the compute row with its plot and date. */
export interface ChangeVisitRow extends ComputeVisitRow {
  plotId: number;
  surveyDate: string;
}

/**
 * Takes the change lock of the plots of the given visits (transaction-scoped, in plot id order) and
 * returns their ids. A plot chunk takes them BEFORE it locks its visits: two chunks sharing a plot then
 * write its pairs one after the other, and neither holds a visit the other's pairs point at while it
 * waits. Call in a transaction.
 */
export async function lockPlotsForChange(tx: Queryable, visitIds: readonly number[]): Promise<number[]> {
  const plots = await tx.query<{ id: string | number }>(
    `select v.plot_id id from plot_visits v where v.id = any($1::bigint[]) group by v.plot_id order by v.plot_id`,
    [visitIds],
  );
  const ids = plots.map((p) => Number(p.id));
  if (ids.length) await tx.query(`select count(pg_advisory_xact_lock(k)) from (select k from unnest($1::bigint[]) k order by k) s`, [ids.map(plotChangeLockKey)]);
  return ids;
}

/** Every visit of the given plots that have two or more visits (the others have no change), by plot then date. */
export async function listVisitsForChange(tx: Queryable, plotIds: readonly number[]): Promise<ChangeVisitRow[]> {
  if (!plotIds.length) return [];
  const rows = await tx.query<Record<string, unknown>>(
    `select v.id, v.plot_id, v.survey_date::text survey_date, p.plot_key, v.batch_id::text batch_id, r.name region, p.forest_type, f.climate,
            v.area_ha, v.dbh_min_cm, v.subplot_area_ha, v.subplot_dbh_min_cm, v.logging_class, v.fire_class
       from plot_visits v
       join plots p on p.id = v.plot_id
       join regions r on r.id = p.region_id
       join forest_types f on f.code = p.forest_type
      where v.plot_id in (select plot_id from plot_visits where plot_id = any($1::bigint[]) group by plot_id having count(*) > 1)
      order by v.plot_id, v.survey_date`,
    [plotIds],
  );
  return rows.map((r) => ({ ...computeVisitRow(r), plotId: Number(r.plot_id), surveyDate: r.survey_date as string }));
}

export type ChangeStemRow = ComputeStemRow & { treeId: string };

/** The stems of the given visits with their tree ids, by visit then tree id (byte order). */
export async function loadStemsWithTreeIds(tx: Queryable, visitIds: readonly number[]): Promise<Map<number, ChangeStemRow[]>> {
  const out = new Map<number, ChangeStemRow[]>();
  if (!visitIds.length) return out;
  const rows = await tx.query<{ v: string | number; t: string; s: string | null; d: number; h: number | null; st: ComputeStemRow['status']; c: ComputeStemRow['stumpCause']; f: number; sub: boolean }>(
    `select visit_id v, tree_id t, species s, dbh_cm d, height_m h, status st, stump_cause c, fire_damage f, in_subplot sub
       from stems where visit_id = any($1::bigint[]) order by visit_id, tree_id collate "C"`,
    [visitIds],
  );
  for (const r of rows) {
    const visitId = Number(r.v);
    let list = out.get(visitId);
    if (!list) out.set(visitId, (list = []));
    list.push({ visitId, treeId: r.t, species: r.s, dbhCm: Number(r.d), heightM: r.h === null ? null : Number(r.h), status: r.st, stumpCause: r.c, fireDamage: Number(r.f), inSubplot: r.sub });
  }
  return out;
}

export interface PlotChangeWrite {
  plotId: number;
  visitFromId: number;
  visitToId: number;
  speciesVersionId: number | null;
  /** One value per PLOT_CHANGE_DB_COLUMNS entry, in that order. */
  values: ReadonlyArray<number | null>;
}

const INSERT_SQL = `insert into plot_change (plot_id, visit_from_id, visit_to_id, species_version_id, ${CHANGE_NAMES.join(', ')})
  select * from unnest($1::bigint[], $2::bigint[], $3::bigint[], $4::int[], ${PLOT_CHANGE_DB_COLUMNS.map(([, t], i) => `$${i + 5}::${t}[]`).join(', ')})`;

/** Replaces every stored pair of the given plots by `rows` (a plot absent from rows keeps no pair). */
export async function replacePlotChanges(tx: Queryable, plotIds: readonly number[], rows: readonly PlotChangeWrite[]): Promise<void> {
  if (plotIds.length) await tx.query(`delete from plot_change where plot_id = any($1::bigint[])`, [plotIds]);
  if (!rows.length) return;
  const params: unknown[] = [rows.map((r) => r.plotId), rows.map((r) => r.visitFromId), rows.map((r) => r.visitToId), rows.map((r) => r.speciesVersionId)];
  for (let c = 0; c < CHANGE_NAMES.length; c++) params.push(rows.map((r) => r.values[c]));
  await tx.query(INSERT_SQL, params);
}

// ---- export change ----------------------------------------------------------------------------

export interface PlotChangeExportRow {
  plot_id: string;
  region: string;
  forest_type: string;
  date_from: string;
  date_to: string;
  latitude: number;
  longitude: number;
  values: Record<PlotChangeDbColumn, number | null>;
}

export interface PlotChangeExportPage {
  region?: string | null;
  /** Keyset: the last (plot_id, date_from) of the previous page, or null for the first page. */
  after?: { plotId: string; dateFrom: string } | null;
  limit: number;
}

/** One page of `export change` rows, ordered by plot_id (byte order) then the first visit's date. */
export async function pagePlotChangeExport(db: Queryable, page: PlotChangeExportPage): Promise<PlotChangeExportRow[]> {
  const rows = await db.query<Record<string, unknown>>(
    `select p.plot_key, r.name region, p.forest_type, a.survey_date::text date_from, b.survey_date::text date_to, p.latitude, p.longitude,
            ${CHANGE_NAMES.map((c) => `c.${c}`).join(', ')}
       from plot_change c
       join plots p on p.id = c.plot_id
       join regions r on r.id = p.region_id
       join plot_visits a on a.id = c.visit_from_id
       join plot_visits b on b.id = c.visit_to_id
      where ($1::text is null or r.name = $1)
        and ($2::text is null or (p.plot_key collate "C", a.survey_date) > ($2::text collate "C", $3::date))
      order by p.plot_key collate "C", a.survey_date
      limit $4`,
    [page.region ?? null, page.after?.plotId ?? null, page.after?.dateFrom ?? null, page.limit],
  );
  return rows.map((r) => {
    const values = numericColumns(r, CHANGE_NAMES);
    return {
      plot_id: r.plot_key as string,
      region: r.region as string,
      forest_type: r.forest_type as string,
      date_from: r.date_from as string,
      date_to: r.date_to as string,
      latitude: Number(r.latitude),
      longitude: Number(r.longitude),
      values,
    };
  });
}
