import {
  getNationalSnapshot,
  insertNationalSnapshot,
  listLatestSummaryVersions,
  listRegionForestAreas,
  listRegionNames,
  listSummaryAggregates,
  type Queryable,
} from '@stemwise/db';
import { cautionSettings, type NationalSummary, type ServiceDeps } from '@stemwise/core';
import { buildChangeChartSpec, buildMeansChartSpec, type TopLevelSpec } from '@stemwise/core/charts';
import type { Logger } from '@stemwise/platform';
import { nationalCarbonSections, withWholeInterval, type CarbonUncertaintySection } from './carbon-uncertainty';
import { combineNation, type NationalRegionStrata } from './summary/national-summary';
import { CHANGE_VARIABLES, variableList } from './summary/region-summary';
import { coverageOf, joinChangeParts, type ChangeCoverage } from './summary/change-coverage';
import { joinBiomassParts, sharesOf, type BiomassMethodRow } from './summary/biomass-method';
import { asRegionAggregates, regionAggregates, type RegionAggregates } from './summary/region-aggregates';
import type { ChartSource, SnapshotData, SnapshotMethod } from './snapshot-payload';
import { payloadEtag, regionPlotInputs, regionPlots, samplingErrorMultiplier, type RegionPlotsCache } from './snapshots';

type Deps = Pick<ServiceDeps, 'db' | 'config'> & { log?: Logger; /** The region plots the stage has read already. */ plots?: RegionPlotsCache };

// What one national_summaries.payload holds (format 1): the national rows and how they were made,
// the visits they use, and the region summary versions current when it was assembled. The latter
// make it stale: when any region gets a new summary version, the next summaries job assembles it again.

export const NATIONAL_FORMAT = 1;

export interface NationalPayload {
  readonly format: typeof NATIONAL_FORMAT;
  /** Plots, survey dates (latest visit of each plot) and species list as for a region. */
  readonly data: Omit<SnapshotData, 'species_reference_version'> & { readonly regions: number };
  readonly method: Pick<SnapshotMethod, 'estimator'>;
  readonly summary: NationalSummary;
  /** Region → its latest summary version (null: none yet) when this was assembled. */
  readonly sources: Readonly<Record<string, number | null>>;
  /** Whole uncertainty of the above-ground carbon stock (docs/methods.md#carbon-uncertainty); null when off, absent in older snapshots. */
  readonly carbon_uncertainty?: CarbonUncertaintySection | null;
  /** The same for the tree pool (tree_carbon_mg_ha), the net carbon change (carbon_net_change_mg_ha_yr) and the tree pool's (tree_carbon_net_change_mg_ha_yr); absent in older snapshots. */
  readonly tree_carbon_uncertainty?: CarbonUncertaintySection | null;
  readonly carbon_change_uncertainty?: CarbonUncertaintySection | null;
  readonly tree_carbon_change_uncertainty?: CarbonUncertaintySection | null;
  /** The pairs of visits behind the national estimates of change (null: no plot measured twice); absent in older snapshots. */
  readonly change?: ChangeCoverage | null;
  /** Share of the AGB from each height source and wood-density level, over every plot (absent in older snapshots). */
  readonly biomass_method?: readonly BiomassMethodRow[];
  /** The charts' specifications, drawn when the page is served (SVG in older snapshots). */
  readonly charts: { readonly means: ChartSource | null; readonly change?: ChartSource | null };
}

export interface NationalSnapshot {
  readonly version: number;
  readonly etag: string;
  readonly createdAt: Date;
  readonly payload: NationalPayload;
}

export const NATIONAL_ESTIMATOR =
  'All regions together: a stratified estimate with region × forest type as strata (Cochran 1977, Sampling Techniques, ch. 5): mean Σ W_h ȳ_h, variance Σ W_h² s_h²/n_h, Student t at Satterthwaite degrees of freedom; each forest type nationally with the regions as strata; weights from forest areas (strata.csv), else from plot counts; no finite population correction.';

/** The latest national snapshot, or a given version; null when there is none. */
export async function readNationalSnapshot(db: Queryable, version?: number): Promise<NationalSnapshot | null> {
  const row = await getNationalSnapshot(db, version);
  return row && { version: row.version, etag: row.etag, createdAt: row.createdAt, payload: row.payload as NationalPayload };
}

// A region's aggregates: those kept with its summary version in `sources`, else (a version made before
// they were kept, or a region without a summary yet) computed from its plots as the summary would.
async function aggregatesOf(deps: Deps, region: string, stored: ReadonlyMap<string, unknown>): Promise<RegionAggregates> {
  return asRegionAggregates(stored.get(region)) ?? regionAggregates(region, regionPlotInputs(await regionPlots(deps.db, region, deps.plots)));
}

/** Assembles the national payload from the database (no write): from the aggregates of the region summary versions in `sources`, not from the plots. */
export async function assembleNationalSnapshot(deps: Deps, sources: Readonly<Record<string, number | null>>): Promise<NationalPayload> {
  const { db, config } = deps;
  const versions = new Map(Object.entries(sources).filter((e): e is [string, number] => e[1] !== null));
  const [names, stored] = await Promise.all([listRegionNames(db), listSummaryAggregates(db, versions)]);
  const regions: Array<NationalRegionStrata & { readonly aggregates: RegionAggregates }> = [];
  for (const region of names) {
    const [aggregates, forestAreas] = await Promise.all([aggregatesOf(deps, region, stored), listRegionForestAreas(db, region)]);
    regions.push({ region, forestAreas, strata: aggregates, aggregates });
  }
  const all = regions.map((r) => r.aggregates);
  const variables = variableList(
    all.some((a) => CHANGE_VARIABLES.some((v) => a.moments[v]?.some((m) => m.n > 0))),
    all.flatMap((a) => Object.keys(a.moments)),
  );
  const estimated = combineNation({ regions, variables, options: { samplingErrorT: samplingErrorMultiplier(config), caution: cautionSettings(config) } });
  const { carbon, treeCarbon, carbonChange, treeCarbonChange } = await nationalCarbonSections(db, config, regions);
  const summary = { ...estimated, rows: withWholeInterval(estimated.rows, carbon, treeCarbon, carbonChange, treeCarbonChange) };
  const firsts = all.map((a) => a.first_survey).filter((d): d is string => d !== null);
  const lasts = all.map((a) => a.last_survey).filter((d): d is string => d !== null);
  let means: TopLevelSpec | null = null;
  let change: TopLevelSpec | null = null;
  try {
    means = buildMeansChartSpec(summary.rows, { label: 'whole country', subtitle: 'dark: all regions together (stratified by region × forest type); light: each forest type nationally' });
  } catch (err) {
    deps.log?.error({ err }, 'national means chart could not be specified');
  }
  try {
    change = buildChangeChartSpec(summary.rows, { label: 'whole country' });
  } catch (err) {
    deps.log?.error({ err }, 'national change chart could not be specified');
  }
  return {
    format: NATIONAL_FORMAT,
    data: { plots: summary.n_plots, regions: summary.regions.length, first_survey: firsts.length ? firsts.reduce((a, b) => (b < a ? b : a)) : null, last_survey: lasts.length ? lasts.reduce((a, b) => (b > a ? b : a)) : null },
    method: { estimator: NATIONAL_ESTIMATOR },
    summary,
    sources,
    biomass_method: sharesOf(joinBiomassParts(all.map((a) => a.biomass)), all.flatMap((a) => a.forest_types.map((t) => t.forest_type))),
    carbon_uncertainty: carbon,
    tree_carbon_uncertainty: treeCarbon,
    carbon_change_uncertainty: carbonChange,
    tree_carbon_change_uncertainty: treeCarbonChange,
    change: coverageOf(joinChangeParts(all.map((a) => a.change))),
    charts: { means, change },
  };
}

const sameSources = (a: Readonly<Record<string, number | null>>, b: Readonly<Record<string, number | null>>): boolean =>
  Object.keys(a).length === Object.keys(b).length && Object.entries(a).every(([k, v]) => Object.hasOwn(b, k) && b[k] === v);

/**
 * The national step of the `report.summaries` stage, run after the region summaries: a new national
 * version when the region summary versions differ from those the latest one was built from (or there
 * is none). Returns null when it was up to date.
 */
export async function refreshNationalSummary(deps: Deps): Promise<{ version: number; created: boolean } | null> {
  const sources = Object.fromEntries([...(await listLatestSummaryVersions(deps.db)).entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)));
  const latest = await readNationalSnapshot(deps.db);
  if (latest && sameSources(latest.payload.sources, sources)) return null;
  const payload = await assembleNationalSnapshot(deps, sources);
  return insertNationalSnapshot(deps.db, payloadEtag(payload), payload);
}
