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

/** A plot's change ending at its latest visit with the sums of both change sections, and which of their figures it has. */
export interface PlotChangeCarbonMomentsRow extends PlotCarbonMomentsRow {
  /** carbon_net_change_mg_ha_yr is not null (the above-ground change section takes the pair). */
  hasChange: boolean;
  /** tree_carbon_net_change_mg_ha_yr is not null (the tree pool change section takes the pair; its sums under `trees`). */
  hasTreeChange: boolean;
}

/**
 * The plot's change ending at its latest visit (the pair the summaries' change rows use) with its stored
 * `carbon_moments`: the above-ground change's sums, with the tree pool change's under `trees` (null:
 * computed before they were kept). One read for both change sections.
 */
export async function listRegionChangeCarbonMoments(db: Queryable, region: string): Promise<PlotChangeCarbonMomentsRow[]> {
  return db.query<PlotChangeCarbonMomentsRow>(
    `with latest as (${LATEST_VISITS})
     select p.plot_key "plotKey", p.forest_type "forestType", v.area_ha "areaHa", c.carbon_moments moments,
            c.carbon_net_change_mg_ha_yr is not null "hasChange", c.tree_carbon_net_change_mg_ha_yr is not null "hasTreeChange"
       from latest l
       join plots p on p.id = l.plot_id
       join plot_visits v on v.id = l.visit_id
       join plot_change c on c.visit_to_id = l.visit_id
      where c.carbon_net_change_mg_ha_yr is not null or c.tree_carbon_net_change_mg_ha_yr is not null
      order by p.plot_key collate "C"`,
    [region],
  );
}
