import type { Queryable } from '../connection';
import type { accessTokens, auditLog } from '../schema/access';
import type { batches } from '../schema/batches';
import { int8Row, type Wire } from './rows';

// Access tokens (stored only as SHA-256 hashes) and the audit log.

export type TokenRole = 'admin' | 'uploader' | 'reader';

/** A token as stored (without its hash); `role` is one of the values its check constraint allows. */
export interface AccessTokenRow extends Pick<typeof accessTokens.$inferSelect, 'id' | 'regions' | 'label' | 'createdAt' | 'revokedAt'> {
  role: TokenRole;
}

const TOKEN_COLUMNS = `id, role, regions, label, created_at "createdAt", revoked_at "revokedAt"`;

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
  const rows = await db.query<AccessTokenRow>(`select ${TOKEN_COLUMNS} from access_tokens where token_hash = $1`, [tokenHash]);
  return rows[0] ?? null;
}

/** The tokens with these hashes (for re-checking many remembered tokens in one query). */
export async function findAccessTokensByHashes(db: Queryable, tokenHashes: readonly string[]): Promise<Map<string, AccessTokenRow>> {
  if (!tokenHashes.length) return new Map();
  const rows = await db.query<AccessTokenRow & { tokenHash: string }>(
    `select token_hash "tokenHash", ${TOKEN_COLUMNS} from access_tokens where token_hash = any($1::text[])`,
    [tokenHashes],
  );
  return new Map(rows.map(({ tokenHash, ...token }) => [tokenHash, token]));
}

export async function listAccessTokens(db: Queryable): Promise<AccessTokenRow[]> {
  return db.query<AccessTokenRow>(`select ${TOKEN_COLUMNS} from access_tokens order by created_at, id`);
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

/** An audit entry as stored. */
export interface AuditLogRow extends Omit<typeof auditLog.$inferSelect, 'details'> {
  details: Record<string, unknown>;
}
const auditLogRow = int8Row<AuditLogRow, 'id'>('id');

export async function listAuditEntries(db: Queryable, filter: { actor?: string; action?: string; limit?: number } = {}): Promise<AuditLogRow[]> {
  const rows = await db.query<Wire<AuditLogRow, 'id'>>(
    `select id, at, actor, action, target, details from audit_log
      where ($1::text is null or actor = $1) and ($2::text is null or action = $2)
      order by id desc limit $3`,
    [filter.actor ?? null, filter.action ?? null, filter.limit ?? 1000],
  );
  return rows.map(auditLogRow);
}

/** Who submitted a batch (`batches.submitted_by`: a token id, or `cli`); null when no such batch. */
export async function batchSubmitter(db: Queryable, batchId: string): Promise<string | null> {
  const rows = await db.query<Pick<typeof batches.$inferSelect, 'submittedBy'>>(`select submitted_by "submittedBy" from batches where id = $1::uuid`, [batchId]);
  return rows.length ? rows[0].submittedBy : null;
}
