import { stratumMoments, type StratumMoments } from '@stemwise/core';
import { biomassParts, type BiomassParts } from './biomass-method';
import { changeParts, type ChangeParts, type PlotPair } from './change-coverage';
import { PlotStrata, RegionSummaryInputError, type PlotMetrics } from './input';
import { CHANGE_VARIABLES, summaryVariables } from './region-summary';

// What the national summary needs of one region, kept with each region summary version
// (region_summaries.aggregates) so that the national summary combines the regions without reading a
// plot again (docs/methods.md#national-estimates): per forest type and variable the sufficient
// statistics of the stratified estimator (n_h, ȳ_h, s_h², by stratumMoments over the same values in the
// same order as the plot-by-plot estimate, hence the same figures to the last bit), and the parts of
// the survey dates, the change coverage and the biomass method shares.

export const AGGREGATES_FORMAT = 1;

/** A region's plots as strata by forest type: their sizes and the moments of each variable's values. */
export interface StrataMoments {
  /** Forest types with plots (sorted), each with its number of plots. */
  readonly forest_types: ReadonlyArray<{ readonly forest_type: string; readonly n_plots: number }>;
  /** Per variable that some plot has a key for: the moments of each forest type's values, in forest_types order. */
  readonly moments: Readonly<Record<string, readonly StratumMoments[]>>;
}

export interface RegionAggregates extends StrataMoments {
  readonly format: typeof AGGREGATES_FORMAT;
  /** Earliest and latest survey date of the plots' latest visits. */
  readonly first_survey: string | null;
  readonly last_survey: string | null;
  readonly change: ChangeParts;
  readonly biomass: BiomassParts;
}

/** The moments of each of `variables` (those some plot has a key for) per forest type of the plots. */
export function strataMoments(strata: PlotStrata, variables: readonly string[]): StrataMoments {
  const moments: Record<string, StratumMoments[]> = {};
  for (const v of variables) if (strata.keyed(v)) moments[v] = strata.values(v).map((values, h) => stratumMoments(values, strata.types[h]));
  return { forest_types: strata.types.map((t) => ({ forest_type: t, n_plots: (strata.byType.get(t) as readonly PlotMetrics[]).length })), moments };
}

/**
 * The aggregates of a region's plots (one visit each, the latest): moments of its summary variables and
 * of every change variable (a region without any change still counts its plots as strata without values).
 * Pass the strata its summary used to read each value once. Throws RegionSummaryInputError, as the region
 * summary does, on a value that is not a finite number or null.
 */
export function regionAggregates(region: string, plots: ReadonlyArray<PlotMetrics & PlotPair>, strata = new PlotStrata(plots)): RegionAggregates {
  if (strata.plots !== plots) throw new Error('regionAggregates: the strata given are not of these plots');
  const variables = [...new Set([...summaryVariables(plots), ...CHANGE_VARIABLES])];
  for (const v of variables) {
    strata.values(v).forEach((values, h) =>
      values.forEach((x, i) => {
        if (x !== null && (typeof x !== 'number' || !Number.isFinite(x))) {
          const p = (strata.byType.get(strata.types[h]) as readonly PlotMetrics[])[i];
          throw new RegionSummaryInputError('BAD_VALUE', `plot '${p.plotId}' ${v} is ${String(x)}; expected a finite number or null`);
        }
      }),
    );
  }
  let first: string | null = null;
  let last: string | null = null;
  for (const p of plots) {
    if (first === null || p.surveyDate < first) first = p.surveyDate;
    if (last === null || p.surveyDate > last) last = p.surveyDate;
  }
  return { format: AGGREGATES_FORMAT, ...strataMoments(strata, variables), first_survey: first, last_survey: last, change: changeParts(plots), biomass: biomassParts(plots) };
}

/** The stored aggregates when they are of this format, else null (made before they were kept, or by another format). */
export function asRegionAggregates(stored: unknown): RegionAggregates | null {
  if (typeof stored !== 'object' || stored === null) return null;
  const a = stored as Partial<RegionAggregates>;
  return a.format === AGGREGATES_FORMAT && Array.isArray(a.forest_types) && typeof a.moments === 'object' && a.change && a.biomass ? (a as RegionAggregates) : null;
}
