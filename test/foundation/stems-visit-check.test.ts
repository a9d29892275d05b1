import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { loadConfig } from '@stemwise/platform';
import { migrateDatabase, openDatabase, type Db } from '@stemwise/db';
import { useServices, type TestServices } from '../support/services';

// stems.visit_id → plot_visits.id is kept by statement-level triggers (migration 0002) instead of a
// declared foreign key. These are the guarantees a foreign key with ON DELETE CASCADE gives, checked
// on both engines, and on PostgreSQL also with two transactions racing.

const BATCH = '00000000-0000-4000-8000-000000000001';

/** One region, forest type, batch, plot and two visits; returns the visit ids. */
async function seed(db: Db): Promise<[number, number]> {
  await db.query(`insert into forest_types (code, climate) values ('wet', 'wet') on conflict do nothing`);
  await db.query(`insert into regions (name) values ('Testreach')`);
  await db.query(`insert into batches (id, content_hash, files) values ($1, 'h', '[]')`, [BATCH]);
  await db.query(`insert into plots (plot_key, region_id, forest_type, latitude, longitude) select 'P1', id, 'wet', 1, 2 from regions`);
  const rows = await db.query<{ id: string }>(
    `insert into plot_visits (plot_id, survey_date, batch_id, area_ha, logging_class, fire_class)
     select id, d::date, $1, 1, 0, 0 from plots, unnest(array['2020-01-01', '2024-01-01']) d returning id`,
    [BATCH],
  );
  return [Number(rows[0].id), Number(rows[1].id)];
}

const insertStem = (visitId: number, treeId: string): [string, unknown[]] => [
  `insert into stems (visit_id, tree_id, dbh_cm, status) values ($1, $2, 20, 'live')`,
  [visitId, treeId],
];

async function stemCount(db: Db): Promise<number> {
  return Number((await db.query<{ n: string }>('select count(*) n from stems'))[0].n);
}

function engineSuite(name: string, open: () => Promise<{ db: Db; close(): Promise<void> }>) {
  describe(`stems reference their visit (${name})`, () => {
    let db: Db;
    let close: () => Promise<void>;
    let v1: number;
    let v2: number;
    beforeAll(async () => {
      ({ db, close } = await open());
    });
    // Each test starts from the seed alone, whatever the others left.
    beforeEach(async () => {
      await db.query('truncate stems, plot_visits, plots, regions, batches cascade');
      [v1, v2] = await seed(db);
    });
    afterAll(async () => close?.());

    it('refuses stems of a visit that is not stored, naming the check, and loads nothing of the statement', async () => {
      await db.query(...insertStem(v1, 'a'));
      const err = await db
        .query(`insert into stems (visit_id, tree_id, dbh_cm, status) values ($1, 'b', 20, 'live'), ($2, 'c', 20, 'live')`, [v1, v2 + 1000])
        .then(() => null, (e: unknown) => e as { code?: string; message?: string });
      expect(err?.code).toBe('23503');
      expect(err?.message).toMatch(/stems_visit_check: visit \d+ is not stored/);
      expect(await stemCount(db)).toBe(1);
    });

    it('never changes a stem’s visit or a visit’s id', async () => {
      await db.query(...insertStem(v1, 'a'));
      await expect(db.query('update stems set visit_id = $1', [v2])).rejects.toThrow(/stems visit_id cannot change/);
      await expect(db.query('update plot_visits set id = id + 1000 where id = $1', [v1])).rejects.toThrow(/plot_visits id cannot change/);
      await db.query(`update stems set dbh_cm = 21 where visit_id = $1`, [v1]); // other columns may change
      expect(await db.query('select visit_id::int as visit_id, dbh_cm from stems')).toEqual([{ visit_id: v1, dbh_cm: 21 }]);
    });

    it('deletes the stems of deleted visits, directly or through a deleted plot', async () => {
      await db.query(...insertStem(v1, 'a'));
      await db.query(...insertStem(v2, 'a'));
      await db.query(...insertStem(v2, 'b'));
      await db.query('delete from plot_visits where id = $1', [v1]);
      expect(await db.query('select visit_id::int as visit_id, tree_id from stems order by tree_id')).toEqual([
        { visit_id: v2, tree_id: 'a' },
        { visit_id: v2, tree_id: 'b' },
      ]);
      await db.query(`delete from plots where plot_key = 'P1'`);
      expect(await stemCount(db)).toBe(0);
    });

    it('refuses to truncate visits while stems remain, and truncates both together', async () => {
      [v1, v2] = await seed2(db);
      await db.query(...insertStem(v1, 'x'));
      await expect(db.query('truncate plot_visits cascade')).rejects.toThrow(/would leave stems without their visits/);
      expect(await stemCount(db)).toBe(1);
      await db.query('truncate stems, plot_visits cascade');
      expect(await stemCount(db)).toBe(0);
    });
  });
}

/** A second plot with two visits, after the first was deleted. */
async function seed2(db: Db): Promise<[number, number]> {
  await db.query(`insert into plots (plot_key, region_id, forest_type, latitude, longitude) select 'P2', id, 'wet', 3, 4 from regions`);
  const rows = await db.query<{ id: string }>(
    `insert into plot_visits (plot_id, survey_date, batch_id, area_ha, logging_class, fire_class)
     select id, d::date, $1, 1, 0, 0 from plots, unnest(array['2020-01-01', '2024-01-01']) d where plot_key = 'P2' returning id`,
    [BATCH],
  );
  return [Number(rows[0].id), Number(rows[1].id)];
}

let services: TestServices;
engineSuite('PostgreSQL', async () => {
  services = await useServices();
  return { db: services.db, close: () => services.cleanup() };
});

engineSuite('PGlite', async () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-fkcheck-'));
  const db = await openDatabase(loadConfig({ STEMWISE_DATA_DIR: dir, STEMWISE_LOG_LEVEL: 'warn' }));
  await migrateDatabase(db);
  return {
    db,
    close: async () => {
      await db.close();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
});

describe('stems reference their visit: two transactions at once (PostgreSQL)', () => {
  let s: TestServices;
  let a: pg.Client;
  let b: pg.Client;
  let visit: number;
  beforeAll(async () => {
    s = await useServices();
    [visit] = await seed(s.db);
    a = new pg.Client({ connectionString: s.databaseUrl });
    b = new pg.Client({ connectionString: s.databaseUrl });
    await a.connect();
    await b.connect();
  });
  afterAll(async () => {
    await a?.end();
    await b?.end();
    await s?.cleanup();
  });

  it('a visit deleted while stems of it are being loaded waits for the load, then takes the stems with it', async () => {
    await a.query('begin');
    await a.query(...insertStem(visit, 'r1'));
    let deleted = false;
    const deleting = b.query('delete from plot_visits where id = $1', [visit]).then(() => (deleted = true));
    await new Promise((r) => setTimeout(r, 300));
    expect(deleted).toBe(false); // the load holds the visit (FOR KEY SHARE)
    await a.query('commit');
    await deleting;
    expect(await stemCount(s.db)).toBe(0);
  });

  it('stems loaded while their visit is being deleted fail once the delete commits', async () => {
    const [v] = await seed2(s.db);
    await b.query('begin');
    await b.query('delete from plot_visits where id = $1', [v]);
    const loading = a.query(...insertStem(v, 'r2')).then(() => null, (e: unknown) => e as { code?: string });
    await new Promise((r) => setTimeout(r, 300));
    await b.query('commit');
    expect((await loading)?.code).toBe('23503');
    expect(await stemCount(s.db)).toBe(0);
  });
});
