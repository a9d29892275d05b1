import {
  PLOT_METRIC_DB_COLUMNS,
  listHeightModels,
  loadStemsForVisits,
  lockVisitsForCompute,
  markStale,
  markVisitsComputed,
  recordChunkInRun,
  applyUnresolvedNameCounts,
  clearProblems,
  recordProblems,
  upsertPlotMetrics,
  type ComputeStemRow,
  type ComputeVisitRow,
  type PlotMetricsWrite,
  type UnresolvedNameCount,
} from '@stemwise/db';
import { computePlotMetrics, currentSpecies, heightModelFromRow, PLOT_METRIC_COLUMNS, type HeightDiameterModel, type PlotDiagnostics, type PlotMetrics, type ServiceDeps } from '@stemwise/core';
import { isInfrastructureError, PermanentError, type Logger } from '@stemwise/platform';

// The science's column list and the stored one must be the same columns in the same order.
const METRIC_KEYS: ReadonlyArray<keyof PlotMetrics> = PLOT_METRIC_COLUMNS.map((c, i) => {
  if (PLOT_METRIC_DB_COLUMNS[i]?.[0] !== c.column) throw new Error(`plot-chunk: metric column ${i} is ${c.column} in the science but ${PLOT_METRIC_DB_COLUMNS[i]?.[0]} in the database`);
  return c.key;
});
if (PLOT_METRIC_DB_COLUMNS.length !== METRIC_KEYS.length) throw new Error('plot-chunk: the science and the database list different metric columns');

export interface ChunkCounts {
  visits: number;
  stems: number;
  /** Requested visits that no longer exist (deleted since the chunk was planned). */
  missing: number;
  /** Visits whose metrics could not be computed (recorded in compute_problems; the others are written). */
  failed: number;
  /** When the chunk started (epoch ms) and how long it took: the run's stage times come from these. */
  start: number;
  ms: number;
}

/**
 * Metrics of a chunk of plot visits, in ONE transaction: lock the visits, read them and their stems
 * (two set-based queries), compute every visit, upsert every metrics row in one statement, clear the
 * visits' stale marks, mark the fits of their forest types and the summaries of their regions stale,
 * and bring the unresolved-name counts of their batches up to date. Idempotent: a rerun writes the
 * same rows and counts.
 */
export async function computePlotChunk(deps: Pick<ServiceDeps, 'db' | 'config'> & { log?: Logger }, runId: string, visitIds: readonly number[], jobId: string): Promise<ChunkCounts> {
  const start = Date.now();
  const started = performance.now();
  const { db, config, log } = deps;
  const species = await currentSpecies(db);
  return db.transaction(async (tx) => {
    const visits = await lockVisitsForCompute(tx, visitIds);
    const stemsOf = visits.length ? await loadStemsForVisits(tx, visits.map((v) => v.visitId)) : new Map<number, ComputeStemRow[]>();
    const forestTypes = [...new Set(visits.map((v) => v.forestType))].sort();
    // Read after the visits are locked, so a concurrent refit (which marks these visits stale) is either seen or waits.
    const models = new Map<string, HeightDiameterModel>((await listHeightModels(tx, forestTypes)).map((m) => [m.forestType, heightModelFromRow(m)]));

    const writes: PlotMetricsWrite[] = [];
    const unresolved: UnresolvedNameCount[] = [];
    const failed: Parameters<typeof recordProblems>[2][number][] = [];
    let nStems = 0;
    for (const visit of visits) {
      const stems = stemsOf.get(visit.visitId) ?? [];
      nStems += stems.length;
      let write;
      try {
        write = computeVisit(visit, stems, species.index, models.get(visit.forestType) ?? null, config.defaultWoodDensity, species.versionId);
      } catch (err) {
        if (isInfrastructureError(err)) throw err;
        // One plot that cannot be computed does not hold back the others: its reason is recorded, its
        // stale mark cleared (no run retries it until its data change), its earlier metrics left as they were.
        const reason = (err as Error).message;
        log?.error({ runId, plotKey: visit.plotKey, visitId: visit.visitId, forestType: visit.forestType, reason }, 'plot metrics could not be computed; the other plots go on');
        failed.push({ stage: 'plot', forestType: visit.forestType, region: visit.region, visitId: visit.visitId, plotKey: visit.plotKey, reason });
        continue;
      }
      for (const u of write.diagnostics.unresolvedNames) unresolved.push({ batchId: visit.batchId, name: u.name, level: u.level, stems: u.stems });
      writes.push(write);
    }

    const ids = visits.map((v) => v.visitId);
    const computed = writes.map((w) => w.visitId);
    await applyUnresolvedNameCounts(tx, computed, unresolved); // before the upsert: it reads the old diagnostics
    await upsertPlotMetrics(tx, writes);
    await clearProblems(tx, 'plot', computed.map(String));
    await recordProblems(tx, runId, failed);
    await markVisitsComputed(tx, ids);
    await markStale(tx, 'fits', forestTypes);
    await markStale(tx, 'summary', [...new Set(visits.map((v) => v.region))].sort());
    const counts: ChunkCounts = { visits: visits.length, stems: nStems, missing: visitIds.length - visits.length, failed: failed.length, start, ms: Math.round(performance.now() - started) };
    await recordChunkInRun(tx, runId, jobId, { ...counts });
    return counts;
  });
}

function computeVisit(
  visit: ComputeVisitRow,
  stems: readonly ComputeStemRow[],
  index: Parameters<typeof computePlotMetrics>[2],
  heightModel: HeightDiameterModel | null,
  defaultWoodDensity: number,
  speciesVersionId: number | null,
): PlotMetricsWrite & { diagnostics: PlotDiagnostics & { heightModelHeights: number | null } } {
  let result;
  try {
    result = computePlotMetrics(
      {
        areaHa: visit.areaHa,
        dbhMinCm: visit.dbhMinCm,
        subplotAreaHa: visit.subplotAreaHa,
        subplotDbhMinCm: visit.subplotDbhMinCm,
        loggingClass: visit.loggingClass,
        fireClass: visit.fireClass,
        climate: visit.climate,
      },
      stems,
      index,
      { heightModel, defaultWoodDensity },
    );
  } catch (err) {
    if (err instanceof RangeError) {
      throw new PermanentError('plot_invalid', `plot ${visit.plotKey} (visit ${visit.visitId}): ${err.message}`, { cause: err });
    }
    throw err;
  }
  const m = result.metrics as unknown as Record<string, number | null>;
  return {
    visitId: visit.visitId,
    speciesVersionId,
    values: METRIC_KEYS.map((k) => m[k]),
    diagnostics: { ...result.diagnostics, heightModelHeights: heightModel?.n ?? null },
  };
}
