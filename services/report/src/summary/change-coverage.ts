// Which pairs of visits the estimates of change come from: how many plots have one (per forest type),
// the years they span and the years between their two visits. Stored in the snapshots beside the
// summary (the rows themselves are in summary.rows), shown by the change section and the change routes.

/** A plot's pair of visits: its latest visit and the one before (null: measured once). */
export interface PlotPair {
  readonly forestType: string;
  /** Date of the latest visit (the pair's second). */
  readonly surveyDate: string;
  readonly pair: { readonly dateFrom: string; readonly years: number } | null;
}

export interface ChangeCoverage {
  /** Plots whose latest visit has a previous one (each counts once, with its latest pair). */
  readonly n_plots_with_pair: number;
  /** Plots in all (with or without a pair). */
  readonly n_plots: number;
  readonly by_forest_type: ReadonlyArray<{ readonly forest_type: string; readonly n_plots_with_pair: number; readonly n_plots: number }>;
  /** Earliest first visit and latest second visit of the pairs (ISO dates). */
  readonly first_visit: string;
  readonly last_visit: string;
  /** Years between the two visits of a pair: shortest, mean, longest. */
  readonly interval_years: { readonly min: number; readonly mean: number; readonly max: number };
}

/** The coverage of the pairs among `plots`; null when no plot has a pair (no plot measured twice). */
export function changeCoverage(plots: readonly PlotPair[]): ChangeCoverage | null {
  const paired = plots.filter((p) => p.pair !== null);
  if (!paired.length) return null;
  const types = [...new Set(plots.map((p) => p.forestType))].sort();
  const from = paired.map((p) => p.pair!.dateFrom).sort();
  const to = paired.map((p) => p.surveyDate).sort();
  const years = paired.map((p) => p.pair!.years);
  return {
    n_plots_with_pair: paired.length,
    n_plots: plots.length,
    by_forest_type: types.map((t) => ({
      forest_type: t,
      n_plots_with_pair: paired.filter((p) => p.forestType === t).length,
      n_plots: plots.filter((p) => p.forestType === t).length,
    })),
    first_visit: from[0],
    last_visit: to[to.length - 1],
    interval_years: { min: Math.min(...years), mean: years.reduce((a, b) => a + b, 0) / years.length, max: Math.max(...years) },
  };
}
