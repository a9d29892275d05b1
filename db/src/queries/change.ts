import { plotChangeLockKey } from '../advisory-locks';
import type { Queryable } from '../connection';
import type { plots, plotVisits, stems } from '../schema/plots';
import type { regions } from '../schema/regions';
import { COMPUTE_VISIT_SELECT, numericColumns, type ComputeStemRow, type ComputeVisitRow } from './metrics';
import { int8, int8Row, type Int8Wire, type Wire } from './rows';

type Plot = typeof plots.$inferSelect;
type Visit = typeof plotVisits.$inferSelect;

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
  ['bgb_net_change_mg_ha_yr', 'float8'],
  ['standing_dead_net_change_mg_ha_yr', 'float8'],
  ['tree_carbon_net_change_mg_ha_yr', 'float8'],
] as const;

export type PlotChangeDbColumn = (typeof PLOT_CHANGE_DB_COLUMNS)[number][0];
const CHANGE_NAMES = PLOT_CHANGE_DB_COLUMNS.map(([c]) => c);

/** A visit as change needs it: the compute row with its plot and date. */
export interface ChangeVisitRow extends ComputeVisitRow, Pick<Visit, 'plotId' | 'surveyDate'> {}
const changeVisitRow = int8Row<ChangeVisitRow, 'visitId' | 'plotId'>('visitId', 'plotId');

/**
 * Takes the change lock of the plots of the given visits (transaction-scoped, in plot id order) and
 * returns their ids. A plot chunk takes them BEFORE it locks its visits: two chunks sharing a plot then
 * write its pairs one after the other, and neither holds a visit the other's pairs point at while it
 * waits. Call in a transaction.
 */
export async function lockPlotsForChange(tx: Queryable, visitIds: readonly number[]): Promise<number[]> {
  const plots = await tx.query<{ id: Int8Wire }>(
    `select v.plot_id id from plot_visits v where v.id = any($1::bigint[]) group by v.plot_id order by v.plot_id`,
    [visitIds],
  );
  const ids = plots.map((p) => int8(p.id));
  if (ids.length) await tx.query(`select count(pg_advisory_xact_lock(k)) from (select k from unnest($1::bigint[]) k order by k) s`, [ids.map(plotChangeLockKey)]);
  return ids;
}

/** Every visit of the given plots that have two or more visits (the others have no change), by plot then date. */
export async function listVisitsForChange(tx: Queryable, plotIds: readonly number[]): Promise<ChangeVisitRow[]> {
  if (!plotIds.length) return [];
  const rows = await tx.query<Wire<ChangeVisitRow, 'visitId' | 'plotId'>>(
    `select ${COMPUTE_VISIT_SELECT}, v.plot_id "plotId", v.survey_date::text "surveyDate"
       from plot_visits v
       join plots p on p.id = v.plot_id
       join regions r on r.id = p.region_id
       join forest_types f on f.code = p.forest_type
      where v.plot_id in (select plot_id from plot_visits where plot_id = any($1::bigint[]) group by plot_id having count(*) > 1)
      order by v.plot_id, v.survey_date`,
    [plotIds],
  );
  return rows.map(changeVisitRow);
}

export type ChangeStemRow = ComputeStemRow & Pick<typeof stems.$inferSelect, 'treeId'>;
const changeStemRow = int8Row<ChangeStemRow, 'visitId'>('visitId');

/** The stems of the given visits with their tree ids, by visit then tree id (byte order). */
export async function loadStemsWithTreeIds(tx: Queryable, visitIds: readonly number[]): Promise<Map<number, ChangeStemRow[]>> {
  const out = new Map<number, ChangeStemRow[]>();
  if (!visitIds.length) return out;
  const rows = await tx.query<Wire<ChangeStemRow, 'visitId'>>(
    `select visit_id "visitId", tree_id "treeId", species, dbh_cm "dbhCm", height_m "heightM", status, stump_cause "stumpCause", fire_damage "fireDamage", in_subplot "inSubplot"
       from stems where visit_id = any($1::bigint[]) order by visit_id, tree_id collate "C"`,
    [visitIds],
  );
  for (const r of rows) {
    const stem = changeStemRow(r);
    let list = out.get(stem.visitId);
    if (!list) out.set(stem.visitId, (list = []));
    list.push(stem);
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
  /** The sums of the carbon change's uncertainty (stored as jsonb; docs/methods.md#carbon-uncertainty); absent: none. */
  carbonMoments?: unknown;
}

const INSERT_SQL = `insert into plot_change (plot_id, visit_from_id, visit_to_id, species_version_id, ${CHANGE_NAMES.join(', ')}, carbon_moments)
  select * from unnest($1::bigint[], $2::bigint[], $3::bigint[], $4::int[], ${PLOT_CHANGE_DB_COLUMNS.map(([, t], i) => `$${i + 5}::${t}[]`).join(', ')}, $${PLOT_CHANGE_DB_COLUMNS.length + 5}::jsonb[])`;

/** Replaces every stored pair of the given plots by `rows` (a plot absent from rows keeps no pair). */
export async function replacePlotChanges(tx: Queryable, plotIds: readonly number[], rows: readonly PlotChangeWrite[]): Promise<void> {
  if (plotIds.length) await tx.query(`delete from plot_change where plot_id = any($1::bigint[])`, [plotIds]);
  if (!rows.length) return;
  const params: unknown[] = [rows.map((r) => r.plotId), rows.map((r) => r.visitFromId), rows.map((r) => r.visitToId), rows.map((r) => r.speciesVersionId)];
  for (let c = 0; c < CHANGE_NAMES.length; c++) params.push(rows.map((r) => r.values[c]));
  params.push(rows.map((r) => (r.carbonMoments === undefined || r.carbonMoments === null ? null : JSON.stringify(r.carbonMoments))));
  await tx.query(INSERT_SQL, params);
}

// ---- export change ----------------------------------------------------------------------------

/** An `export change` row: named as the export's columns, typed as the schema's. */
export interface PlotChangeExportRow extends Pick<Plot, 'latitude' | 'longitude'> {
  plot_id: Plot['plotKey'];
  region: (typeof regions.$inferSelect)['name'];
  forest_type: Plot['forestType'];
  date_from: Visit['surveyDate'];
  date_to: Visit['surveyDate'];
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
  const rows = await db.query<Omit<PlotChangeExportRow, 'values'> & Partial<Record<PlotChangeDbColumn, number | null>>>(
    `select p.plot_key plot_id, r.name region, p.forest_type, a.survey_date::text date_from, b.survey_date::text date_to, p.latitude, p.longitude,
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
  return rows.map((r) => ({
    plot_id: r.plot_id,
    region: r.region,
    forest_type: r.forest_type,
    date_from: r.date_from,
    date_to: r.date_to,
    latitude: r.latitude,
    longitude: r.longitude,
    values: numericColumns(r, CHANGE_NAMES),
  }));
}
