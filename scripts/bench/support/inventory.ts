// An invented inventory loaded straight into the tables (plots and visits by unnest, stems by COPY; no
// ingest), for the benchmarks of the stages after it: plots of ~125 stems, 4 regions, 3 forest types,
// a fifth of the plots with measured heights.
import crypto from 'node:crypto';
import type { Db } from '@stemwise/db';
import fs from 'node:fs';
import path from 'node:path';
import { fixtureSpecies, loadSpecies, rng, type FixtureSpecies } from '../../../test/compute/fixtures';

export const STEMS_PER_PLOT = 125;
export const FOREST_TYPES = ['wet', 'moist', 'dry'];
export const REGIONS = ['Harrowmere', 'Kestrel Downs', 'Sallowfen', 'Brackenholt'];

/** Plots and visits by unnest, stems by COPY; returns the number of stems loaded. */
export async function load(db: Db, nStems: number): Promise<number> {
  const species = fixtureSpecies();
  await loadSpecies(db, species);
  const r = rng(nStems);
  const nPlots = Math.round(nStems / STEMS_PER_PLOT);
  const batchId = crypto.randomUUID();
  await db.query(`insert into batches (id, state, content_hash, files) values ($1, 'loaded', $2, '{}'::jsonb)`, [batchId, batchId]);
  await db.query(`insert into regions (name) select unnest($1::text[]) on conflict do nothing`, [REGIONS]);
  const regionIds = await db.query<{ id: number }>(`select id from regions order by id`);
  const keys = Array.from({ length: nPlots }, (_, i) => `B${String(i).padStart(6, '0')}`);
  await db.query(
    `insert into plots (plot_key, region_id, forest_type, latitude, longitude)
     select k, ($2::int[])[1 + (i % 4)], ($3::text[])[1 + (i % 3)], -2 - (i % 100) * 0.01, 20 + (i % 97) * 0.01
       from unnest($1::text[]) with ordinality t(k, i)`,
    [keys, regionIds.map((x) => x.id), FOREST_TYPES],
  );
  const visits = await db.query<{ id: string }>(
    `insert into plot_visits (plot_id, survey_date, batch_id, area_ha, logging_class, fire_class)
     select id, date '2024-03-01', $1, 0.25, id % 4, (id / 4) % 4 from plots order by id returning id`,
    [batchId],
  );
  let stems = 0;
  await db.transaction(async (tx) => {
    async function* rows(): AsyncGenerator<string> {
      let buf = '';
      for (const v of visits) {
        for (const line of plotStems(r, species, String(v.id), 'f')) {
          buf += line;
          stems++;
        }
        if (buf.length > 1 << 20) {
          yield buf;
          buf = '';
        }
      }
      if (buf) yield buf;
    }
    await tx.copyFrom(`copy stems (visit_id, tree_id, species, dbh_cm, height_m, status, stump_cause, fire_damage, in_subplot) from stdin (format csv)`, rows());
  });
  await db.query(`analyze`);
  return stems;
}

/**
 * The stems of one plot visit as CSV lines `plot,tree_id,species,dbh_cm,height_m,status,stump_cause,fire_damage,in_subplot`:
 * 100–150 stems, measured heights on a fifth of the plots, a share of logged stumps growing with the
 * plot's disturbance, and some names empty, `indet` or in capitals.
 */
export function plotStems(r: () => number, species: readonly FixtureSpecies[], plot: string, mainPlot: string): string[] {
  const lines: string[] = [];
  const n = 100 + Math.floor(r() * 51);
  const heights = r() < 0.2;
  const disturbance = r();
  for (let t = 0; t < n; t++) {
    const sp = species[Math.floor(species.length * r() * r())];
    const u = r();
    const status = u < 0.04 ? 'dead' : u < 0.04 + 0.2 * disturbance ? 'stump' : 'live';
    const d = Math.min(250, 10 + -Math.log(1 - r()) * 14);
    const lnD = Math.log(d);
    const h = heights && status === 'live' ? Math.min(60, Math.max(1.5, Math.exp(0.893 + 0.76 * lnD - 0.034 * lnD * lnD + (r() - 0.5) * 0.5))).toFixed(1) : '';
    const style = r();
    const name = style < 0.03 ? '' : style < 0.05 ? 'indet' : style < 0.07 ? sp.name.toUpperCase() : sp.name;
    lines.push(`${plot},T${t},${name},${d.toFixed(1)},${h},${status},${status === 'stump' ? 'logged' : ''},${status === 'stump' ? 0 : Math.floor(r() * 2)},${mainPlot}\n`);
  }
  return lines;
}

/**
 * An upload folder (plots.csv, trees.csv) of `nPlots` new plots in one region, the forest types in turn,
 * drawn like the loaded inventory's (same species list, already stored).
 */
export function writeBatch(dir: string, nPlots: number, region: string, seed: number): void {
  const r = rng(seed);
  const species = fixtureSpecies();
  fs.mkdirSync(dir, { recursive: true });
  const plots = ['plot_id,region,forest_type,latitude,longitude,area_ha,survey_date,logging_class,fire_class'];
  const trees = ['plot_id,tree_id,species,dbh_cm,height_m,status,stump_cause,fire_damage,in_subplot\n'];
  for (let i = 0; i < nPlots; i++) {
    const key = `N${seed}-${String(i).padStart(4, '0')}`;
    plots.push(`${key},${region},${FOREST_TYPES[i % FOREST_TYPES.length]},${(-2 - r()).toFixed(4)},${(20 + r()).toFixed(4)},0.25,2025-03-01,${i % 4},${Math.floor(i / 4) % 4}`);
    trees.push(...plotStems(r, species, key, '0'));
  }
  fs.writeFileSync(path.join(dir, 'plots.csv'), plots.join('\n') + '\n');
  fs.writeFileSync(path.join(dir, 'trees.csv'), trees.join(''));
}
