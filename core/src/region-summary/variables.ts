// How the summary's variables (columns of `export plots`) are named for people on the page and in
// charts, and which of them a region summary estimates: all read from the plot-metric catalogue.
import { HEADLINE_METRIC_COLUMNS, plotMetricByColumn, REGION_METRIC_COLUMNS } from '@stemwise/db/catalogue';
import { standLabel } from './stand-table';

export interface VariableLabel {
  /** Full name for tables. */
  readonly name: string;
  /** A few words for chart panels and cards. */
  readonly short: string;
  /** Unit, or '' for a plain number. */
  readonly unit: string;
}

/** Labels of the change-between-visits variables (not plot metrics: docs/methods.md#change-between-visits). */
const CHANGE_LABELS: Readonly<Record<string, VariableLabel>> = {
  carbon_net_change_mg_ha_yr: { name: 'Net carbon change between visits', short: 'Net carbon change (Mg C/ha/yr)', unit: 'Mg C/ha/yr' },
  agb_net_change_mg_ha_yr: { name: 'Net biomass change between visits', short: 'Net biomass change (Mg/ha/yr)', unit: 'Mg/ha/yr' },
  agb_growth_mg_ha_yr: { name: 'Biomass gained by survivor growth', short: 'Growth (Mg/ha/yr)', unit: 'Mg/ha/yr' },
  agb_recruitment_mg_ha_yr: { name: 'Biomass gained by recruits', short: 'Recruitment (Mg/ha/yr)', unit: 'Mg/ha/yr' },
  agb_loss_mg_ha_yr: { name: 'Biomass lost by death and removal', short: 'Losses (Mg/ha/yr)', unit: 'Mg/ha/yr' },
  mortality_annual: { name: 'Annual mortality (share of trees per year)', short: 'Mortality per year', unit: '' },
  recruitment_annual: { name: 'Annual recruitment (share of trees per year)', short: 'Recruitment per year', unit: '' },
  dbh_increment_cm_yr: { name: 'Diameter growth of survivors', short: 'Diameter growth (cm/yr)', unit: 'cm/yr' },
  bgb_net_change_mg_ha_yr: { name: 'Net below-ground biomass change between visits', short: 'Root biomass change (Mg/ha/yr)', unit: 'Mg/ha/yr' },
  standing_dead_net_change_mg_ha_yr: { name: 'Net standing dead wood change between visits', short: 'Standing dead wood change (Mg/ha/yr)', unit: 'Mg/ha/yr' },
  tree_carbon_net_change_mg_ha_yr: { name: 'Net tree carbon change between visits (three pools)', short: 'Tree carbon change (Mg C/ha/yr)', unit: 'Mg C/ha/yr' },
};

export function variableLabel(variable: string): VariableLabel {
  const m = plotMetricByColumn(variable);
  if (m !== undefined) return { name: m.label, short: m.short, unit: m.unit };
  const stand = standLabel(variable);
  if (stand !== null) return { name: stand.name, short: stand.short, unit: stand.unit };
  return CHANGE_LABELS[variable] ?? { name: variable, short: variable, unit: '' };
}

/** Unit of a total (mean × forest area) of a per-hectare variable; '' for any other variable. */
export function totalUnit(variable: string): string {
  return plotMetricByColumn(variable)?.totalUnit ?? standLabel(variable)?.totalUnit ?? '';
}

/** Totals are meaningful for densities only: the per-hectare variables (those with a total unit). */
export const isPerHectare = (variable: string): boolean => totalUnit(variable) !== '';

/** Variables a region (and the nation) is summarised on by default, in row order. */
export const DEFAULT_REGION_VARIABLES: readonly string[] = REGION_METRIC_COLUMNS;

/** The figures shown as headline cards, in order. */
export const HEADLINE_VARIABLES: readonly string[] = HEADLINE_METRIC_COLUMNS;
