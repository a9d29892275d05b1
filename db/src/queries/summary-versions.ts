import type { Queryable } from '../connection';
import type { plotVisits } from '../schema/plots';
import type { regionSummaries } from '../schema/reports';

type Summary = typeof regionSummaries.$inferSelect;

// What a region summary version summarised beyond its payload: the keys of its plots (kept with each
// new version, for "what changed" against the version before) and the plot sizes of its latest visits.

// The region's plots that have a computed visit: the plots a summary of it uses.
const SUMMARISED_PLOTS = `
  select p.plot_key from plots p
   where p.region_id = s.region_id
     and exists (select 1 from plot_visits v join plot_metrics m on m.visit_id = v.id where v.plot_id = p.id)`;

/** Records, on a new summary version, the keys of the plots it summarised (in the same transaction as the insert). */
export async function recordSummaryPlotKeys(db: Queryable, region: string, version: number): Promise<void> {
  await db.query(
    `update region_summaries s
        set plot_keys = coalesce((select array_agg(k.plot_key order by k.plot_key collate "C") from (${SUMMARISED_PLOTS}) k), '{}')
      where s.region_id = (select id from regions where name = $1) and s.version = $2`,
    [region, version],
  );
}

/** A version of a region's summary and the one before it, each with its payload and plot keys; the older is null for the first version. */
export async function getSummaryPair(
  db: Queryable,
  region: string,
  version?: number,
): Promise<Array<Pick<Summary, 'version' | 'payload' | 'plotKeys' | 'createdAt'>>> {
  return db.query(
    `select s.version, s.payload, s.plot_keys "plotKeys", s.created_at "createdAt"
       from region_summaries s join regions r on r.id = s.region_id
      where r.name = $1 and ($2::int is null or s.version <= $2)
      order by s.version desc limit 2`,
    [region, version ?? null],
  );
}

export interface PlotSizeRow extends Pick<typeof plotVisits.$inferSelect, 'areaHa'> {
  forestType: string;
  plots: number;
}

/** Plots of a region by forest type and plot area (latest computed visit of each plot). */
export async function listRegionPlotSizes(db: Queryable, region: string): Promise<PlotSizeRow[]> {
  return db.query<PlotSizeRow>(
    `with latest as (
       select distinct on (v.plot_id) v.plot_id, v.area_ha
         from plot_visits v
         join plots p on p.id = v.plot_id
         join regions r on r.id = p.region_id
         join plot_metrics m on m.visit_id = v.id
        where r.name = $1
        order by v.plot_id, v.survey_date desc)
     select p.forest_type "forestType", l.area_ha "areaHa", count(*)::int plots
       from latest l join plots p on p.id = l.plot_id
      group by p.forest_type, l.area_ha
      order by p.forest_type collate "C", l.area_ha`,
    [region],
  );
}
