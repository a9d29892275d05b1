import crypto from 'node:crypto';
import { findAccessTokenByHash, type Queryable, type TokenRole } from '@stemwise/db';

// Who may do what (documented in the README's access section):
//  - admin:    everything: every region, every batch, submitting batches.
//  - uploader: submits batches (POST /v1/batches) and reads the batches IT submitted (state, row
//              errors); no region data: a field team that uploads gets a reader token too if it
//              should read summaries.
//  - reader:   the regions named on the token only: their summaries, plots, pages and region-scope
//              fits, plus the forest-type-wide fits (scope `all`, national science that names no
//              region). Another region answers 403 and never appears in a list.
// A token is `swt_` + 32 random bytes (base64url); only its SHA-256 hash is stored.

export const TOKEN_ROLES = ['admin', 'uploader', 'reader'] as const satisfies readonly TokenRole[];
export const TOKEN_PREFIX = 'swt_';
const TOKEN_PATTERN = /^swt_[A-Za-z0-9_-]{43}$/;

export interface Principal {
  tokenId: string;
  role: TokenRole;
  /** Regions a reader may see (empty for other roles). */
  regions: readonly string[];
}

/** A new random token (shown once) and the hash that is stored. */
export function newToken(): { token: string; hash: string } {
  const token = TOKEN_PREFIX + crypto.randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}

export function hashToken(token: string): string {
  return crypto.createHash('sha256').update(token, 'utf8').digest('hex');
}

/** Shape check before any lookup: a malformed credential is rejected without touching the database. */
export function looksLikeToken(token: string): boolean {
  return TOKEN_PATTERN.test(token);
}

export function canSeeRegion(p: Principal, region: string): boolean {
  return p.role === 'admin' || (p.role === 'reader' && p.regions.includes(region));
}

/** Region data (summaries, plots, pages, fits) is for admins and readers. */
export function readsRegions(p: Principal): boolean {
  return p.role === 'admin' || p.role === 'reader';
}

export function canSubmitBatches(p: Principal): boolean {
  return p.role === 'admin' || p.role === 'uploader';
}

/** Admins read every batch; uploaders the ones they submitted. */
export function canReadBatch(p: Principal, submittedBy: string): boolean {
  return p.role === 'admin' || (p.role === 'uploader' && submittedBy === p.tokenId);
}

export type Verification = { ok: true; principal: Principal } | { ok: false; reason: 'unknown' | 'revoked' | 'malformed'; tokenId?: string };

/**
 * Verifies tokens against the database, remembering each answer for `ttlMs` (default 1 s) so a busy
 * endpoint does not query per request; a revocation therefore takes effect within that time.
 */
export class TokenVerifier {
  private readonly cache = new Map<string, { at: number; result: Verification }>();

  constructor(
    private readonly db: Queryable,
    private readonly ttlMs = 1000,
    private readonly maxEntries = 10_000,
  ) {}

  async verify(token: string): Promise<Verification> {
    if (!looksLikeToken(token)) return { ok: false, reason: 'malformed' };
    const hash = hashToken(token);
    const now = Date.now();
    const hit = this.cache.get(hash);
    if (hit && now - hit.at < this.ttlMs) return hit.result;
    const row = await findAccessTokenByHash(this.db, hash);
    const result: Verification = !row
      ? { ok: false, reason: 'unknown' }
      : row.revokedAt
        ? { ok: false, reason: 'revoked', tokenId: row.id }
        : { ok: true, principal: { tokenId: row.id, role: row.role, regions: row.role === 'reader' ? row.regions : [] } };
    if (this.ttlMs > 0) {
      if (this.cache.size >= this.maxEntries) this.cache.clear();
      this.cache.set(hash, { at: now, result });
    }
    return result;
  }
}
