import { describe, expect, it } from 'vitest';
import { matchesEtag, wantsCsv } from './regions';
import { regionSlug } from '../static-pages';

describe('conditional requests', () => {
  it('match an entity tag in If-None-Match lists, weak or strong, and *', () => {
    expect(matchesEtag('"abc"', '"abc"')).toBe(true);
    expect(matchesEtag('W/"abc"', '"abc"')).toBe(true);
    expect(matchesEtag('"x", "abc"', '"abc"')).toBe(true);
    expect(matchesEtag('*', '"abc"')).toBe(true);
    expect(matchesEtag('"abcd"', '"abc"')).toBe(false);
    expect(matchesEtag(undefined, '"abc"')).toBe(false);
  });
});

describe('content negotiation', () => {
  it('takes ?format first, then an Accept that asks for CSV and not JSON', () => {
    expect(wantsCsv('csv', 'application/json')).toBe(true);
    expect(wantsCsv('json', 'text/csv')).toBe(false);
    expect(wantsCsv(undefined, 'text/csv')).toBe(true);
    expect(wantsCsv(undefined, 'text/csv, application/json')).toBe(false);
    expect(wantsCsv(undefined, '*/*')).toBe(false);
    expect(wantsCsv(undefined, undefined)).toBe(false);
  });
});

describe('region file names', () => {
  it('are lower-case ASCII, with a hash when more than the case had to change', () => {
    expect(regionSlug('northvale')).toBe('northvale');
    expect(regionSlug('Northvale')).toBe('northvale'); // two names differing only in case: the writer adds a hash
    expect(regionSlug('Ñuble Sur')).toMatch(/^nuble-sur-[0-9a-f]{6}$/);
    expect(regionSlug('../../etc')).toMatch(/^etc-[0-9a-f]{6}$/);
    expect(regionSlug('中部')).toMatch(/^region-[0-9a-f]{6}$/);
  });
});
