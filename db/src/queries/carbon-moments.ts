import type { plots, plotVisits } from '../schema/plots';
import type { Queryable } from '../connection';
import { LATEST_VISITS } from './summaries';

/** A plot's latest visit with the sums its carbon uncertainty needs (null: computed before they were kept). */
export interface PlotCarbonMomentsRow extends Pick<typeof plots.$inferSelect, 'plotKey' | 'forestType'>, Pick<typeof plotVisits.$inferSelect, 'areaHa'> {
  /** The `carbonMoments` of the visit's diagnostics (core's CarbonMoments), as stored. */
  moments: unknown;
}

/** The carbon-uncertainty sums of the latest computed visit of each plot of a region that has a carbon figure (docs/methods.md#carbon-uncertainty). */
export async function listRegionCarbonMoments(db: Queryable, region: string): Promise<PlotCarbonMomentsRow[]> {
  return db.query<PlotCarbonMomentsRow>(
    `with latest as (${LATEST_VISITS})
     select p.plot_key "plotKey", p.forest_type "forestType", v.area_ha "areaHa", m.diagnostics->'carbonMoments' moments
       from latest l
       join plots p on p.id = l.plot_id
       join plot_visits v on v.id = l.visit_id
       join plot_metrics m on m.visit_id = l.visit_id
      where m.carbon_mg_ha is not null
      order by p.plot_key collate "C"`,
    [region],
  );
}

/**
 * The plot's change ending at its latest visit (the pair the summaries' change rows use) with the sums of the
 * carbon uncertainty of one change variable: the above-ground change's, or (tree_carbon_net_change_mg_ha_yr)
 * the tree pool change's, stored under `trees` (null: computed before they were kept).
 */
export async function listRegionChangeCarbonMoments(
  db: Queryable,
  region: string,
  variable: 'carbon_net_change_mg_ha_yr' | 'tree_carbon_net_change_mg_ha_yr' = 'carbon_net_change_mg_ha_yr',
): Promise<PlotCarbonMomentsRow[]> {
  const moments = variable === 'tree_carbon_net_change_mg_ha_yr' ? "c.carbon_moments->'trees'" : 'c.carbon_moments';
  return db.query<PlotCarbonMomentsRow>(
    `with latest as (${LATEST_VISITS})
     select p.plot_key "plotKey", p.forest_type "forestType", v.area_ha "areaHa", ${moments} moments
       from latest l
       join plots p on p.id = l.plot_id
       join plot_visits v on v.id = l.visit_id
       join plot_change c on c.visit_to_id = l.visit_id
      where c.${variable} is not null
      order by p.plot_key collate "C"`,
    [region],
  );
}
