import { NATIONAL, variableLabel, type RegionRow } from '@stemwise/core';
import type { CarbonUncertaintySection } from '../carbon-uncertainty';
import type { ChangeCoverage } from './change-coverage';
import { CHANGE_VARIABLES } from './region-summary';

// The estimates of change between visits as the API serves them (GET /v1/regions/{region}/change and
// /v1/national/change) and the pages show them: the rows of the summary on change, with what each
// variable means, its unit, and which pairs of visits they come from.

/** What the estimates are, in plain words. */
export const CHANGE_ABOUT =
  'Stratified estimates (forest types as strata; nationally region × forest type) of the per-plot change between the two latest visits of each plot measured twice, per hectare and year. Plots measured once have no change and are not counted. Trees count on the main plot at the larger of the two visits\' diameter thresholds (docs/methods.md#change-between-visits).';

/** What "net carbon change" means. */
export const NET_CARBON_MEANING =
  'Net carbon change (carbon_net_change_mg_ha_yr, Mg C per hectare per year) is the yearly change of the carbon held in the above-ground biomass of live trees: (survivor growth + recruitment − biomass of trees that died − biomass removed by logging) × the carbon fraction of the stocks. Positive: the forest gained carbon between the visits; negative: it lost carbon. Below-ground biomass, dead wood, litter and soil are not included.';

/** The caution shown with every estimate of change. */
export const CHANGE_CAUTION =
  'Estimates of change carry the error of the biomass models and large chance variation: over a few years a handful of large trees dying dominates a plot\'s net change. The ci_low–ci_high intervals cover sampling error only; for net carbon change the whole interval (whole_ci_low–whole_ci_high, and carbon_uncertainty) adds the error of the biomass and height models, and is still not all of it. Read them with their intervals, as regional figures, and defer to national methods and local regulations for carbon reporting and logging decisions.';

export interface ChangeVariable {
  readonly variable: string;
  readonly name: string;
  /** Unit of the values as served (shares as fractions 0–1). */
  readonly unit: string;
  readonly description: string;
}

export interface ChangeView {
  readonly region: string;
  readonly version: number;
  readonly created_at: string;
  readonly about: string;
  readonly net_carbon_change: string;
  /** The pairs of visits behind the estimates; null when no plot was measured twice, or in a summary made before it was recorded. */
  readonly coverage: ChangeCoverage | null;
  readonly variables: readonly ChangeVariable[];
  /** The `export regions` rows of the change variables: the whole region (`all`) first, then each forest type. */
  readonly estimates: readonly RegionRow[];
  /** The whole uncertainty of net carbon change (docs/methods.md#carbon-uncertainty); null when off or in a summary made before it. */
  readonly carbon_uncertainty: CarbonUncertaintySection | null;
  /** The same for the tree pool's net carbon change (tree_carbon_net_change_mg_ha_yr). */
  readonly tree_carbon_uncertainty: CarbonUncertaintySection | null;
  readonly caution: string;
}

/** The change variables with their names, units (of the values as served) and meanings. */
export function changeVariables(): ChangeVariable[] {
  return CHANGE_VARIABLES.map((variable) => {
    const l = variableLabel(variable);
    return { variable, name: l.name, unit: l.percent ? 'fraction per year (0–1; × 100 for % per year)' : l.unit, description: l.description };
  });
}

/** The summary rows on change, `all` first then forest types (each in variable order). */
export function changeRows(rows: readonly RegionRow[]): RegionRow[] {
  const change = new Set(CHANGE_VARIABLES);
  return rows.filter((r) => change.has(r.variable));
}

export function changeView(s: {
  region?: string;
  version: number;
  createdAt: Date;
  rows: readonly RegionRow[];
  coverage: ChangeCoverage | null | undefined;
  carbonUncertainty?: CarbonUncertaintySection | null;
  treeCarbonUncertainty?: CarbonUncertaintySection | null;
}): ChangeView {
  return {
    region: s.region ?? NATIONAL,
    version: s.version,
    created_at: s.createdAt.toISOString(),
    about: CHANGE_ABOUT,
    net_carbon_change: NET_CARBON_MEANING,
    coverage: s.coverage ?? null,
    variables: changeVariables(),
    estimates: changeRows(s.rows),
    carbon_uncertainty: s.carbonUncertainty ?? null,
    tree_carbon_uncertainty: s.treeCarbonUncertainty ?? null,
    caution: CHANGE_CAUTION,
  };
}
