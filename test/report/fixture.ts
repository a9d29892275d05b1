import crypto from 'node:crypto';
import { PLOT_METRIC_DB_COLUMNS, type Db, type PlotMetricDbColumn, type Queryable } from '@stemwise/db';
import { InProcessQueue, type JobContext, type Logger } from '@stemwise/platform';
import { currentSpecies } from '@stemwise/core';
import { speciesStems } from '@stemwise/compute';

// Plots, metrics, strata and species inserted directly with SQL (no ingest, no compute), in an
// invented scenario: the country of Tessaly, its regions and made-up tree species.

/** A one-plot upload (plots.csv) and the header of its trees.csv, for the tests that upload over HTTP. */
export const UPLOAD_PLOTS = 'plot_id,region,forest_type,latitude,longitude,area_ha,survey_date,logging_class,fire_class\nTS-1,Northvale,wet,-12.1,34.2,0.5,2026-03-01,0,0\n';
export const UPLOAD_TREES_HEADER = 'plot_id,tree_id,species,dbh_cm,status\n';

export interface FixturePlot {
  key: string;
  region: string;
  forestType: string;
  metrics: Partial<Record<PlotMetricDbColumn, number | null>>;
  /** Recorded names of live main-plot stems (one stem each). */
  species?: string[];
  date?: string;
  latitude?: number;
  longitude?: number;
}

export const FIXTURE_SPECIES = [
  { name: 'Arborea lucida', family: 'Lucidaceae', guild: 'shade_tolerant', synonyms: ['Arborea splendens'] },
  { name: 'Velox primus', family: 'Veloxaceae', guild: 'pioneer', synonyms: [] },
  { name: 'Lumenia alta', family: 'Lucidaceae', guild: 'light_demander', synonyms: [] },
  { name: 'Quercella tessalica', family: 'Veloxaceae', guild: 'shade_tolerant', synonyms: [] },
] as const;

export async function seedSpecies(db: Queryable): Promise<number> {
  const [{ id }] = await db.query<{ id: number }>(`insert into species_versions (source, content_hash, n_species) values ('fixture', $1, $2) returning id`, [
    crypto.randomBytes(8).toString('hex'),
    FIXTURE_SPECIES.length,
  ]);
  for (const s of FIXTURE_SPECIES) {
    const [{ id: sid }] = await db.query<{ id: number }>(
      `insert into species (version_id, name, genus, family, guild, wood_density) values ($1, $2, $3, $4, $5, 0.6) returning id`,
      [id, s.name, s.name.split(' ')[0], s.family, s.guild],
    );
    for (const syn of s.synonyms) await db.query(`insert into species_synonyms (version_id, synonym, species_id) values ($1, $2, $3)`, [id, syn, sid]);
  }
  return Number(id);
}

/** A batch row the fixture's visits belong to; `submittedBy` is a token id or `cli`. */
export async function seedBatch(db: Queryable, submittedBy = 'cli', state = 'computed'): Promise<string> {
  const id = crypto.randomUUID();
  await db.query(`insert into batches (id, state, content_hash, files, submitted_by) values ($1, $2, $3, '{}'::jsonb, $4)`, [id, state, crypto.randomBytes(16).toString('hex'), submittedBy]);
  return id;
}

export async function ensureRegion(db: Queryable, name: string): Promise<number> {
  await db.query(`insert into regions (name) values ($1) on conflict (name) do nothing`, [name]);
  const [{ id }] = await db.query<{ id: number }>(`select id from regions where name = $1`, [name]);
  return Number(id);
}

/** Inserts plots with one computed visit each (metrics as given, the rest null). */
export async function seedPlots(db: Db, plots: readonly FixturePlot[], batchId?: string): Promise<void> {
  const batch = batchId ?? (await seedBatch(db));
  // The accepted species the metrics stage would store with each visit's metrics (plot_metrics.species_stems).
  const index = plots.some((p) => p.species?.length) ? (await currentSpecies(db)).index : null;
  await db.transaction(async (tx) => {
    for (const [i, p] of plots.entries()) {
      const regionId = await ensureRegion(tx, p.region);
      const [{ id: plotId }] = await tx.query<{ id: number }>(
        `insert into plots (plot_key, region_id, forest_type, latitude, longitude) values ($1, $2, $3, $4, $5)
         on conflict (plot_key) do update set forest_type = excluded.forest_type returning id`,
        [p.key, regionId, p.forestType, p.latitude ?? -12 + i * 0.01, p.longitude ?? 34 + i * 0.01],
      );
      const [{ id: visitId }] = await tx.query<{ id: number }>(
        `insert into plot_visits (plot_id, survey_date, batch_id, area_ha, logging_class, fire_class, stale) values ($1, $2, $3, 0.1, 0, 0, false) returning id`,
        [plotId, p.date ?? '2026-03-01', batch],
      );
      const cols = PLOT_METRIC_DB_COLUMNS.map(([c]) => c);
      // Seeded plots measured every stem from the reporting threshold: their reporting_* figures are the
      // all-stems ones unless given (docs/methods.md#reporting-threshold).
      const valueOf = (c: PlotMetricDbColumn): number | null => {
        const given = p.metrics[c];
        if (given !== undefined) return given;
        const restated = c.startsWith('reporting_') ? (c.slice('reporting_'.length) as PlotMetricDbColumn) : null;
        return restated !== null && cols.includes(restated) ? (p.metrics[restated] ?? null) : null;
      };
      await tx.query(
        `insert into plot_metrics (visit_id, species_stems, ${cols.join(', ')}) values ($1, $2::jsonb, ${cols.map((_, k) => `$${k + 3}`).join(', ')})`,
        [visitId, JSON.stringify(index ? speciesStems((p.species ?? []).map((species) => ({ species, status: 'live', inSubplot: false })), index) : {}), ...cols.map(valueOf)],
      );
      for (const [k, name] of (p.species ?? []).entries()) {
        await tx.query(`insert into stems (visit_id, tree_id, species, dbh_cm, status) values ($1, $2, $3, 20, 'live')`, [visitId, `t${k}`, name]);
      }
    }
  });
}

export async function seedForestArea(db: Queryable, region: string, forestType: string, ha: number): Promise<void> {
  const regionId = await ensureRegion(db, region);
  await db.query(`insert into strata (region_id, forest_type, forest_area_ha) values ($1, $2, $3) on conflict on constraint strata_pk do update set forest_area_ha = excluded.forest_area_ha`, [regionId, forestType, ha]);
}

/** A recompute run row in state running (as the recompute planner leaves it). */
export async function seedRun(db: Queryable): Promise<string> {
  const id = `t${Date.now()}-${crypto.randomBytes(3).toString('hex')}`;
  await db.query(`insert into recompute_runs (id, trigger, state) values ($1, 'manual', 'running')`, [id]);
  return id;
}

export function jobContext(log: Logger, jobId = 'report.summaries.test'): JobContext {
  return { jobId, name: 'report.summaries', attempt: 1, maxAttempts: 1, log, queue: new InProcessQueue(log), progress: async () => {} };
}
