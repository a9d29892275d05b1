// How the summary's variables (columns of `export plots`) are named for people on the page and in
// charts, and which of them a region summary estimates: all read from the plot-metric catalogue.
import { HEADLINE_METRIC_COLUMNS, plotMetricByColumn, REGION_METRIC_COLUMNS } from '@stemwise/db/catalogue';
import { standLabel } from './stand-table';

export interface VariableLabel {
  /** Full name for tables. */
  readonly name: string;
  /** A few words for chart panels and cards. */
  readonly short: string;
  /** Unit as shown on pages and charts ('%' or '% per year' for shares), or '' for a plain number. */
  readonly unit: string;
  /** A share stored as 0–1: pages and charts show it × 100, in the unit above. */
  readonly percent: boolean;
  /** What the value is, in one sentence ('' where none is written). */
  readonly description: string;
}

type ChangeLabel = Omit<VariableLabel, 'percent'> & { readonly percent?: true };

/** Labels of the change-between-visits variables (not plot metrics: docs/methods.md#change-between-visits). */
const CHANGE_LABELS: Readonly<Record<string, ChangeLabel>> = {
  carbon_net_change_mg_ha_yr: {
    name: 'Net carbon change between visits', short: 'Net carbon change (Mg C/ha/yr)', unit: 'Mg C/ha/yr',
    description: 'Yearly change of the carbon in the above-ground biomass of live trees: (survivor growth + recruitment − died − removed) × the carbon fraction; negative is a loss.',
  },
  agb_net_change_mg_ha_yr: {
    name: 'Net biomass change between visits', short: 'Net biomass change (Mg/ha/yr)', unit: 'Mg/ha/yr',
    description: 'Yearly change of above-ground biomass of live trees: survivor growth + recruitment − died − removed; negative is a loss.',
  },
  agb_growth_mg_ha_yr: { name: 'Biomass gained by survivor growth', short: 'Growth (Mg/ha/yr)', unit: 'Mg/ha/yr', description: 'Above-ground biomass added per year by the growth of the trees alive at both visits.' },
  agb_recruitment_mg_ha_yr: { name: 'Biomass gained by recruits', short: 'Recruitment (Mg/ha/yr)', unit: 'Mg/ha/yr', description: 'Above-ground biomass per year of the trees that reached the diameter threshold between the visits.' },
  agb_loss_mg_ha_yr: { name: 'Biomass lost by death and removal', short: 'Losses (Mg/ha/yr)', unit: 'Mg/ha/yr', description: 'Above-ground biomass per year (at the first visit) of the trees that died or were removed.' },
  mortality_annual: { name: 'Annual mortality (share of trees dying per year)', short: 'Mortality (% per year)', unit: '% per year', percent: true, description: 'Share of the trees alive at the first visit that die per year, at a constant rate.' },
  recruitment_annual: { name: 'Annual recruitment (share of recruits per year)', short: 'Recruitment (% per year)', unit: '% per year', percent: true, description: 'Share of the trees alive at the second visit that were recruited per year, at a constant rate.' },
  dbh_increment_cm_yr: { name: 'Diameter growth of survivors', short: 'Diameter growth (cm/yr)', unit: 'cm/yr', description: 'Mean diameter increment per year of the trees alive at both visits.' },
  agb_died_mg_ha_yr: { name: 'Biomass lost by trees that died', short: 'Died (Mg/ha/yr)', unit: 'Mg/ha/yr', description: 'Above-ground biomass per year (at the first visit) of the trees that died, were found dead or were not found again.' },
  agb_removed_mg_ha_yr: { name: 'Biomass removed by logging', short: 'Removed (Mg/ha/yr)', unit: 'Mg/ha/yr', description: 'Above-ground biomass per year (at the first visit) of the trees found as logged stumps.' },
  bgb_net_change_mg_ha_yr: { name: 'Net below-ground biomass change between visits', short: 'Root biomass change (Mg/ha/yr)', unit: 'Mg/ha/yr', description: 'Yearly change of the below-ground (root) biomass derived from the above-ground biomass of live trees.' },
  standing_dead_net_change_mg_ha_yr: { name: 'Net standing dead wood change between visits', short: 'Standing dead wood change (Mg/ha/yr)', unit: 'Mg/ha/yr', description: 'Yearly change of the biomass of standing dead trees.' },
  tree_carbon_net_change_mg_ha_yr: { name: 'Net tree carbon change between visits (three pools)', short: 'Tree carbon change (Mg C/ha/yr)', unit: 'Mg C/ha/yr', description: 'Yearly change of the carbon in above-ground and below-ground biomass of live trees and in standing dead wood.' },
};

export function variableLabel(variable: string): VariableLabel {
  const m = plotMetricByColumn(variable);
  if (m !== undefined) {
    const percent = m.share === true;
    return { name: m.label, short: percent ? `${m.short} (%)` : m.short, unit: percent ? '%' : m.unit, percent, description: m.description };
  }
  const stand = standLabel(variable);
  if (stand !== null) return { name: stand.name, short: stand.short, unit: stand.unit, percent: false, description: '' };
  const c = CHANGE_LABELS[variable];
  if (c !== undefined) return { ...c, percent: c.percent === true };
  return { name: variable, short: variable, unit: '', percent: false, description: '' };
}

/** A chart axis or panel title: the full name with its unit, e.g. "Basal area (m²/ha)". */
export function axisTitle(variable: string): string {
  const l = variableLabel(variable);
  return l.unit && !l.name.includes(`(${l.unit})`) ? `${l.name} (${l.unit})` : l.name;
}

/** A chart panel title: the short label, with the unit where the short label does not already end with it. */
export function shortTitle(variable: string): string {
  const l = variableLabel(variable);
  return l.unit && !/\([^)]*\)$/.test(l.short) ? `${l.short} (${l.unit})` : l.short;
}

/** A value of the variable in the unit shown (× 100 for shares). */
export function shownValue(variable: string, x: number): number;
export function shownValue(variable: string, x: number | null): number | null;
export function shownValue(variable: string, x: number | null): number | null {
  return x === null ? null : variableLabel(variable).percent ? 100 * x : x;
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
