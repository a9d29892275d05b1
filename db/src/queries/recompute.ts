import crypto from 'node:crypto';
import type { Db, Queryable } from '../connection';
import type { staleWork } from '../schema/work';
import { listRunProblems, problemView, type ProblemView } from './problems';
import { int8, type Int8Wire } from './rows';

// Stale state lives in PostgreSQL: plot_visits.stale for metrics, stale_work for the fits of a forest
// type and the summary of a region. Each stage clears its marks and marks the next, in one transaction
// with its results, so a crash between stages leaves the work visibly due (the reconciler re-queues it).

export type StaleKind = 'fits' | 'summary';

/** Marks visits' metrics as due (at load, or for a new species reference version). */
export async function markVisitsStale(db: Queryable, visitIds: readonly number[] | 'all'): Promise<number> {
  const rows =
    visitIds === 'all'
      ? await db.query<{ n: number }>(`with u as (update plot_visits set stale = true returning 1) select count(*)::int n from u`)
      : await db.query<{ n: number }>(`with u as (update plot_visits set stale = true where id = any($1::bigint[]) returning 1) select count(*)::int n from u`, [visitIds]);
  return rows[0].n;
}

/** Stale visit ids in a stable order (plot, date), for chunking into jobs. */
export async function listStaleVisits(db: Queryable): Promise<number[]> {
  const rows = await db.query<{ id: Int8Wire }>(`select id from plot_visits where stale order by id`);
  return rows.map((r) => int8(r.id));
}

/** Marks fits or summaries as due (`since` records when, for people; clearing goes by version). */
export async function markStale(db: Queryable, kind: StaleKind, keys: readonly string[]): Promise<void> {
  if (!keys.length) return;
  await db.query(
    `insert into stale_work (kind, key, since) select $1, k, clock_timestamp() from unnest($2::text[]) k
     on conflict (kind, key) do update set since = greatest(stale_work.since, excluded.since)`,
    [kind, keys],
  );
}

export async function listStale(db: Queryable, kind: StaleKind): Promise<string[]> {
  return (await db.query<Pick<typeof staleWork.$inferSelect, 'key'>>(`select key from stale_work where kind = $1 order by key`, [kind])).map((r) => r.key);
}

/** A mark as a stage saw it before its work: `version` is the row's xmin, new every time the mark is set again. */
export interface StaleMark extends Pick<typeof staleWork.$inferSelect, 'key'> {
  version: string;
}

/** The marks of a kind (of the given keys only, if given) with their versions; read them before reading the inputs. */
export async function listStaleMarks(db: Queryable, kind: StaleKind, keys?: readonly string[]): Promise<StaleMark[]> {
  return keys
    ? db.query<StaleMark>(`select key, xmin::text as version from stale_work where kind = $1 and key = any($2::text[]) order by key`, [kind, keys])
    : db.query<StaleMark>(`select key, xmin::text as version from stale_work where kind = $1 order by key`, [kind]);
}

/**
 * Clears the marks a stage read (listStaleMarks) and has now done, unless set again since: by version,
 * not by time, so a mark set by a transaction that was still open when the stage read its inputs (and
 * so is not in them) survives too — the delete waits for that transaction and then sees a new version.
 */
export async function clearStale(db: Queryable, kind: StaleKind, marks: readonly StaleMark[]): Promise<void> {
  if (!marks.length) return;
  await db.query(
    `delete from stale_work w using unnest($2::text[], $3::text[]) m(key, version)
      where w.kind = $1 and w.key = m.key and w.xmin::text = m.version`,
    [kind, marks.map((m) => m.key), marks.map((m) => m.version)],
  );
}

export interface RecomputeRun {
  id: string;
  trigger: string;
  visits: number;
}

/** Records a recompute run covering what is stale now; null when nothing is stale (nothing runs). */
export async function startRecomputeRun(db: Db, trigger: 'nightly' | 'manual' | 'batch' | 'reconcile', all = false): Promise<RecomputeRun | null> {
  return db.transaction(async (tx) => {
    if (all) await markVisitsStale(tx, 'all');
    const [{ visits, other }] = await tx.query<{ visits: number; other: number }>(
      `select (select count(*)::int from plot_visits where stale) visits, (select count(*)::int from stale_work) other`,
    );
    if (visits === 0 && other === 0) return null;
    const id = `${new Date().toISOString().replace(/[-:.TZ]/g, '').slice(0, 14)}-${crypto.randomBytes(4).toString('hex')}`;
    await tx.query(`insert into recompute_runs (id, trigger, state, visits) values ($1, $2, 'running', $3)`, [id, trigger, visits]);
    return { id, trigger, visits };
  });
}

/**
 * Ends a run: marks it done (with the number of problems it recorded in its details; it returns them),
 * and as computed every loaded batch with nothing of it left to do — no
 * stale visit, and no stale fits of its forest types or summaries of its regions.
 */
export async function finishRecomputeRun(db: Db, runId: string): Promise<ProblemView[]> {
  return db.transaction(async (tx) => {
    const problems = (await listRunProblems(tx, runId)).map(problemView);
    await tx.query(`update recompute_runs set state = 'done', finished_at = now(), details = details || jsonb_build_object('problems', $2::int) where id = $1`, [runId, problems.length]);
    await tx.query(
      `update batches b set state = 'computed', updated_at = now()
        where b.state = 'loaded'
          and not exists (select 1 from plot_visits v where v.batch_id = b.id and v.stale)
          and not exists (
            select 1 from plot_visits v
              join plots p on p.id = v.plot_id
              join regions r on r.id = p.region_id
              join stale_work w on (w.kind = 'fits' and w.key = p.forest_type) or (w.kind = 'summary' and w.key = r.name)
             where v.batch_id = b.id)`,
    );
    return problems;
  });
}

export async function failRecomputeRun(db: Queryable, runId: string, reason: string): Promise<void> {
  await db.query(`update recompute_runs set state = 'failed', finished_at = now(), details = details || jsonb_build_object('reason', $2::text) where id = $1`, [runId, reason]);
}
