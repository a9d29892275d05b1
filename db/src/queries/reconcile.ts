import type { Queryable } from '../connection';
import type { batches } from '../schema/batches';
import type { recomputeRuns } from '../schema/work';

/** Batches whose ingest is due: received or mid-validation (a worker may have died with them). */
export async function listUnfinishedBatches(db: Queryable): Promise<Array<Pick<typeof batches.$inferSelect, 'id' | 'state'>>> {
  return db.query(`select id, state from batches where state in ('received','validating') order by created_at`);
}

/** Batches loaded but whose recompute never finished (their visits may or may not still be stale). */
export async function listLoadedBatches(db: Queryable): Promise<string[]> {
  return (await db.query<Pick<typeof batches.$inferSelect, 'id'>>(`select id from batches where state = 'loaded' order by created_at`)).map((r) => r.id);
}

export async function markBatchFailed(db: Queryable, batchId: string, reason: string): Promise<void> {
  await db.query(`update batches set state = 'failed', failure_reason = $2, updated_at = now() where id = $1 and state in ('received','validating')`, [batchId, reason]);
}

export async function listRunningRecomputes(db: Queryable): Promise<string[]> {
  return (await db.query<Pick<typeof recomputeRuns.$inferSelect, 'id'>>(`select id from recompute_runs where state in ('queued','running') order by started_at`)).map((r) => r.id);
}

/** Is anything due: stale visits, or stale fits or summaries? */
export async function hasStaleWork(db: Queryable): Promise<boolean> {
  const [r] = await db.query<{ due: boolean }>(`select exists(select 1 from plot_visits where stale) or exists(select 1 from stale_work) as due`);
  return r.due;
}
