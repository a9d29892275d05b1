import type { Db } from '@stemwise/db';
import { createMaintenanceProcessors, planRecompute, type ServiceDeps } from '@stemwise/core';
import { BullQueue } from '@stemwise/platform/bullmq';
import { InProcessQueue, type Config, type JobQueue, type ProcessorMap } from '@stemwise/platform';
import { createProcessors as computeProcessors } from '@stemwise/compute';
import { createProcessors as reportProcessors } from '@stemwise/report';
import { fixtureSpecies, generateInventory, loadInventory, loadSpecies, type FixturePlot } from '../compute/fixtures';
import { testLogger, useServices } from '../support/services';
import { resultsDigest, type ResultsDigest } from './checksum';

// The pieces the fault tests share: one small invented inventory, the settings every run uses (the
// fits' bootstrap and seed decide the results, the chunk size must not), and the undisturbed run.

/** Settings of every run in the fault tests; a test adds its own chunk size, port, log level. */
export const FAULT_ENV = { STEMWISE_BOOTSTRAP: '50', STEMWISE_JOB_ATTEMPTS: '6' } as const;

/** Plots of the invented inventory: 9 cells (3 forest types × 3 regions) of `perCell` plots, a fifth of them visited twice. */
export function faultInventory(perCell: number, options: { seed?: number; prefix?: string } = {}): FixturePlot[] {
  return generateInventory({ seed: options.seed ?? 11, prefix: options.prefix ?? 'P', plotsPerCell: perCell, stemsPerPlot: 25 });
}

export const visitCount = (plots: readonly FixturePlot[]) => plots.reduce((a, p) => a + p.visits.length, 0);

/** Species reference and plots straight into the tables (a loaded batch whose visits are stale). */
export async function seedInventory(db: Db, plots: readonly FixturePlot[]): Promise<void> {
  await loadSpecies(db, fixtureSpecies());
  await loadInventory(db, plots);
}

/** Every processor of the compute and report services plus the maintenance jobs, as `serve all` composes them. */
export function allProcessors(deps: ServiceDeps): ProcessorMap {
  return { ...computeProcessors(deps), ...createMaintenanceProcessors(deps), ...reportProcessors(deps) };
}

/** Runs a recompute of what is stale to the end in this process (no Redis), returning the failures. */
export async function recomputeHere(config: Config, db: Db): Promise<ReadonlyArray<{ jobId: string; error: string }>> {
  const log = testLogger();
  const queue: JobQueue = new InProcessQueue(log);
  const deps: ServiceDeps = { config, db, log, queue };
  await queue.work(allProcessors(deps), { queues: ['compute', 'report', 'maintenance'] });
  const plan = await planRecompute(deps, 'manual');
  if (!plan) throw new Error('recomputeHere: nothing was stale');
  const failures = await queue.drain();
  await queue.close();
  return failures;
}

/** The undisturbed run: the same inventory in a database of its own, computed in one go; its digest. */
export async function undisturbedDigest(plots: readonly FixturePlot[], env: Record<string, string> = {}): Promise<ResultsDigest> {
  const s = await useServices({ ...FAULT_ENV, ...env });
  try {
    await seedInventory(s.db, plots);
    const failures = await recomputeHere(s.config, s.db);
    if (failures.length) throw new Error(`undisturbed run failed: ${JSON.stringify(failures)}`);
    return await resultsDigest(s.db);
  } finally {
    await s.cleanup();
  }
}

/** A BullMQ queue handle of the test's own on the given Redis and prefix (to add jobs and read states). */
export function openBull(redisUrl: string, prefix: string, attempts = 6): Promise<BullQueue> {
  return BullQueue.open({ url: redisUrl, prefix, attempts, log: testLogger() });
}

/** The latest recompute run of this database. */
export async function latestRun(db: Db): Promise<{ id: string; state: string; trigger: string; chunksDone: number; chunksPlanned: number | null; details: Record<string, unknown> } | null> {
  const rows = await db.query<{ id: string; state: string; trigger: string; details: Record<string, unknown> }>(
    `select id, state, trigger, details from recompute_runs order by started_at desc, id desc limit 1`,
  );
  if (!rows.length) return null;
  const r = rows[0];
  const chunks = (r.details.chunks ?? {}) as Record<string, unknown>;
  const plan = r.details.plan as { chunks?: number } | undefined;
  return { ...r, chunksDone: Object.keys(chunks).length, chunksPlanned: plan?.chunks ?? null };
}
