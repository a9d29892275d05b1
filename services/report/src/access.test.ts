import { describe, expect, it } from 'vitest';
import { canReadBatch, canSeeRegion, canSubmitBatches, hashToken, looksLikeToken, newToken, readsRegions, type Principal } from './access';

const admin: Principal = { tokenId: 'a', role: 'admin', regions: [] };
const uploader: Principal = { tokenId: 'u', role: 'uploader', regions: [] };
const reader: Principal = { tokenId: 'r', role: 'reader', regions: ['Northvale'] };

describe('tokens', () => {
  it('are swt_ + 32 random bytes in base64url, and only their SHA-256 hex is kept', () => {
    const a = newToken();
    const b = newToken();
    expect(a.token).toMatch(/^swt_[A-Za-z0-9_-]{43}$/);
    expect(a.token).not.toBe(b.token);
    expect(a.hash).toBe(hashToken(a.token));
    // SHA-256 of "abc" (FIPS 180-2 appendix B.1 test vector)
    expect(hashToken('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(looksLikeToken(a.token)).toBe(true);
    expect(looksLikeToken('swt_short')).toBe(false);
    expect(looksLikeToken(`Bearer ${a.token}`)).toBe(false);
  });
});

describe('roles', () => {
  it('let admins see every region, readers their named ones, uploaders none', () => {
    expect(canSeeRegion(admin, 'Southmere')).toBe(true);
    expect(canSeeRegion(reader, 'Northvale')).toBe(true);
    expect(canSeeRegion(reader, 'Southmere')).toBe(false);
    expect(canSeeRegion(reader, 'northvale')).toBe(false); // names are exact
    expect(canSeeRegion(uploader, 'Northvale')).toBe(false);
    expect([admin, uploader, reader].map(readsRegions)).toEqual([true, false, true]);
  });

  it('let admins and uploaders submit; uploaders read only their own batches', () => {
    expect([admin, uploader, reader].map(canSubmitBatches)).toEqual([true, true, false]);
    expect(canReadBatch(uploader, 'u')).toBe(true);
    expect(canReadBatch(uploader, 'cli')).toBe(false);
    expect(canReadBatch(admin, 'cli')).toBe(true);
    expect(canReadBatch(reader, 'r')).toBe(false);
  });
});
