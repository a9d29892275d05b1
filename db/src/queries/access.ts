import type { Queryable } from '../connection';

// Access tokens (stored only as SHA-256 hashes) and the audit log.

export type TokenRole = 'admin' | 'uploader' | 'reader';

export interface AccessTokenRow {
  id: string;
  role: TokenRole;
  regions: string[];
  label: string | null;
  createdAt: Date;
  revokedAt: Date | null;
}

type RawToken = { id: string; role: TokenRole; regions: string[] | null; label: string | null; created_at: Date; revoked_at: Date | null };
const toToken = (r: RawToken): AccessTokenRow => ({
  id: r.id,
  role: r.role,
  regions: r.regions ?? [],
  label: r.label,
  createdAt: new Date(r.created_at),
  revokedAt: r.revoked_at === null ? null : new Date(r.revoked_at),
});

export async function insertAccessToken(
  db: Queryable,
  token: { id: string; tokenHash: string; role: TokenRole; regions: readonly string[]; label: string | null },
): Promise<void> {
  await db.query(`insert into access_tokens (id, token_hash, role, regions, label) values ($1, $2, $3, $4::text[], $5)`, [
    token.id,
    token.tokenHash,
    token.role,
    token.regions,
    token.label,
  ]);
}

/** The token with this hash, revoked or not; null when none has it. */
export async function findAccessTokenByHash(db: Queryable, tokenHash: string): Promise<AccessTokenRow | null> {
  const rows = await db.query<RawToken>(`select id, role, regions, label, created_at, revoked_at from access_tokens where token_hash = $1`, [tokenHash]);
  return rows.length ? toToken(rows[0]) : null;
}

/** The tokens with these hashes (for re-checking many remembered tokens in one query). */
export async function findAccessTokensByHashes(db: Queryable, tokenHashes: readonly string[]): Promise<Map<string, AccessTokenRow>> {
  if (!tokenHashes.length) return new Map();
  const rows = await db.query<RawToken & { token_hash: string }>(
    `select token_hash, id, role, regions, label, created_at, revoked_at from access_tokens where token_hash = any($1::text[])`,
    [tokenHashes],
  );
  return new Map(rows.map((r) => [r.token_hash, toToken(r)]));
}

export async function listAccessTokens(db: Queryable): Promise<AccessTokenRow[]> {
  return (await db.query<RawToken>(`select id, role, regions, label, created_at, revoked_at from access_tokens order by created_at, id`)).map(toToken);
}

/** Revokes a token; false when no unrevoked token has this id. */
export async function revokeAccessToken(db: Queryable, id: string): Promise<boolean> {
  const rows = await db.query(`update access_tokens set revoked_at = now() where id = $1 and revoked_at is null returning id`, [id]);
  return rows.length > 0;
}

export interface AuditEntry {
  at?: Date;
  actor: string;
  action: string;
  target: string | null;
  details?: Record<string, unknown>;
}

/** Appends entries in one statement (in the given order). */
export async function appendAuditEntries(db: Queryable, entries: readonly AuditEntry[]): Promise<void> {
  if (!entries.length) return;
  await db.query(
    `insert into audit_log (at, actor, action, target, details)
     select coalesce(t.at, now()), t.actor, t.action, t.target, t.details::jsonb
       from unnest($1::timestamptz[], $2::text[], $3::text[], $4::text[], $5::text[]) with ordinality as t(at, actor, action, target, details, i)
      order by t.i`,
    [
      entries.map((e) => e.at ?? null),
      entries.map((e) => e.actor),
      entries.map((e) => e.action),
      entries.map((e) => e.target),
      entries.map((e) => JSON.stringify(e.details ?? {})),
    ],
  );
}

export async function listAuditEntries(
  db: Queryable,
  filter: { actor?: string; action?: string; limit?: number } = {},
): Promise<Array<Required<AuditEntry> & { id: number }>> {
  const rows = await db.query<{ id: string; at: Date; actor: string; action: string; target: string | null; details: Record<string, unknown> }>(
    `select id, at, actor, action, target, details from audit_log
      where ($1::text is null or actor = $1) and ($2::text is null or action = $2)
      order by id desc limit $3`,
    [filter.actor ?? null, filter.action ?? null, filter.limit ?? 1000],
  );
  return rows.map((r) => ({ id: Number(r.id), at: new Date(r.at), actor: r.actor, action: r.action, target: r.target, details: r.details }));
}

/** Who submitted a batch (`batches.submitted_by`: a token id, or `cli`); null when no such batch. */
export async function batchSubmitter(db: Queryable, batchId: string): Promise<string | null> {
  const rows = await db.query<{ submitted_by: string }>(`select submitted_by from batches where id = $1::uuid`, [batchId]);
  return rows.length ? rows[0].submitted_by : null;
}
