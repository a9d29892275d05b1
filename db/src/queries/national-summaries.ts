import type { Queryable } from '../connection';
import type { nationalSummaries } from '../schema/reports';

type National = typeof nationalSummaries.$inferSelect;
/** A version of the national summary. */
export type NationalSnapshot = Pick<National, 'version' | 'etag' | 'payload' | 'createdAt'>;

// The national summary's versions (all regions together): stored by the report job after the region
// summaries, never updated, served latest or by version.

/** Stores the national summary as its next version unless the latest has the same etag; as insertSummarySnapshot. */
export async function insertNationalSnapshot(db: Queryable, etag: string, payload: unknown): Promise<{ version: number; created: boolean }> {
  const rows = await db.query<Pick<National, 'version'> & { created: boolean }>(
    `with last as (select version, etag from national_summaries order by version desc limit 1),
          ins as (
            insert into national_summaries (version, etag, payload)
            select coalesce((select version from last), 0) + 1, $1, $2::jsonb
             where not exists (select 1 from last where last.etag = $1)
            returning version)
     select version, true created from ins
     union all
     select version, false from last where etag = $1`,
    [etag, JSON.stringify(payload)],
  );
  return rows[0];
}

/** The national summary: the latest, or the given version; null when there is none. */
export async function getNationalSnapshot(db: Queryable, version?: number): Promise<NationalSnapshot | null> {
  const rows = await db.query<NationalSnapshot>(
    `select version, etag, payload, created_at "createdAt" from national_summaries
      where $1::int is null or version = $1 order by version desc limit 1`,
    [version ?? null],
  );
  return rows[0] ?? null;
}

/** Every version of the national summary, newest first (without payloads). */
export async function listNationalVersions(db: Queryable): Promise<Array<Omit<NationalSnapshot, 'payload'>>> {
  return db.query(`select version, etag, created_at "createdAt" from national_summaries order by version desc`);
}
