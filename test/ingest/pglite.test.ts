import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '@stemwise/platform';
import { migrateDatabase, openDatabase, syncForestTypes, type Db } from '@stemwise/db';
import type { ServiceDeps } from '@stemwise/core';
import { generateInventory } from '@stemwise/demo-inventory';
import { importSpeciesFile } from '@stemwise/ingest';
import { counts, depsFor, ingestDir, PLOTS, SPECIES, STRATA, tempDir, TREES, writeUpload } from './support';

// The embedded engine: stems go in by batched unnest inserts (COPY there would gather the whole
// batch in memory). One PGlite instance for the file: it takes seconds to start.
describe('ingest on PGlite', () => {
  let db: Db;
  let deps: ServiceDeps;
  const dataDir = tempDir('stemwise-pglite-');
  beforeAll(async () => {
    const config = { ...loadConfig({ STEMWISE_DATA_DIR: dataDir, STEMWISE_LOG_LEVEL: 'warn' }), storageDir: path.join(dataDir, 'uploads') };
    db = await openDatabase(config);
    await migrateDatabase(db);
    await syncForestTypes(db, config.forestTypes);
    deps = depsFor(config, db);
  });
  afterAll(async () => {
    await db?.close();
    fs.rmSync(dataDir, { recursive: true, force: true });
  });

  it('loads a small batch with its species list and strata', async () => {
    const { report } = await ingestDir(deps, writeUpload({ plots: PLOTS, trees: TREES, strata: STRATA, species: SPECIES }));
    expect(report.state).toBe('loaded');
    expect(report.counts).toMatchObject({ plotsLoaded: 3, stemsLoaded: 9, errors: 0 });
    expect(await counts(db)).toEqual({ regions: 2, plots: 3, plot_visits: 3, stems: 9, strata: 3, species_versions: 1 });
    expect(await db.query(`select dbh_cm, height_m, in_subplot from stems where tree_id = '4'`)).toEqual([{ dbh_cm: 7.5, height_m: null, in_subplot: true }]);
  });

  it('loads a demo batch of more stems than one insert statement takes, exactly once', async () => {
    const out = tempDir();
    const { truth } = await generateInventory({ outDir: out, plots: 70, seed: 21, gzip: true });
    fs.rmSync(path.join(out, 'truth.json'));
    expect(truth.counts.stems.rows).toBeGreaterThan(20_000);
    const before = await counts(db);
    const { report } = await ingestDir(deps, out);
    expect(report.state).toBe('loaded');
    expect((await counts(db)).stems - before.stems).toBe(truth.counts.stems.rows);
  });

  it('rejects a bad batch and changes nothing', async () => {
    const before = await counts(db);
    const { report } = await ingestDir(deps, writeUpload({ plots: PLOTS.replace('2023-05-14', '2023-05-40'), trees: TREES }));
    expect(report.state).toBe('rejected');
    expect(report.issues[0]).toMatchObject({ rule: 'field_bad_date' });
    expect(await counts(db)).toEqual(before);
  });

  it('imports a changed species list as a new version and marks every visit stale', async () => {
    await db.query(`update plot_visits set stale = false`);
    const file = path.join(writeUpload({ species: `${SPECIES}\nQuill aurea,Quillaceae,pioneer,0.33,` }), 'species.csv');
    const r = await importSpeciesFile(db, file);
    expect(r).toMatchObject({ created: true, species: 4, errors: 0 });
    const [{ n }] = await db.query<{ n: number }>(`select count(*)::int n from plot_visits where not stale`);
    expect(n).toBe(0);
    expect(r.staleVisits).toBe((await counts(db)).plot_visits);
    expect(await importSpeciesFile(db, file)).toMatchObject({ created: false, versionId: r.versionId });
  });
});
