import crypto from 'node:crypto';
import fs from 'node:fs';
import zlib from 'node:zlib';
import { parse } from 'csv-parse/sync';
import type { Db } from '@stemwise/db';
import { loadSpecies, type FixtureSpecies } from './fixtures';

// Loads a demo inventory folder (the batch format: plots, trees, species; .csv or .csv.gz) straight
// into the tables, without the ingest service: the CSV files are COPYed into temporary tables and
// moved into plots, visits and stems with SQL. For tests on PostgreSQL; assumes one visit per plot.

function readText(file: string): string {
  const path = fs.existsSync(file) ? file : `${file}.gz`;
  const raw = fs.readFileSync(path);
  return path.endsWith('.gz') ? zlib.gunzipSync(raw).toString('utf8') : raw.toString('utf8');
}

function* pieces(text: string, size = 1 << 20): Generator<string> {
  for (let i = 0; i < text.length; i += size) yield text.slice(i, i + size);
}

export async function loadDemoInventory(db: Db, dir: string): Promise<{ batchId: string }> {
  const species: FixtureSpecies[] = (parse(readText(`${dir}/species.csv`), { columns: true, bom: true }) as Array<Record<string, string>>).map((r) => ({
    name: r.name,
    family: r.family,
    guild: r.guild as FixtureSpecies['guild'],
    woodDensity: r.wood_density === '' ? null : Number(r.wood_density),
    synonyms: r.synonyms ? r.synonyms.split(';').map((x) => x.trim()).filter(Boolean) : [],
  }));
  await loadSpecies(db, species);
  const batchId = crypto.randomUUID();
  await db.transaction(async (tx) => {
    await tx.query(`insert into batches (id, state, content_hash, files) values ($1, 'loaded', $2, '{}'::jsonb)`, [batchId, batchId]);
    await tx.query(`create temp table demo_plots (plot_id text, region text, forest_type text, latitude float8, longitude float8, area_ha float8,
      dbh_min_cm float8, subplot_area_ha float8, subplot_dbh_min_cm float8, survey_date date, logging_class int, fire_class int, elevation_m float8) on commit drop`);
    await tx.query(`create temp table demo_trees (plot_id text, tree_id text, species text, dbh_cm float8, height_m float8, status text,
      stump_cause text, fire_damage int, in_subplot int) on commit drop`);
    await tx.copyFrom(`copy demo_plots from stdin (format csv, header true)`, pieces(readText(`${dir}/plots.csv`)));
    await tx.copyFrom(`copy demo_trees from stdin (format csv, header true)`, pieces(readText(`${dir}/trees.csv`)));
    await tx.query(`insert into regions (name) select distinct region from demo_plots on conflict (name) do nothing`);
    await tx.query(`insert into plots (plot_key, region_id, forest_type, latitude, longitude, elevation_m)
      select d.plot_id, r.id, d.forest_type, d.latitude, d.longitude, d.elevation_m from demo_plots d join regions r on r.name = d.region`);
    await tx.query(
      `insert into plot_visits (plot_id, survey_date, batch_id, area_ha, dbh_min_cm, subplot_area_ha, subplot_dbh_min_cm, logging_class, fire_class)
       select p.id, d.survey_date, $1, d.area_ha, coalesce(d.dbh_min_cm, 10), coalesce(d.subplot_area_ha, 0), coalesce(d.subplot_dbh_min_cm, 5), d.logging_class, d.fire_class
         from demo_plots d join plots p on p.plot_key = d.plot_id`,
      [batchId],
    );
    await tx.query(`insert into stems (visit_id, tree_id, species, dbh_cm, height_m, status, stump_cause, fire_damage, in_subplot)
      select v.id, t.tree_id, nullif(t.species, ''), t.dbh_cm, t.height_m, t.status, nullif(t.stump_cause, ''), coalesce(t.fire_damage, 0), coalesce(t.in_subplot, 0) = 1
        from demo_trees t join plots p on p.plot_key = t.plot_id join plot_visits v on v.plot_id = p.id`);
  });
  await db.query(`analyze`);
  return { batchId };
}
