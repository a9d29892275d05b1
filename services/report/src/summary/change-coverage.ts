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

/**
 * What the coverage is made of, for a set of plots: counts per forest type, the earliest first and
 * latest second visit of the pairs, and the years of each pair in plot order. The parts of several
 * regions joined in region order give the coverage of all their plots, to the last bit (the mean
 * adds the years in the same order).
 */
export interface ChangeParts {
  readonly by_forest_type: ChangeCoverage['by_forest_type'];
  readonly first_visit: string | null;
  readonly last_visit: string | null;
  readonly years: readonly number[];
}

const byName = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

/** The parts of the coverage of `plots` (in their order). */
export function changeParts(plots: readonly PlotPair[]): ChangeParts {
  return joinChangeParts(
    plots.map((p) => ({
      by_forest_type: [{ forest_type: p.forestType, n_plots_with_pair: p.pair === null ? 0 : 1, n_plots: 1 }],
      first_visit: p.pair?.dateFrom ?? null,
      last_visit: p.pair === null ? null : p.surveyDate,
      years: p.pair === null ? [] : [p.pair.years],
    })),
  );
}

/** The parts of several sets of plots together, in the order given. */
export function joinChangeParts(parts: readonly ChangeParts[]): ChangeParts {
  const counts = new Map<string, { n_plots_with_pair: number; n_plots: number }>();
  let first: string | null = null;
  let last: string | null = null;
  const years: number[] = [];
  for (const part of parts) {
    for (const t of part.by_forest_type) {
      const c = counts.get(t.forest_type) ?? { n_plots_with_pair: 0, n_plots: 0 };
      counts.set(t.forest_type, { n_plots_with_pair: c.n_plots_with_pair + t.n_plots_with_pair, n_plots: c.n_plots + t.n_plots });
    }
    if (part.first_visit !== null && (first === null || part.first_visit < first)) first = part.first_visit;
    if (part.last_visit !== null && (last === null || part.last_visit > last)) last = part.last_visit;
    for (const y of part.years) years.push(y);
  }
  const by_forest_type = [...counts.keys()].sort(byName).map((t) => ({ forest_type: t, ...(counts.get(t) as { n_plots_with_pair: number; n_plots: number }) }));
  return { by_forest_type, first_visit: first, last_visit: last, years };
}

/** The coverage the parts describe; null when no plot has a pair (no plot measured twice). */
export function coverageOf(parts: ChangeParts): ChangeCoverage | null {
  const { years } = parts;
  if (!years.length) return null;
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (const y of years) {
    sum += y;
    if (y < min) min = y;
    if (y > max) max = y;
  }
  return {
    n_plots_with_pair: years.length,
    n_plots: parts.by_forest_type.reduce((a, t) => a + t.n_plots, 0),
    by_forest_type: parts.by_forest_type,
    first_visit: parts.first_visit as string,
    last_visit: parts.last_visit as string,
    interval_years: { min, mean: sum / years.length, max },
  };
}

/** The coverage of the pairs among `plots`; null when no plot has a pair (no plot measured twice). */
export function changeCoverage(plots: readonly PlotPair[]): ChangeCoverage | null {
  return coverageOf(changeParts(plots));
}
