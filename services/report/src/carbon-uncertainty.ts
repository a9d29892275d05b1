import { listHeightModels, listRegionCarbonMoments, type Queryable } from '@stemwise/db';
import {
  CARBON_ERROR_SOURCES,
  carbonUncertainty,
  heightModelFromRow,
  IPCC_2006_CARBON_FRACTION,
  WHOLE_REGION,
  type CarbonErrorSource,
  type CarbonMoments,
  type CarbonStratum,
  type CarbonUncertainty,
  type HeightModelError,
  type RegionRow,
} from '@stemwise/core';
import type { Config } from '@stemwise/platform';
import { resolveForestAreas } from './summary/forest-areas';

// The whole uncertainty of the above-ground carbon stock in the region and national summaries
// (docs/methods.md#carbon-uncertainty): read the sums each plot's metrics stored, the forest types'
// height models, and run the Monte Carlo of core's carbonUncertainty. Kept apart from the summaries'
// own estimators: the summaries call these functions once each and store what they return.

/** The variable whose rows get the whole interval. */
export const CARBON_VARIABLE = 'carbon_mg_ha';

/** One scope (the whole region or nation, or one forest type) of the section. */
export interface CarbonUncertaintyRow {
  readonly forest_type: string;
  readonly n_plots: number;
  /** Mg C/ha. */
  readonly mean: number;
  readonly sampling_se: number;
  readonly sampling_ci_low: number;
  readonly sampling_ci_high: number;
  readonly whole_se: number;
  readonly whole_ci_low: number;
  readonly whole_ci_high: number;
  readonly forest_area_ha: number | null;
  /** Mg C over the forest area; null without every stratum's area. */
  readonly total: number | null;
  readonly total_sampling_ci_low: number | null;
  readonly total_sampling_ci_high: number | null;
  readonly total_whole_ci_low: number | null;
  readonly total_whole_ci_high: number | null;
  /** Share of each source's variance in the sum of the sources' variances. */
  readonly shares: Readonly<Record<CarbonErrorSource, number>>;
}

export interface CarbonUncertaintySection {
  readonly variable: typeof CARBON_VARIABLE;
  readonly pool: 'above-ground';
  readonly rows: readonly CarbonUncertaintyRow[];
  readonly draws: number;
  readonly seed: number;
  readonly confidence: number;
  readonly tree_error_scope: 'forest' | 'plots' | null;
  /** Why there is no section, when there is none (e.g. plots computed before the sums were kept). */
  readonly missing: string | null;
  /** What the whole interval covers and what it does not. */
  readonly covers: readonly string[];
  readonly not_covered: readonly string[];
}

export const CARBON_COVERS: readonly string[] = [
  'sampling error (the stratified estimate, as in the sampling interval)',
  "the biomass model's residual error, tree by tree (Chave et al. 2014 eq. 4 residual standard error on the log scale)",
  "the local height–diameter model's residual error (tree by tree) and its parameter uncertainty (shared by every tree of a forest type)",
  "each tree's wood density around its reference value",
];

export const CARBON_NOT_COVERED: readonly string[] = [
  'field measurement error (diameters, heights, species names)',
  "the error of the forest-area map: forest areas are taken as exact",
  "the biomass model's own parameter uncertainty and any bias of a pantropical model at this site",
  'errors shared by the reference wood densities of a species',
  'the carbon fraction (0.47 taken as exact)',
  'the other carbon pools: this interval is of above-ground live trees only (below-ground biomass and standing dead wood have sampling intervals only; lying dead wood, litter and soil are not estimated)',
];

const isMoments = (m: unknown): m is CarbonMoments => {
  if (typeof m !== 'object' || m === null) return false;
  const x = m as Record<string, unknown>;
  const arr = (v: unknown, n: number) => Array.isArray(v) && v.length === n && v.every((e) => typeof e === 'number');
  return typeof x.value === 'number' && arr(x.sq, 3) && arr(x.sqPlot, 3) && arr(x.lnD, 5);
};

interface PlotSums {
  readonly scope: string;
  readonly forestType: string;
  readonly moments: CarbonMoments;
}

/** A region's plots with their sums, or the number that have none. */
export async function readRegionCarbonSums(db: Queryable, region: string): Promise<{ plots: PlotSums[]; without: number }> {
  const rows = await listRegionCarbonMoments(db, region);
  const plots: PlotSums[] = [];
  let without = 0;
  for (const r of rows) {
    if (isMoments(r.moments)) plots.push({ scope: region, forestType: r.forestType, moments: r.moments });
    else without += 1;
  }
  return { plots, without };
}

async function heightModelErrors(db: Queryable, forestTypes: readonly string[]): Promise<Map<string, HeightModelError>> {
  const out = new Map<string, HeightModelError>();
  for (const row of await listHeightModels(db, forestTypes)) {
    const m = heightModelFromRow(row);
    out.set(row.forestType, { rse: m.rse, covariance: m.covariance ?? null });
  }
  return out;
}

type Settings = Pick<Config, 'carbonDraws' | 'seed' | 'carbonAllometryRse' | 'carbonWoodDensitySd'>;

const unavailable = (config: Settings, missing: string): CarbonUncertaintySection => ({
  variable: CARBON_VARIABLE,
  pool: 'above-ground',
  rows: [],
  draws: config.carbonDraws,
  seed: config.seed,
  confidence: 0.95,
  tree_error_scope: null,
  missing,
  covers: CARBON_COVERS,
  not_covered: CARBON_NOT_COVERED,
});

function row(forestType: string, r: CarbonUncertainty): CarbonUncertaintyRow {
  const a = r.area;
  return {
    forest_type: forestType,
    n_plots: r.n,
    mean: r.mean,
    sampling_se: r.samplingSe,
    sampling_ci_low: r.sampling.low,
    sampling_ci_high: r.sampling.high,
    whole_se: r.wholeSe,
    whole_ci_low: r.whole.low,
    whole_ci_high: r.whole.high,
    forest_area_ha: a,
    total: r.total,
    total_sampling_ci_low: a === null ? null : r.sampling.low * a,
    total_sampling_ci_high: a === null ? null : r.sampling.high * a,
    total_whole_ci_low: a === null ? null : r.whole.low * a,
    total_whole_ci_high: a === null ? null : r.whole.high * a,
    shares: r.shares,
  };
}

/**
 * The section of a set of strata (scope × forest type, each with its forest area): the whole estimate,
 * then each forest type alone (for a nation: its regions as strata). Null when the setting turns it off.
 */
export async function carbonUncertaintySection(
  db: Queryable,
  config: Settings,
  plots: readonly PlotSums[],
  without: number,
  areaOf: (scope: string, forestType: string) => number | null,
): Promise<CarbonUncertaintySection | null> {
  if (config.carbonDraws === 0) return null;
  if (without > 0) {
    return unavailable(config, `${without} plot(s) were computed before the sums of the carbon uncertainty were kept: run a full recompute (stemwise recompute --all) to get the whole interval.`);
  }
  if (plots.length === 0) return unavailable(config, 'no plots');
  const byStratum = new Map<string, { scope: string; forestType: string; moments: CarbonMoments[] }>();
  for (const p of plots) {
    const key = `${p.scope}\u0000${p.forestType}`;
    const s = byStratum.get(key);
    if (s) s.moments.push(p.moments);
    else byStratum.set(key, { scope: p.scope, forestType: p.forestType, moments: [p.moments] });
  }
  const strata: CarbonStratum[] = [...byStratum.values()]
    .map((s) => ({ name: `${s.scope} / ${s.forestType}`, forestType: s.forestType, size: areaOf(s.scope, s.forestType), plots: s.moments }))
    .sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
  // The summaries' rule: forest areas weight the strata only when every stratum has one.
  const allAreas = strata.every((s) => s.size !== null);
  const usable = strata.map((s) => (allAreas ? s : { ...s, size: null }));
  const forestTypes = [...new Set(usable.map((s) => s.forestType))].sort();
  const settings = {
    draws: config.carbonDraws,
    seed: config.seed,
    carbonFraction: IPCC_2006_CARBON_FRACTION,
    allometryRse: config.carbonAllometryRse,
    woodDensityTreeSd: config.carbonWoodDensitySd,
    heightModels: await heightModelErrors(db, forestTypes),
    stratified: { weighting: allAreas ? ('area' as const) : ('plot_count' as const) },
  };
  const whole = carbonUncertainty(usable, settings);
  if (whole === null) return unavailable(config, 'a stratum has a single plot: no sampling variance, so no interval (as for the sampling interval)');
  const rows = [row(WHOLE_REGION, whole)];
  for (const t of forestTypes) {
    const r = carbonUncertainty(usable.filter((s) => s.forestType === t), settings);
    if (r !== null) rows.push(row(t, r));
  }
  return { ...unavailable(config, ''), rows, confidence: whole.confidence, tree_error_scope: whole.treeErrorScope, missing: null };
}

/** A region's section: its forest types as strata, with the areas the region summary uses. */
export async function regionCarbonUncertainty(db: Queryable, config: Settings, region: string, forestAreas: Readonly<Record<string, number>>): Promise<CarbonUncertaintySection | null> {
  if (config.carbonDraws === 0) return null;
  const { plots, without } = await readRegionCarbonSums(db, region);
  const resolved = resolveForestAreas([...new Set(plots.map((p) => p.forestType))].sort(), forestAreas);
  return carbonUncertaintySection(db, config, plots, without, (_scope, t) => resolved.areas[t] ?? null);
}

/** The national section: region × forest type as strata. */
export async function nationalCarbonUncertainty(
  db: Queryable,
  config: Settings,
  regions: ReadonlyArray<{ readonly region: string; readonly forestAreas?: Readonly<Record<string, number>> }>,
): Promise<CarbonUncertaintySection | null> {
  if (config.carbonDraws === 0) return null;
  const plots: PlotSums[] = [];
  let without = 0;
  const areas = new Map<string, Readonly<Record<string, number | null>>>();
  for (const r of regions) {
    const sums = await readRegionCarbonSums(db, r.region);
    plots.push(...sums.plots);
    without += sums.without;
    areas.set(r.region, resolveForestAreas([...new Set(sums.plots.map((p) => p.forestType))].sort(), r.forestAreas ?? {}).areas);
  }
  return carbonUncertaintySection(db, config, plots, without, (scope, t) => areas.get(scope)?.[t] ?? null);
}

/** The summary rows of carbon_mg_ha with the whole interval of the section added (the other rows as they are). */
export function withWholeInterval<R extends RegionRow>(rows: readonly R[], section: CarbonUncertaintySection | null | undefined): R[] {
  if (!section || section.rows.length === 0) return [...rows];
  const byType = new Map(section.rows.map((r) => [r.forest_type, r]));
  return rows.map((r) => {
    const u = r.variable === CARBON_VARIABLE ? byType.get(r.forest_type) : undefined;
    if (!u) return r;
    return { ...r, whole_se: u.whole_se, whole_ci_low: u.whole_ci_low, whole_ci_high: u.whole_ci_high, total_whole_ci_low: u.total_whole_ci_low, total_whole_ci_high: u.total_whole_ci_high };
  });
}

export { CARBON_ERROR_SOURCES };
