import fs from 'node:fs';
import zlib from 'node:zlib';
import { parse } from 'csv-parse/sync';
import type { FixturePlot, FixtureSpecies, FixtureStem } from './fixtures';

// Reads a demo inventory folder (the batch format: plots, trees, species; .csv or .csv.gz) into the
// fixture shapes, so compute tests can load it with SQL without the ingest service.

function readCsv(file: string): Array<Record<string, string>> {
  const path = fs.existsSync(file) ? file : `${file}.gz`;
  const raw = fs.readFileSync(path);
  const text = path.endsWith('.gz') ? zlib.gunzipSync(raw).toString('utf8') : raw.toString('utf8');
  return parse(text, { columns: true, skip_empty_lines: true, bom: true }) as Array<Record<string, string>>;
}

const num = (v: string | undefined, fallback: number | null = null): number | null => (v === undefined || v === '' ? fallback : Number(v));

export function readDemoInventory(dir: string): { species: FixtureSpecies[]; plots: FixturePlot[] } {
  const species = readCsv(`${dir}/species.csv`).map((r) => ({
    name: r.name,
    family: r.family,
    guild: r.guild as FixtureSpecies['guild'],
    woodDensity: num(r.wood_density),
    synonyms: r.synonyms ? r.synonyms.split(';').map((s) => s.trim()).filter(Boolean) : [],
  }));
  const byKey = new Map<string, FixturePlot>();
  for (const r of readCsv(`${dir}/plots.csv`)) {
    let plot = byKey.get(r.plot_id);
    if (!plot) {
      plot = { plotKey: r.plot_id, region: r.region, forestType: r.forest_type, latitude: Number(r.latitude), longitude: Number(r.longitude), visits: [] };
      byKey.set(r.plot_id, plot);
    }
    plot.visits.push({
      surveyDate: r.survey_date,
      areaHa: Number(r.area_ha),
      dbhMinCm: num(r.dbh_min_cm, 10)!,
      subplotAreaHa: num(r.subplot_area_ha, 0)!,
      subplotDbhMinCm: num(r.subplot_dbh_min_cm, 5)!,
      loggingClass: Number(r.logging_class),
      fireClass: Number(r.fire_class),
      stems: [],
    });
  }
  for (const r of readCsv(`${dir}/trees.csv`)) {
    const plot = byKey.get(r.plot_id)!;
    const stem: FixtureStem = {
      treeId: r.tree_id,
      species: r.species === '' ? null : r.species,
      dbhCm: Number(r.dbh_cm),
      heightM: num(r.height_m),
      status: r.status as FixtureStem['status'],
      stumpCause: (r.stump_cause || null) as FixtureStem['stumpCause'],
      fireDamage: num(r.fire_damage, 0)!,
      inSubplot: r.in_subplot === '1',
    };
    plot.visits[plot.visits.length - 1].stems.push(stem);
  }
  return { species, plots: [...byKey.values()] };
}
