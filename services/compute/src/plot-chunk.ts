import {
  listHeightModels,
  loadStemsForVisits,
  lockPlotsForChange,
  lockVisitsForCompute,
  markStale,
  markVisitsComputed,
  recordChunkInRun,
  applyUnresolvedNameCounts,
  clearProblems,
  recordProblems,
  upsertPlotMetrics,
  type ComputeStemRow,
  type PlotMetricsWrite,
  type UnresolvedNameCount,
} from '@stemwise/db';
import { currentSpecies, heightModelFromRow, type HeightDiameterModel, type ServiceDeps } from '@stemwise/core';
import type { Logger } from '@stemwise/platform';
import { computeVisits, type ChunkTask } from './chunk-metrics';
import { metricsPool } from './metrics-pool';
import { writePlotChanges } from './plot-change';

export interface ChunkCounts {
  visits: number;
  stems: number;
  /** Requested visits that no longer exist (deleted since the chunk was planned). */
  missing: number;
  /** Visits whose metrics could not be computed (recorded in compute_problems; the others are written). */
  failed: number;
  /** Pairs of consecutive visits written for the chunk's plots (docs/methods.md#change-between-visits). */
  changePairs: number;
  /** Plots whose change could not be computed (recorded in compute_problems). */
  changeFailed: number;
  /** When the chunk started (epoch ms) and how long it took: the run's stage times come from these. */
  start: number;
  ms: number;
}

/**
 * Metrics of a chunk of plot visits, in ONE transaction: lock the visits, read them and their stems
 * (two set-based queries), compute every visit, upsert every metrics row in one statement, clear the
 * visits' stale marks, mark the fits of their forest types and the summaries of their regions stale,
 * bring the unresolved-name counts of their batches up to date, and rewrite the change between visits
 * of their plots (every pair of consecutive visits of each plot, so a new visit makes its plot's change
 * due with it). Idempotent: a rerun writes the same rows and counts.
 */
export async function computePlotChunk(deps: Pick<ServiceDeps, 'db' | 'config'> & { log?: Logger }, runId: string, visitIds: readonly number[], jobId: string): Promise<ChunkCounts> {
  const start = Date.now();
  const started = performance.now();
  const { db, config, log } = deps;
  const species = await currentSpecies(db);
  return db.transaction(async (tx) => {
    // The plots' change locks before the visits' row locks (see lockPlotsForChange).
    const plotIds = await lockPlotsForChange(tx, visitIds);
    const visits = await lockVisitsForCompute(tx, visitIds);
    const stemsOf = visits.length ? await loadStemsForVisits(tx, visits.map((v) => v.visitId)) : new Map<number, ComputeStemRow[]>();
    const forestTypes = [...new Set(visits.map((v) => v.forestType))].sort();
    // Read after the visits are locked, so a concurrent refit (which marks these visits stale) is either seen or waits.
    const models = new Map<string, HeightDiameterModel>((await listHeightModels(tx, forestTypes)).map((m) => [m.forestType, heightModelFromRow(m)]));

    const stems = visits.map((v) => stemsOf.get(v.visitId) ?? []);
    // The CPU-bound part, in the worker threads when there are any (see metrics-pool.ts); the same code either way.
    const task: ChunkTask = { visits, stems, species: species.index, models: [...models], defaultWoodDensity: config.defaultWoodDensity, speciesVersionId: species.versionId, rootShoot: config.rootShoot, standingDeadShare: config.standingDeadShare, reportingDbhMinCm: config.reportingDbhMinCm, stumpToDbh: config.stumpToDbh };
    const outcomes = config.computeThreads > 0 ? await metricsPool(config.computeThreads).compute(task) : computeVisits(task);

    const writes: PlotMetricsWrite[] = [];
    const unresolved: UnresolvedNameCount[] = [];
    const failed: Parameters<typeof recordProblems>[2][number][] = [];
    const nStems = stems.reduce((a, s) => a + s.length, 0);
    outcomes.forEach((outcome, i) => {
      const visit = visits[i];
      if ('reason' in outcome) {
        // One plot that cannot be computed does not hold back the others: its reason is recorded, its
        // stale mark cleared (no run retries it until its data change), its earlier metrics left as they were.
        const { reason } = outcome;
        log?.error({ runId, plotKey: visit.plotKey, visitId: visit.visitId, forestType: visit.forestType, reason }, 'plot metrics could not be computed; the other plots go on');
        failed.push({ stage: 'plot', forestType: visit.forestType, region: visit.region, visitId: visit.visitId, plotKey: visit.plotKey, reason });
        return;
      }
      for (const u of outcome.write.diagnostics.unresolvedNames) unresolved.push({ batchId: visit.batchId, name: u.name, level: u.level, stems: u.stems });
      writes.push(outcome.write);
    });

    const ids = visits.map((v) => v.visitId);
    const computed = writes.map((w) => w.visitId);
    await applyUnresolvedNameCounts(tx, computed, unresolved); // before the upsert: it reads the old diagnostics
    await upsertPlotMetrics(tx, writes);
    await clearProblems(tx, 'plot', computed.map(String));
    await recordProblems(tx, runId, failed);
    await markVisitsComputed(tx, ids);
    const change = await writePlotChanges(tx, plotIds, { index: species.index, models, defaultWoodDensity: config.defaultWoodDensity, speciesVersionId: species.versionId, rootShoot: config.rootShoot, standingDeadShare: config.standingDeadShare, runId, log });
    await markStale(tx, 'fits', forestTypes);
    await markStale(tx, 'summary', [...new Set(visits.map((v) => v.region))].sort());
    const counts: ChunkCounts = {
      visits: visits.length,
      stems: nStems,
      missing: visitIds.length - visits.length,
      failed: failed.length,
      changePairs: change.pairs,
      changeFailed: change.failed,
      start,
      ms: Math.round(performance.now() - started),
    };
    await recordChunkInRun(tx, runId, jobId, { ...counts });
    return counts;
  });
}
