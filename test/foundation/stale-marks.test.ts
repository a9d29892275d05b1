import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { clearStale, listStale, listStaleMarks, markStale } from '@stemwise/db';
import { useServices, type TestServices } from '../support/services';

// A stage reads the marks (with their versions) before its inputs, and clears only marks still at
// the version it read: a mark set again while it ran — even by a transaction that was still open
// when the stage read its inputs — must survive for the next run.
describe('stale marks', () => {
  let s: TestServices;
  beforeAll(async () => void (s = await useServices()));
  afterAll(async () => s?.cleanup());

  it('clears what the stage read, and keeps a mark that was set again after the stage started', async () => {
    await markStale(s.db, 'summary', ['North', 'South']);
    const marks = await listStaleMarks(s.db, 'summary');
    expect(marks.map((m) => m.key)).toEqual(['North', 'South']);
    await markStale(s.db, 'summary', ['North']); // new data for North arrived meanwhile
    await clearStale(s.db, 'summary', marks);
    expect(await listStale(s.db, 'summary')).toEqual(['North']);
  });

  it('keeps a mark set by a transaction that began before the stage read and committed after', async () => {
    await markStale(s.db, 'fits', ['wet']);
    let commit!: () => void;
    let marked!: () => void;
    const markedP = new Promise<void>((r) => (marked = r));
    const loader = s.db.transaction(async (tx) => {
      await markStale(tx, 'fits', ['wet']); // the loader's data is not committed yet
      marked();
      await new Promise<void>((r) => (commit = r));
    });
    await markedP;
    const marks = await listStaleMarks(s.db, 'fits'); // the stage reads: it sees the old mark
    expect(marks.map((m) => m.key)).toEqual(['wet']);
    let cleared = false;
    const clearing = clearStale(s.db, 'fits', marks).then(() => (cleared = true)); // waits for the loader's row lock
    await new Promise((r) => setTimeout(r, 200));
    expect(cleared).toBe(false);
    commit();
    await loader;
    await clearing;
    expect(await listStale(s.db, 'fits')).toEqual(['wet']); // the loader's data still needs a fit
    await clearStale(s.db, 'fits', await listStaleMarks(s.db, 'fits'));
    expect(await listStale(s.db, 'fits')).toEqual([]);
  });
});
