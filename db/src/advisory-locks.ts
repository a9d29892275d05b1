// Every PostgreSQL advisory-lock key stemwise takes, in one module, so that no two locks share a key by
// accident. Small fixed keys for the process-wide locks; batch keys are 48 bits of the batch's uuid
// above 2^40, clear of the small ones. (PGlite has one connection: its withLock just runs the function.)

/** Schema migrations: concurrent `migrate` calls on one server wait for each other. */
export const MIGRATE_LOCK = 742_001;

/** One `report.summaries` job at a time across all report workers (they write snapshot versions). */
export const SUMMARIES_LOCK = 742_010;

/** The recompute planner, its follow-up and the reconciler's look at runs: two planners take turns. */
export const PLAN_LOCK = 742_020;

/** An advisory lock key of a batch: 48 bits of its uuid, above the small keys other locks use. */
export function batchLockKey(batchId: string): number {
  return 2 ** 40 + parseInt(batchId.replace(/-/g, '').slice(0, 12), 16);
}

/**
 * The change lock of a plot (transaction-scoped): 2^39 + its id, between the small keys and the batch
 * keys, so two plot chunks that share a plot write its pairs of visits one after the other.
 */
export function plotChangeLockKey(plotId: number): number {
  return 2 ** 39 + plotId;
}
