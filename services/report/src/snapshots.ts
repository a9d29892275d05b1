import crypto from 'node:crypto';
import {
  clearProblems,
  clearStale,
  getFitChart,
  insertSummarySnapshot,
  listRegionPlotSizes,
  recordSummaryPlotKeys,
  listCurveFits,
  listRegionForestAreas,
  listRegionLatestPlots,
  type RegionPlotRow,
  listStaleMarks,
  recordProblems,
  regionExists,
} from '@stemwise/db';
import { asStoredFitChart, cautionSettings, currentSpecies, IPCC_2006_CARBON_FRACTION, standTableValues, toFitRow, variableLabel, type SamplingErrorT, type ServiceDeps, type StoredFitChart } from '@stemwise/core';
import { isInfrastructureError, PermanentError, type Config, type Logger } from '@stemwise/platform';
import { plotPagePath } from './plot-map';
import { buildChangeChartSpec, buildFitChartSpec, buildGuildChartSpec, buildMeansChartSpec, regionChartPoints, type TopLevelSpec } from '@stemwise/core/charts';
import { regionCarbonSections, withWholeInterval } from './carbon-uncertainty';
import { RegionSummaryInputError, summariseRegion, summaryVariables, type PlotMetrics } from './summary/region-summary';
import { coverageOf, type PlotPair } from './summary/change-coverage';
import { SNAPSHOT_FORMAT, type FitChart, type SnapshotFitRow, type SnapshotMethod, type SnapshotPayload } from './snapshot-payload';
import { sharesOf } from './summary/biomass-method';
import { regionAggregates, type RegionAggregates } from './summary/region-aggregates';
import { PlotStrata } from './summary/input';

type Deps = Pick<ServiceDeps, 'db' | 'config'> & { log?: Logger };

/** The stored charts of the forest types (fit_charts), read once per summaries run and shared by their regions. */
export type StoredChartCache = Map<string, Promise<StoredFitChart | null>>;

/** The latest plots of each region, read once per summaries stage and shared by the region summaries and the national one. */
export type RegionPlotsCache = Map<string, Promise<RegionPlotRow[]>>;

/** A region's latest plots (listRegionLatestPlots), from the stage's cache when it has read them already. */
export function regionPlots(db: Deps['db'], region: string, cache?: RegionPlotsCache): Promise<RegionPlotRow[]> {
  let plots = cache?.get(region);
  if (!plots) {
    plots = listRegionLatestPlots(db, region);
    cache?.set(region, plots);
  }
  return plots;
}

export function samplingErrorMultiplier(config: Pick<Config, 'samplingErrorT'>): SamplingErrorT {
  return config.samplingErrorT === 't' ? 't' : config.samplingErrorT === '1.96' ? 1.96 : 2;
}

export function methodOf(config: Pick<Config, 'fitMetric' | 'fitAxis'>): SnapshotMethod {
  return {
    estimator:
      'Stratified estimates with forest types as strata (Cochran 1977, Sampling Techniques, ch. 5): mean Σ W_h ȳ_h, variance Σ W_h² s_h²/n_h; weights from forest areas (strata.csv), else from plot counts; no finite population correction.',
    biomass:
      'Above-ground biomass per stem by Chave et al. 2014 (wood density, diameter, height; heights measured or from a local height–diameter model), or by Chave et al. 2005 for the climate class where no height is available.',
    carbon_fraction: IPCC_2006_CARBON_FRACTION,
    carbon: `Carbon = ${IPCC_2006_CARBON_FRACTION} × above-ground biomass (IPCC 2006 default carbon fraction). Not a substitute for the national greenhouse-gas inventory method.`,
    fits: `${variableLabel(config.fitMetric).name} against ${variableLabel(config.fitAxis).name}: straight line and parabola by least squares per forest type, with the hump tests and a plain verdict.`,
  };
}

async function storedChart(deps: Deps, forestType: string, charts: StoredChartCache): Promise<StoredFitChart | null> {
  let chart = charts.get(forestType);
  if (!chart) charts.set(forestType, (chart = getFitChart(deps.db, forestType, deps.config.fitMetric, deps.config.fitAxis).then(asStoredFitChart)));
  return chart;
}

// The region's chart of a forest type, from what the fits job stored (never fitted here): its
// specification, drawn when the page is served (chart-svgs.ts).
async function fitChart(deps: Deps, region: string, forestType: string, charts: StoredChartCache): Promise<FitChart> {
  const { fitMetric: metric, fitAxis: axis } = deps.config;
  const stored = await storedChart(deps, forestType, charts);
  const points = stored?.points;
  const at = points ? points.regions.indexOf(region) : -1;
  const base = { forest_type: forestType, metric, axis, points: points?.x.length ?? 0, highlighted: points ? points.region.filter((r) => r === at).length : 0 };
  if (!stored) return { ...base, spec: null, missing: `no stored fit of ${metric} against ${axis} for ${forestType}: the fits stage has not stored its chart` };
  if (!stored.points.x.length) return { ...base, spec: null, missing: `no plot of ${forestType} has both ${metric} and ${axis}` };
  try {
    const spec = buildFitChartSpec({ forestType, metric, axis, points: regionChartPoints(stored.points, region, (plot) => plotPagePath(region, plot)), chart: stored, highlightLabel: `plots of ${region}` });
    return { ...base, spec, missing: null };
  } catch (err) {
    deps.log?.error({ err, region, forestType }, 'fit chart could not be specified');
    return { ...base, spec: null, missing: `the chart could not be drawn (${(err as Error).message})` };
  }
}

function optionalChart(deps: Deps, what: string, spec: () => TopLevelSpec | null): TopLevelSpec | null {
  try {
    return spec();
  } catch (err) {
    deps.log?.error({ err, chart: what }, 'chart could not be specified');
    return null;
  }
}

// One object of a plot's values, key by key into an object without prototype: a spread of the ~80 keys
// builds each object through a long chain of hidden classes (slow to build and to read), and a key a plot
// lacks is then looked up without walking Object.prototype.
function plotValues(...parts: ReadonlyArray<Readonly<Record<string, number | null>>>): Record<string, number | null> {
  const values = Object.create(null) as Record<string, number | null>;
  for (const part of parts) for (const k of Object.keys(part)) values[k] = part[k];
  return values;
}

/** A region's plots as the summaries take them: one value per variable (metrics, change, stand table), with the species names and the pair of visits. */
export function regionPlotInputs(plots: readonly RegionPlotRow[]): Array<PlotMetrics & PlotPair> {
  // Species counts use the accepted names the metrics stage stored per visit (synonyms and spelling
  // variants count as their species), like richness; a visit computed before they were stored has none.
  return plots.map((p) => ({
    plotId: p.plotKey,
    forestType: p.forestType,
    values: plotValues(p.metrics, p.change, standTableValues(p.standTable)),
    ...(p.speciesStems ? { speciesNames: Object.keys(p.speciesStems) } : {}),
    surveyDate: p.surveyDate,
    pair: p.pair,
  }));
}

/** Assembles a region's snapshot payload from the database (no write), with the aggregates the national summary takes of its plots. */
export async function assembleRegionSnapshot(deps: Deps, region: string, charts: StoredChartCache = new Map(), plotsCache?: RegionPlotsCache): Promise<{ payload: SnapshotPayload; aggregates: RegionAggregates }> {
  const { db, config } = deps;
  const [plots, areas, species, sizes] = await Promise.all([
    regionPlots(db, region, plotsCache),
    listRegionForestAreas(db, region),
    currentSpecies(db),
    listRegionPlotSizes(db, region),
  ]);
  const inputPlots = regionPlotInputs(plots);
  const strata = new PlotStrata(inputPlots); // each value read once, for the summary and the aggregates
  const estimated = summariseRegion({ region, plots: inputPlots, forestAreas: areas, variables: summaryVariables(inputPlots), options: { samplingErrorT: samplingErrorMultiplier(config), caution: cautionSettings(config) } }, strata);
  const { carbon, treeCarbon, carbonChange, treeCarbonChange } = await regionCarbonSections(db, config, region, areas);
  const summary = { ...estimated, rows: withWholeInterval(estimated.rows, carbon, treeCarbon, carbonChange, treeCarbonChange) };

  const fits: SnapshotFitRow[] = [];
  for (const scope of [{ kind: 'forest_type' }, { kind: 'region', region }] as const) {
    const rows = summary.forest_types.length
      ? await listCurveFits(db, { scope, metric: config.fitMetric, axis: config.fitAxis, forestTypes: summary.forest_types })
      : [];
    for (const r of rows) fits.push({ scope: r.scope, ...(toFitRow(r) as Omit<SnapshotFitRow, 'scope'>) });
  }
  const fitCharts: FitChart[] = [];
  for (const t of summary.forest_types) fitCharts.push(await fitChart(deps, region, t, charts));

  const means = optionalChart(deps, 'means', () => buildMeansChartSpec(summary.rows));
  const guilds = optionalChart(deps, 'guilds', () => buildGuildChartSpec(summary.guild_composition));
  const change = optionalChart(deps, 'change', () => buildChangeChartSpec(summary.rows));

  const aggregates = regionAggregates(region, inputPlots, strata);
  const payload: SnapshotPayload = {
    format: SNAPSHOT_FORMAT,
    region,
    data: { plots: plots.length, first_survey: aggregates.first_survey, last_survey: aggregates.last_survey, species_reference_version: species.versionId },
    method: methodOf(config),
    summary,
    fits,
    biomass_method: sharesOf(aggregates.biomass, aggregates.forest_types.map((t) => t.forest_type)),
    plot_sizes: sizes.map((z) => ({ forest_type: z.forestType, area_ha: z.areaHa, n_plots: z.plots })),
    carbon_uncertainty: carbon,
    tree_carbon_uncertainty: treeCarbon,
    carbon_change_uncertainty: carbonChange,
    tree_carbon_change_uncertainty: treeCarbonChange,
    change: coverageOf(aggregates.change),
    charts: { means, guilds, change, fits: fitCharts },
  };
  return { payload, aggregates };
}

/** The ETag of a payload: SHA-256 of its JSON text (the payload holds no clock, so equal content gives an equal tag). */
export function payloadEtag(payload: object): string {
  return crypto.createHash('sha256').update(JSON.stringify(payload)).digest('base64url').slice(0, 32);
}

export interface RefreshedRegion {
  region: string;
  version: number;
  /** false when the content equalled the latest version (no new version was stored). */
  created: boolean;
}

/**
 * The `report.summaries` stage: a new snapshot of every region marked stale for `summary`, each stored
 * with its stale mark cleared in one transaction. A region that no longer exists is just unmarked. A
 * region whose summary cannot be built is recorded in compute_problems, unmarked and reported in
 * `rejected`; the others are still stored.
 */
export async function refreshStaleSummaries(deps: Deps & { runId?: string; plots?: RegionPlotsCache }): Promise<{ regions: RefreshedRegion[]; rejected: Array<{ region: string; reason: string }> }> {
  const { db } = deps;
  const charts: StoredChartCache = new Map();
  const regions: RefreshedRegion[] = [];
  const rejected: Array<{ region: string; reason: string }> = [];
  for (const mark of await listStaleMarks(db, 'summary')) {
    const region = mark.key;
    if (!(await regionExists(db, region))) {
      await clearStale(db, 'summary', [mark]);
      continue;
    }
    let payload: SnapshotPayload;
    let aggregates: RegionAggregates;
    try {
      ({ payload, aggregates } = await assembleRegionSnapshot(deps, region, charts, deps.plots));
    } catch (err) {
      if (isInfrastructureError(err)) throw err;
      // This region's summary cannot be built from its data: the latest snapshot stays, the reason is
      // recorded, the mark cleared (no run retries it until its data change); the other regions go on.
      const reason = (err as Error).message;
      deps.log?.error({ err, runId: deps.runId, region }, 'region summary could not be built; the other regions go on');
      await db.transaction(async (tx) => {
        await recordProblems(tx, deps.runId ?? 'export', [{ stage: 'summary', forestType: null, region, visitId: null, plotKey: null, reason }]);
        await clearStale(tx, 'summary', [mark]);
      });
      rejected.push({ region, reason });
      continue;
    }
    const etag = payloadEtag(payload);
    const stored = await db.transaction(async (tx) => {
      const r = await insertSummarySnapshot(tx, region, etag, payload, aggregates);
      if (r.created) await recordSummaryPlotKeys(tx, region, r.version);
      await clearStale(tx, 'summary', [mark]);
      await clearProblems(tx, 'summary', [region]);
      return r;
    });
    regions.push({ region, ...stored });
  }
  return { regions, rejected };
}
