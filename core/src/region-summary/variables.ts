// How the summary's variables (columns of `export plots`) are named for people on the page and in
// charts, and which of them a region summary estimates: all read from the plot-metric catalogue.
import { HEADLINE_METRIC_COLUMNS, plotMetricByColumn, REGION_METRIC_COLUMNS } from '@stemwise/db/catalogue';

export interface VariableLabel {
  /** Full name for tables. */
  readonly name: string;
  /** A few words for chart panels and cards. */
  readonly short: string;
  /** Unit, or '' for a plain number. */
  readonly unit: string;
}

export function variableLabel(variable: string): VariableLabel {
  const m = plotMetricByColumn(variable);
  return m === undefined ? { name: variable, short: variable, unit: '' } : { name: m.label, short: m.short, unit: m.unit };
}

/** Unit of a total (mean × forest area) of a per-hectare variable; '' for any other variable. */
export function totalUnit(variable: string): string {
  return plotMetricByColumn(variable)?.totalUnit ?? '';
}

/** Totals are meaningful for densities only: the per-hectare variables (those with a total unit). */
export const isPerHectare = (variable: string): boolean => totalUnit(variable) !== '';

/** Variables a region (and the nation) is summarised on by default, in row order. */
export const DEFAULT_REGION_VARIABLES: readonly string[] = REGION_METRIC_COLUMNS;

/** The figures shown as headline cards, in order. */
export const HEADLINE_VARIABLES: readonly string[] = HEADLINE_METRIC_COLUMNS;
