import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { clearStale, listStale, markStale } from '@stemwise/db';
import { useServices, type TestServices } from '../support/services';

// A stage reads its inputs after `before`, then clears the marks no newer than `before`: a mark set
// again while it ran must survive for the next run.
describe('stale marks', () => {
  let s: TestServices;
  beforeAll(async () => void (s = await useServices()));
  afterAll(async () => s?.cleanup());

  it('keeps a mark that was set again after the stage started', async () => {
    await markStale(s.db, 'summary', ['North', 'South']);
    const [{ t: before }] = await s.db.query<{ t: Date }>(`select clock_timestamp() t`);
    await new Promise((r) => setTimeout(r, 5));
    await markStale(s.db, 'summary', ['North']); // new data for North arrived meanwhile
    await clearStale(s.db, 'summary', ['North', 'South'], before);
    expect(await listStale(s.db, 'summary')).toEqual(['North']);
  });
});
