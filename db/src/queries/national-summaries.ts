import type { Queryable } from '../connection';
import type { SummarySnapshot } from './summaries';

// The national summary's versions (all regions together): stored by the report job after the region
// summaries, never updated, served latest or by version.

/** Stores the national summary as its next version unless the latest has the same etag; as insertSummarySnapshot. */
export async function insertNationalSnapshot(db: Queryable, etag: string, payload: unknown): Promise<{ version: number; created: boolean }> {
  const rows = await db.query<{ version: number; created: boolean }>(
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
  return { version: Number(rows[0].version), created: rows[0].created };
}

/** The national summary: the latest, or the given version; null when there is none. */
export async function getNationalSnapshot(db: Queryable, version?: number): Promise<Omit<SummarySnapshot, 'region'> | null> {
  const rows = await db.query<{ version: number; etag: string; payload: unknown; created_at: Date }>(
    `select version, etag, payload, created_at from national_summaries
      where $1::int is null or version = $1 order by version desc limit 1`,
    [version ?? null],
  );
  if (!rows.length) return null;
  const r = rows[0];
  return { version: Number(r.version), etag: r.etag, payload: r.payload, createdAt: new Date(r.created_at) };
}

/** Every version of the national summary, newest first (without payloads). */
export async function listNationalVersions(db: Queryable): Promise<Array<{ version: number; etag: string; createdAt: Date }>> {
  const rows = await db.query<{ version: number; etag: string; created_at: Date }>(`select version, etag, created_at from national_summaries order by version desc`);
  return rows.map((r) => ({ version: Number(r.version), etag: r.etag, createdAt: new Date(r.created_at) }));
}
