import {
  deleteVisits,
  appendAuditEntries,
  insertSpeciesVersion,
  insertVisits,
  latestSpeciesVersion,
  markStale,
  markVisitsStale,
  regionsOfPlots,
  upsertPlots,
  upsertRegions,
  upsertStrata,
  type Tx,
} from '@stemwise/db';
import type { SpeciesResult } from '../validate/species';
import type { PlotEntry } from '../validate/plots';
import type { StratumEntry } from '../validate/strata';

/** What the load writes before and after the stems, in the batch's one transaction. */
export interface LoadPlan {
  batchId: string;
  actor: string;
  /** Plots of the batch that are loadable. */
  plots: PlotEntry[];
  /** Stored visits to delete first (--replace), with what they were, for the audit log. */
  replaces: Array<{ visitId: number; plotKey: string; surveyDate: string; batchId: string; region: string }>;
  strata: StratumEntry[];
  species: SpeciesResult | null;
  speciesSource: string;
}

/** The file whose rows the database is taking in, to name it when the database refuses a value. */
export interface LoadingFile {
  file: string;
}

/** Before the stems: a new species version (if any), regions, replaced visits, plots and visits. Sets each plot's visitId. */
export async function loadPlotsAndVisits(
  tx: Tx,
  plan: LoadPlan,
  loading: LoadingFile = { file: '' },
): Promise<{ regionIds: Map<string, number>; movedFrom: string[]; newSpeciesVersion: number | null }> {
  let newSpeciesVersion: number | null = null;
  if (plan.species && plan.species.rows.length) {
    loading.file = 'species.csv';
    const latest = await latestSpeciesVersion(tx);
    if (latest?.contentHash !== plan.species.contentHash) {
      newSpeciesVersion = await insertSpeciesVersion(tx, plan.speciesSource, plan.species.contentHash, plan.species.rows);
      await markVisitsStale(tx, 'all');
    }
  }
  loading.file = 'plots.csv';
  const regionIds = await upsertRegions(tx, [...new Set([...plan.plots.map((p) => p.region), ...plan.strata.map((s) => s.region)])]);
  const keys = plan.plots.map((p) => p.key);
  const movedFrom = await regionsOfPlots(tx, keys);
  if (plan.replaces.length) {
    await deleteVisits(tx, plan.replaces.map((r) => r.visitId));
    await appendAuditEntries(tx, [{ actor: plan.actor, action: 'visit.replace', target: plan.batchId, details: { visits: plan.replaces } }]);
  }
  const plotIds = await upsertPlots(tx, {
    keys,
    regionIds: plan.plots.map((p) => regionIds.get(p.region)!),
    forestTypes: plan.plots.map((p) => p.forestType),
    latitudes: plan.plots.map((p) => p.latitude),
    longitudes: plan.plots.map((p) => p.longitude),
    elevations: plan.plots.map((p) => p.elevationM),
  });
  const ids = plan.plots.map((p) => plotIds.get(p.key)!);
  const visits = await insertVisits(tx, plan.batchId, {
    plotIds: ids,
    surveyDates: plan.plots.map((p) => p.surveyDate),
    areaHa: plan.plots.map((p) => p.areaHa),
    dbhMinCm: plan.plots.map((p) => p.dbhMinCm),
    subplotAreaHa: plan.plots.map((p) => p.subplotAreaHa),
    subplotDbhMinCm: plan.plots.map((p) => p.subplotDbhMinCm),
    loggingClass: plan.plots.map((p) => p.loggingClass),
    fireClass: plan.plots.map((p) => p.fireClass),
  });
  plan.plots.forEach((p, i) => (p.visitId = visits.get(ids[i])!));
  return { regionIds, movedFrom, newSpeciesVersion };
}

/** After the stems: strata, and everything the load made stale (visits' metrics, regions' summaries). */
export async function finishLoad(
  tx: Tx,
  plan: LoadPlan,
  regionIds: Map<string, number>,
  touched: { storedPlots: PlotEntry[]; movedFrom: string[] },
  loading: LoadingFile = { file: '' },
): Promise<void> {
  loading.file = 'strata.csv';
  await upsertStrata(tx, plan.batchId, {
    regionIds: plan.strata.map((s) => regionIds.get(s.region)!),
    forestTypes: plan.strata.map((s) => s.forestType),
    areasHa: plan.strata.map((s) => s.forestAreaHa),
  });
  await markVisitsStale(tx, [...plan.plots.map((p) => p.visitId), ...touched.storedPlots.map((p) => p.visitId)]);
  const regions = new Set<string>([
    ...plan.plots.map((p) => p.region),
    ...plan.strata.map((s) => s.region),
    ...touched.storedPlots.map((p) => p.region),
    ...touched.movedFrom,
    ...plan.replaces.map((r) => r.region),
  ]);
  await markStale(tx, 'summary', [...regions].sort());
}
