import crypto from 'node:crypto';
import {
  clearProblems,
  clearStale,
  insertSummarySnapshot,
  listCurveFits,
  listLatestPlotMetrics,
  listRegionForestAreas,
  listRegionLatestPlots,
  listRegionStemNames,
  listStaleMarks,
  recordProblems,
  regionExists,
} from '@stemwise/db';
import { cautionSettings, currentSpecies, fitCurves, IPCC_2006_CARBON_FRACTION, pointsOf, toFitRow, type CurveResult, type SamplingErrorT, type ServiceDeps } from '@stemwise/core';
import { isInfrastructureError, PermanentError, type Config, type Logger } from '@stemwise/platform';
import { renderFitChartSvg, renderGuildChartSvg, renderMeansChartSvg } from '@stemwise/core/charts';
import { RegionSummaryInputError, summariseRegion, type PlotMetrics } from './summary/region-summary';
import { SNAPSHOT_FORMAT, type FitChart, type SnapshotFitRow, type SnapshotMethod, type SnapshotPayload } from './snapshot-payload';

type Deps = Pick<ServiceDeps, 'db' | 'config'> & { log?: Logger };

/** Chart inputs of one forest type, computed once per summaries run and shared by its regions. */
interface ForestTypeCurve {
  points: Array<{ x: number; y: number; region: string }>;
  result: CurveResult | null;
  error: string | null;
}
export type CurveCache = Map<string, Promise<ForestTypeCurve>>;

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
    fits: `${config.fitMetric} against ${config.fitAxis}: straight line and parabola by least squares per forest type, with the hump tests and a plain verdict.`,
  };
}

// The forest type's fit recomputed with the stored settings (deterministic: same points, same seed);
// the bootstrap is skipped because the chart draws the delta-method interval only.
async function forestTypeCurve(deps: Deps, forestType: string): Promise<ForestTypeCurve> {
  const plots = await listLatestPlotMetrics(deps.db, forestType);
  const points = pointsOf(plots, deps.config.fitAxis, deps.config.fitMetric);
  if (!points.length) return { points, result: null, error: `no plot of ${forestType} has both ${deps.config.fitMetric} and ${deps.config.fitAxis}` };
  try {
    return { points, result: fitCurves(points.map(({ x, y }) => ({ x, y })), { bootstrapN: 0, seed: deps.config.seed }), error: null };
  } catch (err) {
    return { points, result: null, error: (err as Error).message };
  }
}

async function fitChart(deps: Deps, region: string, forestType: string, curves: CurveCache): Promise<FitChart> {
  let curve = curves.get(forestType);
  if (!curve) curves.set(forestType, (curve = forestTypeCurve(deps, forestType)));
  const { points, result, error } = await curve;
  const base = { forest_type: forestType, metric: deps.config.fitMetric, axis: deps.config.fitAxis, points: points.length, highlighted: points.filter((p) => p.region === region).length };
  if (!result) return { ...base, svg: null, missing: error };
  try {
    const svg = await renderFitChartSvg({
      forestType,
      metric: deps.config.fitMetric,
      axis: deps.config.fitAxis,
      points: points.map((p) => ({ x: p.x, y: p.y, highlight: p.region === region })),
      fit: result,
    });
    return { ...base, svg, missing: null };
  } catch (err) {
    deps.log?.error({ err, region, forestType }, 'fit chart could not be rendered');
    return { ...base, svg: null, missing: `the chart could not be drawn (${(err as Error).message})` };
  }
}

async function optionalChart(deps: Deps, what: string, render: () => Promise<string | null>): Promise<string | null> {
  try {
    return await render();
  } catch (err) {
    deps.log?.error({ err, chart: what }, 'chart could not be rendered');
    return null;
  }
}

/** Assembles a region's snapshot payload from the database (no write). */
export async function assembleRegionSnapshot(deps: Deps, region: string, curves: CurveCache = new Map()): Promise<SnapshotPayload> {
  const { db, config } = deps;
  const [plots, areas, names, species] = await Promise.all([
    listRegionLatestPlots(db, region),
    listRegionForestAreas(db, region),
    listRegionStemNames(db, region),
    currentSpecies(db),
  ]);
  // Species counts use accepted names (synonyms and spelling variants count as their species), like richness.
  const accepted = new Map<string, string[]>();
  for (const { plotKey, name } of names) {
    const hit = species.index.resolve(name).species;
    if (!hit) continue;
    const list = accepted.get(plotKey);
    if (list) list.push(hit.name);
    else accepted.set(plotKey, [hit.name]);
  }
  const inputPlots: PlotMetrics[] = plots.map((p) => ({
    plotId: p.plotKey,
    forestType: p.forestType,
    values: p.metrics,
    speciesNames: accepted.get(p.plotKey) ?? [],
  }));
  const summary = summariseRegion({ region, plots: inputPlots, forestAreas: areas, options: { samplingErrorT: samplingErrorMultiplier(config), caution: cautionSettings(config) } });

  const fits: SnapshotFitRow[] = [];
  for (const scope of [{ kind: 'forest_type' }, { kind: 'region', region }] as const) {
    const rows = summary.forest_types.length
      ? await listCurveFits(db, { scope, metric: config.fitMetric, axis: config.fitAxis, forestTypes: summary.forest_types })
      : [];
    for (const r of rows) fits.push({ scope: r.scope, ...(toFitRow(r) as Omit<SnapshotFitRow, 'scope'>) });
  }
  const fitCharts: FitChart[] = [];
  for (const t of summary.forest_types) fitCharts.push(await fitChart(deps, region, t, curves));

  const dates = plots.map((p) => p.surveyDate).sort();
  return {
    format: SNAPSHOT_FORMAT,
    region,
    data: { plots: plots.length, first_survey: dates[0] ?? null, last_survey: dates.at(-1) ?? null, species_reference_version: species.versionId },
    method: methodOf(config),
    summary,
    fits,
    charts: {
      means: await optionalChart(deps, 'means', () => renderMeansChartSvg(summary.rows)),
      guilds: await optionalChart(deps, 'guilds', () => renderGuildChartSvg(summary.guild_composition)),
      fits: fitCharts,
    },
  };
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
export async function refreshStaleSummaries(deps: Deps & { runId?: string }): Promise<{ regions: RefreshedRegion[]; rejected: Array<{ region: string; reason: string }> }> {
  const { db } = deps;
  const curves: CurveCache = new Map();
  const regions: RefreshedRegion[] = [];
  const rejected: Array<{ region: string; reason: string }> = [];
  for (const mark of await listStaleMarks(db, 'summary')) {
    const region = mark.key;
    if (!(await regionExists(db, region))) {
      await clearStale(db, 'summary', [mark]);
      continue;
    }
    let payload: SnapshotPayload;
    try {
      payload = await assembleRegionSnapshot(deps, region, curves);
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
      const r = await insertSummarySnapshot(tx, region, etag, payload);
      await clearStale(tx, 'summary', [mark]);
      await clearProblems(tx, 'summary', [region]);
      return r;
    });
    regions.push({ region, ...stored });
  }
  return { regions, rejected };
}
