import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { computePlotChunk } from '@stemwise/compute';
import { expectedUnresolved, fixtureSpecies, generateInventory, loadInventory, loadSpecies } from './fixtures';
import { plotsText, recomputeInProcess } from './support';
import { useServices, type TestServices } from '../support/services';

// The recompute pipeline on PostgreSQL: what it computes, that reruns change nothing, and what a new
// species reference version or a new batch makes it do.
describe('recompute pipeline', () => {
  let s: TestServices;
  const inventory = generateInventory({ seed: 5, plotsPerCell: 4, stemsPerPlot: 40 });
  const nVisits = inventory.reduce((a, p) => a + p.visits.length, 0);
  let firstCsv = '';

  const snapshot = async () => ({
    metrics: (await s.db.query<{ n: number }>(`select count(*)::int n from plot_metrics`))[0].n,
    unresolved: await s.db.query(`select batch_id, name, level, stems from batch_unresolved_names order by batch_id, name`),
    fits: await s.db.query(`select scope, forest_type, model, n, b0, b1, b2, verdict from curve_fits order by 1, 2, 3`),
  });

  beforeAll(async () => {
    s = await useServices({ STEMWISE_BOOTSTRAP: '100', STEMWISE_CHUNK_PLOTS: '7' });
    await loadSpecies(s.db, fixtureSpecies());
    await loadInventory(s.db, inventory);
  });
  afterAll(async () => s?.cleanup());

  /** The state after the first recompute: reached here when a test runs without the first one (vitest -t). */
  async function computed(): Promise<void> {
    if (firstCsv) return;
    const { failures } = await recomputeInProcess(s.config, s.db);
    expect(failures).toEqual([]);
    firstCsv = await plotsText(s.db);
  }

  it('computes every stale visit in chunks of STEMWISE_CHUNK_PLOTS and clears the marks', async () => {
    const { plan, failures } = await recomputeInProcess(s.config, s.db);
    expect(failures).toEqual([]);
    expect(plan!.visits).toBe(nVisits);
    expect(plan!.chunks).toBe(Math.ceil(nVisits / 7));
    expect((await snapshot()).metrics).toBe(nVisits);
    expect(await s.db.query(`select kind, key from stale_work`)).toEqual([]);
    const [run] = await s.db.query<{ state: string; details: { metrics: { visits: number; chunks: number; stems: number } } }>(`select state, details from recompute_runs`);
    expect(run.state).toBe('done');
    expect(run.details.metrics.visits).toBe(nVisits);
    expect(run.details.metrics.chunks).toBe(plan!.chunks);
    const stems = inventory.reduce((a, p) => a + p.visits.reduce((b, v) => b + v.stems.length, 0), 0);
    expect(run.details.metrics.stems).toBe(stems);
    const [batch] = await s.db.query<{ state: string }>(`select state from batches`);
    expect(batch.state).toBe('computed');
    firstCsv = await plotsText(s.db);
  });

  it('counts the unresolved names of the batch with their stems', async () => {
    await computed();
    const rows = await s.db.query<{ name: string; level: string; stems: number }>(`select name, level, stems from batch_unresolved_names`);
    const expected = expectedUnresolved(inventory);
    expect(Object.keys(expected).length).toBeGreaterThan(2);
    expect(Object.fromEntries(rows.map((r) => [r.name, r.stems]))).toEqual(expected);
    for (const r of rows) expect(r.level).toBe(r.name === 'Mystica obscura' ? 'unresolved' : 'genus');
  });

  it('says nothing is stale when nothing is, and runs nothing', async () => {
    await computed();
    const { plan } = await recomputeInProcess(s.config, s.db);
    expect(plan).toBeNull();
    expect((await s.db.query(`select id from recompute_runs`)).length).toBe(1);
  });

  it('gives the same rows, counts and fits when everything is recomputed again (idempotent)', async () => {
    await computed();
    const before = await snapshot();
    const { plan, failures } = await recomputeInProcess(s.config, s.db, true);
    expect(failures).toEqual([]);
    expect(plan!.visits).toBe(nVisits);
    expect(await snapshot()).toEqual(before);
    expect(await plotsText(s.db)).toBe(firstCsv);
  });

  it('overwrites the same rows when a chunk job runs twice', async () => {
    await computed();
    const ids = (await s.db.query<{ id: string }>(`select id from plot_visits order by id limit 5`)).map((r) => Number(r.id));
    const before = await snapshot();
    await computePlotChunk(s, 'no-such-run', ids, 'chunk.test.0');
    await computePlotChunk(s, 'no-such-run', ids, 'chunk.test.0');
    expect((await snapshot()).metrics).toBe(before.metrics);
    expect((await snapshot()).unresolved).toEqual(before.unresolved);
    expect(await plotsText(s.db)).toBe(firstCsv);
  });

  it('recomputes every plot after a new species reference version, with its guilds', async () => {
    await computed();
    // The new list moves the genus Velarina from the pioneer to the shade-tolerant guild.
    const list = fixtureSpecies().map((sp) => (sp.name.startsWith('Velarina ') ? { ...sp, guild: 'shade_tolerant' as const } : sp));
    const shares = async () =>
      new Map(
        (await s.db.query<{ visit_id: string; p: number | null; st: number | null; u: number | null; l: number | null }>(
          `select visit_id, pioneer_ba_share p, shade_tolerant_ba_share st, unassigned_ba_share u, light_demander_ba_share l from plot_metrics`,
        )).map((r) => [r.visit_id, r]),
      );
    const old = await shares();
    await loadSpecies(s.db, list, 'fixture v2');
    const { plan, failures } = await recomputeInProcess(s.config, s.db);
    expect(failures).toEqual([]);
    expect(plan!.outdatedSpecies).toBe(nVisits);
    expect(plan!.visits).toBe(nVisits);
    const now = await shares();
    let moved = 0;
    for (const [id, o] of old) {
      const n = now.get(id)!;
      if (o.p === null) continue;
      expect(n.p!).toBeLessThanOrEqual(o.p + 1e-12);
      expect(n.st! - o.st!).toBeCloseTo(o.p - n.p!, 12); // what left the pioneers went to the shade-tolerant
      expect(n.u).toBe(o.u);
      expect(n.p! + n.l! + n.st! + n.u!).toBeCloseTo(1, 12);
      if (n.p! < o.p - 1e-9) moved++;
    }
    expect(moved).toBeGreaterThan(nVisits / 2);
    const [{ v }] = await s.db.query<{ v: number }>(`select count(distinct species_version_id)::int v from plot_metrics`);
    expect(v).toBe(1);
  });

  it('computes a new batch; a height model that changes brings its whole forest type along', async () => {
    await computed();
    const more = generateInventory({ seed: 6, plotsPerCell: 1, stemsPerPlot: 40, prefix: 'Q', heightsShare: 1 });
    await loadInventory(s.db, more);
    const { plan, failures } = await recomputeInProcess(s.config, s.db);
    expect(failures).toEqual([]);
    const changed = plan!.heightModels.filter((h) => h.outcome === 'fitted').map((h) => h.forestType);
    expect(changed.length).toBeGreaterThan(0);
    const [{ n }] = await s.db.query<{ n: number }>(
      `select count(*)::int n from plot_visits v join plots p on p.id = v.plot_id where p.forest_type = any($1::text[]) or p.plot_key like 'Q%'`,
      [changed],
    );
    expect(plan!.visits).toBe(n);
    expect((await snapshot()).metrics).toBe(nVisits + more.reduce((a, p) => a + p.visits.length, 0));
    const [{ stale }] = await s.db.query<{ stale: number }>(`select count(*)::int stale from plot_visits where stale`);
    expect(stale).toBe(0);
  });

  it("a batch's run keeps the stored height models; a later run keeps a refit within the tolerance and releases one beyond it (docs/methods.md#height-model-releases)", async () => {
    await computed();
    const models = () => s.db.query(`select forest_type, coefficients, stats from height_models order by 1`);
    const before = await models();
    expect(before.length).toBeGreaterThan(0);
    const more = generateInventory({ seed: 8, plotsPerCell: 1, stemsPerPlot: 40, prefix: 'R', heightsShare: 1 });
    await loadInventory(s.db, more);
    const newVisits = more.reduce((a, p) => a + p.visits.length, 0);

    const batch = await recomputeInProcess(s.config, s.db, false, undefined, 'batch');
    expect(batch.failures).toEqual([]);
    expect(batch.plan!.heightModels).toEqual([]); // every type has a model: none is read or refitted
    expect(batch.plan!.visits).toBe(newVisits);
    expect(await models()).toEqual(before);

    // Any refit moves biomass by less than 100 %: every changed model is kept, nothing is recomputed.
    const kept = await recomputeInProcess({ ...s.config, heightModelTolerance: 1 }, s.db);
    expect(kept.plan).toBeNull();
    expect(await models()).toEqual(before);

    // No tolerance: the refits are released and every visit of their types computed again.
    const released = await recomputeInProcess({ ...s.config, heightModelTolerance: 0 }, s.db);
    expect(released.failures).toEqual([]);
    const changed = released.plan!.heightModels.filter((h) => h.outcome === 'fitted');
    expect(changed.length).toBeGreaterThan(0);
    for (const h of changed) expect(h.biomassShift!).toBeGreaterThan(0);
    const [{ n }] = await s.db.query<{ n: number }>(
      `select count(*)::int n from plot_visits v join plots p on p.id = v.plot_id where p.forest_type = any($1::text[])`,
      [changed.map((h) => h.forestType)],
    );
    expect(released.plan!.visits).toBe(n);
    expect(await models()).not.toEqual(before);
  });
});
