import crypto from 'node:crypto';
import { findAccessTokenByHash, findAccessTokensByHashes, type Queryable, type TokenRole } from '@stemwise/db';

// Who may do what (documented in the README's access section):
//  - admin:    everything: every region, every batch, submitting batches.
//  - uploader: submits batches (POST /v1/batches) and reads the batches IT submitted (state, row
//              errors); no region data: a field team that uploads gets a reader token too if it
//              should read summaries.
//  - reader:   the regions named on the token only: their summaries, plots, pages and region-scope
//              fits, plus the forest-type-wide fits (scope `all`, national science that names no
//              region). Another region answers 403 and never appears in a list. The national
//              figures (all regions together) answer 403 and are not listed: they mix regions
//              the reader may not read.
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

/**
 * The national figures mix every region, so only a token that may read every region sees them: an
 * admin. Readers are always limited to named regions (a reader token needs --region) and never do.
 */
export function canSeeNational(p: Principal): boolean {
  return p.role === 'admin';
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

/** How long a token check is trusted while the database does not answer. */
const STALE_IF_ERROR_MS = 60_000;

export type Verification = { ok: true; principal: Principal } | { ok: false; reason: 'unknown' | 'revoked' | 'malformed'; tokenId?: string };

type Row = Awaited<ReturnType<typeof findAccessTokenByHash>>;
type CacheEntry = { hash: string; at: number; result: Verification };

function verdict(row: Row): Verification {
  if (!row) return { ok: false, reason: 'unknown' };
  if (row.revokedAt) return { ok: false, reason: 'revoked', tokenId: row.id };
  return { ok: true, principal: { tokenId: row.id, role: row.role, regions: row.role === 'reader' ? row.regions : [] } };
}

/**
 * Verifies tokens against the database and remembers each answer; a remembered answer is used while
 * it is younger than `ttlMs` (default 1 s). With `start()`, a background timer re-checks every
 * remembered token in one query every ttlMs/2, so requests do not wait on the database and a
 * revocation still takes effect within about a second.
 */
export class TokenVerifier {
  private readonly cache = new Map<string, CacheEntry>();
  private timer: NodeJS.Timeout | null = null;
  private refreshing: Promise<void> | null = null;

  constructor(
    private readonly db: Queryable,
    private readonly ttlMs = 1000,
    private readonly maxEntries = 10_000,
  ) {}

  /** Starts the background re-check (no-op when answers are not remembered). */
  start(): this {
    if (this.ttlMs > 0 && !this.timer) {
      this.timer = setInterval(() => void this.refresh().catch(() => {}), Math.max(50, this.ttlMs / 2));
      this.timer.unref();
    }
    return this;
  }

  stop(): void {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
  }

  /** Re-checks every remembered token in one query (entries stay as they were if the database fails). */
  refresh(): Promise<void> {
    this.refreshing ??= (async () => {
      const entries = [...this.cache.entries()];
      if (!entries.length) return;
      const at = Date.now();
      const rows = await findAccessTokensByHashes(this.db, entries.map(([, e]) => e.hash));
      // Updated in place (no change of recency); an entry evicted meanwhile stays out.
      for (const [token, e] of entries) if (this.cache.has(token)) this.cache.set(token, { hash: e.hash, at, result: verdict(rows.get(e.hash) ?? null) });
    })().finally(() => (this.refreshing = null));
    return this.refreshing;
  }

  // A Map keeps insertion order: re-inserting on each use keeps the least recently used first, so
  // dropping the first key on overflow is an LRU (a flood of unknown tokens evicts only cold entries).
  private touch(token: string, entry: CacheEntry): void {
    this.cache.delete(token);
    this.cache.set(token, entry);
  }

  private remember(token: string, entry: CacheEntry): void {
    this.cache.delete(token);
    while (this.cache.size >= this.maxEntries) this.cache.delete(this.cache.keys().next().value as string);
    this.cache.set(token, entry);
  }

  /** Tokens remembered, least recently used first (for tests and diagnostics). */
  cachedTokens(): string[] {
    return [...this.cache.keys()];
  }

  // Keyed by the token as presented (it is in memory for the request anyway): a hit costs no hashing.
  async verify(token: string): Promise<Verification> {
    if (!looksLikeToken(token)) return { ok: false, reason: 'malformed' };
    const now = Date.now();
    const hit = this.cache.get(token);
    if (hit) this.touch(token, hit);
    if (hit && now - hit.at < this.ttlMs) return hit.result;
    const hash = hit?.hash ?? hashToken(token);
    let row: Row;
    try {
      row = await findAccessTokenByHash(this.db, hash);
    } catch (err) {
      // The database does not answer (restarting?): a recent answer stands for a while, else fail.
      if (hit && now - hit.at < STALE_IF_ERROR_MS) return hit.result;
      throw err;
    }
    const result = verdict(row);
    if (this.ttlMs > 0) this.remember(token, { hash, at: now, result });
    return result;
  }
}
