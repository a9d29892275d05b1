import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadMeasuredHeights, loadStemsForVisits } from '@stemwise/db';
import { loadInventory, type FixturePlot, type FixtureStem } from './fixtures';
import { useServices, type TestServices } from '../support/services';

// The packed read of stems (one text per visit) must give back every stem exactly as stored: full
// double precision, nulls, every status, and names with the separator characters in them.
describe('reading the stems of many visits at once', () => {
  let s: TestServices;
  const stem = (treeId: string, over: Partial<FixtureStem>): FixtureStem => ({
    treeId, species: 'Velarina alta', dbhCm: 12, heightM: null, status: 'live', stumpCause: null, fireDamage: 0, inSubplot: false, ...over,
  });
  const plain: FixtureStem[] = [
    stem('a', { dbhCm: 12.345678901234567, heightM: 17.000000000000004 }),
    stem('b', { species: null, dbhCm: 0.1 + 0.2, fireDamage: 3 }),
    stem('c', { status: 'dead', dbhCm: 499.99999999999994 }),
    stem('d', { status: 'stump', stumpCause: 'logged' }),
    stem('e', { status: 'stump', stumpCause: 'natural', species: 'name, with "quotes"\u001fand a unit separator' }),
    stem('f', { status: 'stump', stumpCause: 'unknown', inSubplot: true, dbhCm: 5.5 }),
  ];
  const odd: FixtureStem[] = [stem('x', { species: 'record\u001eseparator' }), stem('y', { species: null, heightM: 2.5 })];
  const plots: FixturePlot[] = [
    { plotKey: 'S1', region: 'Harrowmere', forestType: 'wet', latitude: -3, longitude: 21, visits: [{ surveyDate: '2020-01-01', areaHa: 0.1, dbhMinCm: 10, subplotAreaHa: 0.02, subplotDbhMinCm: 5, loggingClass: 0, fireClass: 0, stems: plain }] },
    { plotKey: 'S2', region: 'Harrowmere', forestType: 'wet', latitude: -3, longitude: 21, visits: [{ surveyDate: '2020-01-01', areaHa: 0.1, dbhMinCm: 10, subplotAreaHa: 0, subplotDbhMinCm: 5, loggingClass: 0, fireClass: 0, stems: odd }] },
  ];
  let visitIds: number[] = [];

  beforeAll(async () => {
    s = await useServices();
    ({ visitIds } = await loadInventory(s.db, plots));
  });
  afterAll(async () => s?.cleanup());

  const strip = (list: readonly FixtureStem[]) => list.map(({ treeId: _t, ...rest }) => rest);
  const sortKey = (x: { dbhCm: number; species: string | null; status: string }) => `${x.dbhCm}|${x.status}|${x.species}`;

  it('gives back every stem exactly, packed or (for a name with U+001E) row by row', async () => {
    const got = await s.db.transaction((tx) => loadStemsForVisits(tx, visitIds));
    expect(got.size).toBe(2);
    for (const [i, list] of [plain, odd].entries()) {
      const read = got.get(visitIds[i])!.map(({ visitId, ...rest }) => (expect(visitId).toBe(visitIds[i]), rest));
      expect([...read].sort((a, b) => (sortKey(a) < sortKey(b) ? -1 : 1))).toEqual(strip(list).sort((a, b) => (sortKey(a) < sortKey(b) ? -1 : 1)));
    }
  });

  it('orders a visit’s stems by content, the same whatever order they were read in', async () => {
    const list = (await s.db.transaction((tx) => loadStemsForVisits(tx, [visitIds[0]]))).get(visitIds[0])!;
    expect(list.map((x) => x.dbhCm)).toEqual([...list.map((x) => x.dbhCm)].sort((a, b) => a - b));
  });

  it('reads measured heights of live stems exactly, ordered by dbh', async () => {
    const h = await s.db.transaction((tx) => loadMeasuredHeights(tx, ['wet', 'dry']));
    expect(h.get('wet')).toEqual({ dbhCm: [12, 12.345678901234567], heightM: [2.5, 17.000000000000004] });
    expect(h.get('dry')).toEqual({ dbhCm: [], heightM: [] });
  });
});
