import { currentSpeciesVersion, forestTypesWithPlots, forestTypesWithStaleVisits, getRecomputeRun, listStaleVisits, markOutdatedSpeciesVisitsStale, markVisitsStale, mergeRunDetails, PLAN_LOCK, recordRunStage, startRecomputeRun } from '@stemwise/db';
import type { ServiceDeps } from '../deps';
import type { JobSpec } from '@stemwise/platform';
import { refitHeightModels, type HeightModelChange } from './height-models';
import { liveRecompute } from './live-run';

export type RecomputeTrigger = 'nightly' | 'manual' | 'batch' | 'reconcile';

export interface RecomputePlan {
  runId: string;
  trigger: RecomputeTrigger;
  /** Stale visits the run covers. */
  visits: number;
  chunks: number;
  /** Visits marked stale because they were computed against an older species reference. */
  outdatedSpecies: number;
  heightModels: HeightModelChange[];
  /** Id of the flow's root job (`report.summaries`): the run is over when it is. */
  rootJobId: string;
}

/** The flow of a run: summaries ← fits ← plots ← plot chunks (children complete before their parent). */
export function recomputeFlow(runId: string, visitIds: readonly number[], chunkPlots: number): JobSpec {
  const chunks: JobSpec[] = [];
  for (let i = 0, c = 0; i < visitIds.length; i += chunkPlots, c++) {
    chunks.push({ name: 'compute.plot-chunk', data: { runId, visitIds: visitIds.slice(i, i + chunkPlots) }, jobId: `chunk.${runId}.${c}` });
  }
  return {
    name: 'report.summaries',
    data: { runId },
    jobId: `summaries.${runId}`,
    children: [
      {
        name: 'compute.fits',
        data: { runId },
        jobId: `fits.${runId}`,
        children: [{ name: 'compute.plots', data: { runId }, jobId: `plots.${runId}`, ...(chunks.length ? { children: chunks } : {}) }],
      },
    ],
  };
}

/**
 * Plans a recompute (the `maintenance.recompute` job, `stemwise recompute`, the nightly schedule):
 * marks stale what an older species reference computed, fits or refits the height–diameter models
 * (see height-models.ts for which and when), records a run, and queues its flow with
 * deterministic job ids. Returns null when nothing is stale (nothing is queued).
 */
export async function planRecompute(deps: ServiceDeps, trigger: RecomputeTrigger, all = false): Promise<RecomputePlan | null> {
  const { db, config, log, queue } = deps;
  return db.withLock(PLAN_LOCK, async () => {
    const start = Date.now();
    // One run at a time: while one runs, what is stale now is left to the run that follows it (queued
    // when it ends, see maintenance/follow-up.ts), so no two runs compute the same visits at once.
    const running = await liveRecompute(deps);
    if (running) {
      if (all) await markVisitsStale(db, 'all');
      await mergeRunDetails(db, running, { deferred: trigger });
      log.info({ trigger, runningRunId: running }, 'a recompute is running; what is stale now is computed by the run that follows it');
      return null;
    }
    const outdatedSpecies = await markOutdatedSpeciesVisitsStale(db, await currentSpeciesVersion(db));
    // A batch's run fits only the models its stale types lack; the others check every type's model (see height-models.ts).
    const batch = trigger === 'batch' && !all;
    const types = batch ? await forestTypesWithStaleVisits(db) : await forestTypesWithPlots(db);
    const heightModels = await refitHeightModels(db, types, { minHeights: config.minHeights, tolerance: config.heightModelTolerance, release: all, newOnly: batch });
    const run = await startRecomputeRun(db, trigger, all);
    if (!run) {
      log.info({ trigger }, 'nothing stale');
      return null;
    }
    const visitIds = await listStaleVisits(db);
    const flow = recomputeFlow(run.id, visitIds, config.chunkPlots);
    const chunks = flow.children![0].children![0].children?.length ?? 0;
    await mergeRunDetails(db, run.id, { plan: { visits: visitIds.length, chunks, outdatedSpecies, heightModels, all } });
    await recordRunStage(db, run.id, 'plan', { start, ms: Date.now() - start, visits: visitIds.length, chunks, heightModels: heightModels.length });
    await queue.add(flow);
    log.info({ runId: run.id, trigger, visits: visitIds.length, chunks }, 'recompute queued');
    return { runId: run.id, trigger, visits: visitIds.length, chunks, outdatedSpecies, heightModels, rootJobId: flow.jobId };
  });
}

export interface PlotsStage {
  chunks: number;
  chunksPlanned: number | null;
  visits: number;
  stems: number;
  missing: number;
  /** Sum of the chunks' own times (they may have run in parallel). */
  chunkMs: number;
  /** From the first chunk's start to the end of this stage (wall clock). */
  ms: number;
}

/** The `compute.plots` stage (the flow parent, after every chunk): totals of the chunks in the run's details. */
export async function finishPlotsStage(deps: Pick<ServiceDeps, 'db'>, runId: string): Promise<PlotsStage | null> {
  const run = await getRecomputeRun(deps.db, runId);
  if (!run) return null;
  const chunks = Object.values((run.details.chunks ?? {}) as Record<string, { visits: number; stems: number; missing: number; ms: number; start?: number }>);
  const end = Date.now();
  const start = Math.min(end, ...chunks.map((c) => c.start ?? end));
  const plan = run.details.plan as { chunks?: number } | undefined;
  const stage: PlotsStage = {
    chunks: chunks.length,
    chunksPlanned: plan?.chunks ?? null,
    visits: chunks.reduce((a, c) => a + c.visits, 0),
    stems: chunks.reduce((a, c) => a + c.stems, 0),
    missing: chunks.reduce((a, c) => a + c.missing, 0),
    chunkMs: chunks.reduce((a, c) => a + c.ms, 0),
    ms: end - start,
  };
  await mergeRunDetails(deps.db, runId, { metrics: stage });
  const { chunksPlanned: _, ...counts } = stage;
  await recordRunStage(deps.db, runId, 'metrics', { start, ...counts });
  return stage;
}
