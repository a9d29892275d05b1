import crypto from 'node:crypto';
import { createRng } from '@stemwise/core';
import type { ComputeStemRow, Db, Queryable } from '@stemwise/db';

// A small invented inventory (the made-up country of the demo: invented regions and species) and
// helpers that load it straight into the tables with SQL, without the ingest service. Deterministic:
// the same seed gives the same rows.

export interface FixtureSpecies {
  name: string;
  family: string;
  guild: 'pioneer' | 'light_demander' | 'shade_tolerant';
  woodDensity: number | null;
  synonyms: string[];
}

/** A stem as the fixture writes it: what compute reads back, with its tree id instead of its visit. */
export type FixtureStem = Omit<ComputeStemRow, 'visitId'> & { treeId: string };

export interface FixtureVisit {
  surveyDate: string;
  areaHa: number;
  dbhMinCm: number;
  subplotAreaHa: number;
  subplotDbhMinCm: number;
  loggingClass: number;
  fireClass: number;
  stems: FixtureStem[];
}

export interface FixturePlot {
  plotKey: string;
  region: string;
  forestType: string;
  latitude: number;
  longitude: number;
  visits: FixtureVisit[];
}

/** The seeded generator of @stemwise/core (mulberry32) as a function — test data only. */
export function rng(seed: number): () => number {
  return createRng(seed).next;
}

const GENERA: Array<[string, string, FixtureSpecies['guild']]> = [
  ['Velarina', 'Velarinaceae', 'pioneer'],
  ['Quorrelia', 'Velarinaceae', 'light_demander'],
  ['Tassandra', 'Tassandraceae', 'shade_tolerant'],
  ['Brumelia', 'Tassandraceae', 'shade_tolerant'],
  ['Oskavia', 'Oskaviaceae', 'light_demander'],
  ['Pentorra', 'Oskaviaceae', 'pioneer'],
  ['Lumaquia', 'Lumaquiaceae', 'shade_tolerant'],
  ['Dravenna', 'Lumaquiaceae', 'light_demander'],
];
const EPITHETS = ['alta', 'minor', 'rubella', 'sylvestris', 'montana'];

/** The reference list: 40 invented species, some without wood density, a few with synonyms. */
export function fixtureSpecies(): FixtureSpecies[] {
  const r = rng(7);
  const out: FixtureSpecies[] = [];
  GENERA.forEach(([genus, family, guild], g) => {
    EPITHETS.forEach((epithet, e) => {
      const density = (e + g) % 6 === 5 ? null : Math.round((0.35 + r() * 0.5) * 1000) / 1000;
      const synonyms = e === 0 ? [`${GENERA[(g + 1) % GENERA.length][0]} ${epithet}oides`] : [];
      out.push({ name: `${genus} ${epithet}`, family, guild: e === 4 && guild === 'shade_tolerant' ? 'light_demander' : guild, woodDensity: density, synonyms });
    });
  });
  return out;
}

export const REGIONS = ['Harrowmere', 'Kestrel Downs', 'Sallowfen'];
export const FOREST_TYPES = ['wet', 'moist', 'dry'];

export interface InventoryOptions {
  seed?: number;
  /** Plots per forest type and region. */
  plotsPerCell?: number;
  stemsPerPlot?: number;
  /** Share of plots whose live stems all have measured heights. */
  heightsShare?: number;
  /** Prefix of the plot keys (to load a second batch of new plots). */
  prefix?: string;
}

/**
 * A generated inventory with the cases that matter: main plot and subplot stems, dead stems and
 * stumps (logged and natural), fire damage, measured heights on some plots, synonyms, badly written
 * names (case, spacing, cf., authorities), names only to genus, unidentified and unknown names, a
 * second visit of some plots, a plot with only stumps and a plot with a single species.
 */
export function generateInventory(options: InventoryOptions = {}): FixturePlot[] {
  const r = rng(options.seed ?? 1);
  const species = fixtureSpecies();
  const perCell = options.plotsPerCell ?? 6;
  const stemsPerPlot = options.stemsPerPlot ?? 60;
  const heightsShare = options.heightsShare ?? 0.4;
  const prefix = options.prefix ?? 'P';
  const plots: FixturePlot[] = [];
  let k = 0;
  for (const forestType of FOREST_TYPES) {
    for (const region of REGIONS) {
      for (let i = 0; i < perCell; i++, k++) {
        const plotKey = `${prefix}${String(k).padStart(4, '0')}`;
        const visits: FixtureVisit[] = [];
        const nVisits = k % 5 === 0 ? 2 : 1;
        for (let v = 0; v < nVisits; v++) {
          const disturbance = r();
          const loggingClass = Math.min(3, Math.floor(disturbance * 4));
          const fireClass = Math.min(3, Math.floor(r() * r() * 4));
          const subplot = k % 3 === 0;
          const stems: FixtureStem[] = [];
          const n = Math.max(1, Math.round(stemsPerPlot * (0.5 + r())));
          const withHeights = r() < heightsShare;
          const singleSpecies = k === 4;
          const onlyStumps = k === 7;
          for (let t = 0; t < n; t++) {
            const inSubplot = subplot && r() < 0.2;
            const dbhCm = inSubplot ? 5 + r() * 4.9 : Math.min(250, 10 + -Math.log(1 - r()) * 14);
            const u = r();
            const status: FixtureStem['status'] = onlyStumps ? 'stump' : u < 0.05 ? 'dead' : u < 0.05 + 0.25 * disturbance ? 'stump' : 'live';
            const stumpCause = status === 'stump' ? (r() < 0.8 ? 'logged' : r() < 0.5 ? 'natural' : 'unknown') : null;
            const pioneerBias = disturbance > 0.5 ? 0.5 : 0;
            let sp: FixtureSpecies;
            if (singleSpecies) sp = species[3];
            else {
              const pick = r() < pioneerBias ? species.filter((s) => s.guild === 'pioneer') : species;
              // skewed abundances: a few common species, many rare ones
              sp = pick[Math.min(pick.length - 1, Math.floor(pick.length * r() * r()))];
            }
            const style = r();
            let name: string | null = sp.name;
            if (style < 0.03) name = null;
            else if (style < 0.05) name = 'indet';
            else if (style < 0.07) name = `${sp.name.split(' ')[0]} sp.`;
            else if (style < 0.09) name = sp.name.toUpperCase().replace(' ', '  ');
            else if (style < 0.11) name = `${sp.name.split(' ')[0]} cf. ${sp.name.split(' ')[1]}`;
            else if (style < 0.13) name = `${sp.name} Wendt.`;
            else if (style < 0.15 && sp.synonyms.length) name = sp.synonyms[0];
            else if (style < 0.16) name = `${sp.name.split(' ')[0]} nova`; // genus known, species not in the list
            else if (style < 0.17) name = 'Mystica obscura'; // unknown genus
            const live = status === 'live';
            const lnD = Math.log(dbhCm);
            const h = Math.exp(0.893 + 0.76 * lnD - 0.034 * lnD * lnD + (r() - 0.5) * 0.5);
            stems.push({
              treeId: `T${t + 1}`,
              species: name,
              dbhCm: Math.round(dbhCm * 10) / 10,
              heightM: live && withHeights ? Math.round(Math.min(60, Math.max(1.5, h)) * 10) / 10 : null,
              status,
              stumpCause,
              fireDamage: status === 'stump' ? 0 : Math.min(3, Math.floor(r() * (fireClass + 1))),
              inSubplot,
            });
          }
          visits.push({
            surveyDate: `${2019 + v * 3}-0${1 + (k % 9)}-1${k % 10}`,
            areaHa: k % 4 === 0 ? 0.25 : 0.1,
            dbhMinCm: 10,
            subplotAreaHa: subplot ? 0.02 : 0,
            subplotDbhMinCm: 5,
            loggingClass,
            fireClass,
            stems,
          });
        }
        plots.push({
          plotKey,
          region,
          forestType,
          latitude: -3 - (k % 17) * 0.13 - r() * 0.01,
          longitude: 21 + (k % 13) * 0.17 + r() * 0.01,
          visits,
        });
      }
    }
  }
  return plots;
}

/** Loads a species reference list as a new version; returns its id. */
export async function loadSpecies(db: Db, list: readonly FixtureSpecies[], source = 'fixture'): Promise<number> {
  return db.transaction(async (tx) => {
    const [{ id }] = await tx.query<{ id: number }>(
      `insert into species_versions (source, content_hash, n_species) values ($1, $2, $3) returning id`,
      [source, crypto.createHash('sha256').update(JSON.stringify(list)).digest('hex'), list.length],
    );
    const rows = await tx.query<{ id: number; name: string }>(
      `insert into species (version_id, name, genus, family, guild, wood_density)
       select $1, n, split_part(n, ' ', 1), f, g, w from unnest($2::text[], $3::text[], $4::text[], $5::float8[]) t(n, f, g, w)
       returning id, name`,
      [id, list.map((s) => s.name), list.map((s) => s.family), list.map((s) => s.guild), list.map((s) => s.woodDensity)],
    );
    const idOf = new Map(rows.map((r) => [r.name, Number(r.id)]));
    const syn = list.flatMap((s) => s.synonyms.map((y) => [y, idOf.get(s.name)!] as const));
    if (syn.length) {
      await tx.query(`insert into species_synonyms (version_id, synonym, species_id) select $1, s, i from unnest($2::text[], $3::int[]) t(s, i)`, [
        id,
        syn.map((x) => x[0]),
        syn.map((x) => x[1]),
      ]);
    }
    return Number(id);
  });
}

async function ensureRegions(db: Queryable, names: readonly string[]): Promise<Map<string, number>> {
  await db.query(`insert into regions (name) select unnest($1::text[]) on conflict (name) do nothing`, [[...new Set(names)]]);
  const rows = await db.query<{ id: number; name: string }>(`select id, name from regions where name = any($1::text[])`, [[...new Set(names)]]);
  return new Map(rows.map((r) => [r.name, Number(r.id)]));
}

/** Inserts a loaded batch with its plots, visits (stale) and stems; returns the batch id and visit ids. */
export async function loadInventory(db: Db, plots: readonly FixturePlot[]): Promise<{ batchId: string; visitIds: number[] }> {
  const batchId = crypto.randomUUID();
  return db.transaction(async (tx) => {
    await tx.query(`insert into batches (id, state, content_hash, files) values ($1, 'loaded', $2, '{}'::jsonb)`, [batchId, crypto.randomBytes(16).toString('hex')]);
    const regionIds = await ensureRegions(tx, plots.map((p) => p.region));
    const plotRows = await tx.query<{ id: number; plot_key: string }>(
      `insert into plots (plot_key, region_id, forest_type, latitude, longitude)
       select * from unnest($1::text[], $2::int[], $3::text[], $4::float8[], $5::float8[])
       on conflict (plot_key) do update set region_id = excluded.region_id
       returning id, plot_key`,
      [plots.map((p) => p.plotKey), plots.map((p) => regionIds.get(p.region)), plots.map((p) => p.forestType), plots.map((p) => p.latitude), plots.map((p) => p.longitude)],
    );
    const plotId = new Map(plotRows.map((r) => [r.plot_key, Number(r.id)]));
    const visits = plots.flatMap((p) => p.visits.map((v) => ({ plotId: plotId.get(p.plotKey)!, v })));
    const visitRows = await tx.query<{ id: number; plot_id: number; survey_date: string }>(
      `insert into plot_visits (plot_id, survey_date, batch_id, area_ha, dbh_min_cm, subplot_area_ha, subplot_dbh_min_cm, logging_class, fire_class)
       select p, d, $1::uuid, a, m, sa, sm, l, f from unnest($2::bigint[], $3::date[], $4::float8[], $5::float8[], $6::float8[], $7::float8[], $8::int[], $9::int[]) t(p, d, a, m, sa, sm, l, f)
       returning id, plot_id, survey_date::text survey_date`,
      [
        batchId,
        visits.map((x) => x.plotId),
        visits.map((x) => x.v.surveyDate),
        visits.map((x) => x.v.areaHa),
        visits.map((x) => x.v.dbhMinCm),
        visits.map((x) => x.v.subplotAreaHa),
        visits.map((x) => x.v.subplotDbhMinCm),
        visits.map((x) => x.v.loggingClass),
        visits.map((x) => x.v.fireClass),
      ],
    );
    const visitId = new Map(visitRows.map((r) => [`${Number(r.plot_id)}|${r.survey_date}`, Number(r.id)]));
    const stems = visits.flatMap((x) => x.v.stems.map((s) => ({ visitId: visitId.get(`${x.plotId}|${x.v.surveyDate}`)!, s })));
    for (let i = 0; i < stems.length; i += 20_000) {
      const part = stems.slice(i, i + 20_000);
      await tx.query(
        `insert into stems (visit_id, tree_id, species, dbh_cm, height_m, status, stump_cause, fire_damage, in_subplot)
         select * from unnest($1::bigint[], $2::text[], $3::text[], $4::float8[], $5::float8[], $6::text[], $7::text[], $8::int[], $9::bool[])`,
        [
          part.map((x) => x.visitId),
          part.map((x) => x.s.treeId),
          part.map((x) => x.s.species),
          part.map((x) => x.s.dbhCm),
          part.map((x) => x.s.heightM),
          part.map((x) => x.s.status),
          part.map((x) => x.s.stumpCause),
          part.map((x) => x.s.fireDamage),
          part.map((x) => x.s.inSubplot),
        ],
      );
    }
    return { batchId, visitIds: visitRows.map((r) => Number(r.id)).sort((a, b) => a - b) };
  });
}

/**
 * Unresolved names of live stems with their stem counts, counted straight from the fixture: the only
 * names of this generator that match no listed species are `<Genus> nova` (a listed genus) and
 * `Mystica obscura` (an unknown genus).
 */
export function expectedUnresolved(plots: readonly FixturePlot[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const p of plots)
    for (const v of p.visits)
      for (const s of v.stems) {
        if (s.species === null) continue; // every stem of the name, any status or size
        if (/^\S+ nova$/.test(s.species) || s.species === 'Mystica obscura') out[s.species] = (out[s.species] ?? 0) + 1;
      }
  return out;
}

export interface RemeasureOptions {
  seed?: number;
  /** Years between the visits (whole years, same day of the year). */
  years?: number;
  /** Yearly probabilities of a live tree dying (dead), being logged (logged stump) and not being found. */
  death?: number;
  logging?: number;
  absence?: number;
  /** New trees per plot at the second visit, live, at or above 10 cm. */
  recruits?: number;
}

/**
 * A re-measurement of every plot: a visit `years` after its last one with the same tree ids. Live
 * trees die, are logged or go missing at the given yearly rates, or grow 0–1 cm a year; dead trees
 * and stumps stay; new trees recruit. Test data (the demo's invented scenario), deterministic.
 */
export function remeasure(plots: readonly FixturePlot[], options: RemeasureOptions = {}): FixturePlot[] {
  const r = rng(options.seed ?? 11);
  const years = options.years ?? 5;
  const over = (p: number): number => 1 - Math.pow(1 - p, years);
  const pDie = over(options.death ?? 0.02);
  const pLog = over(options.logging ?? 0.01);
  const pAbsent = over(options.absence ?? 0.005);
  return plots.map((plot) => {
    const last = plot.visits[plot.visits.length - 1];
    const stems: FixtureStem[] = [];
    for (const s of last.stems) {
      if (s.status !== 'live') {
        stems.push({ ...s });
        continue;
      }
      const u = r();
      if (u < pAbsent) continue;
      if (u < pAbsent + pDie) stems.push({ ...s, status: 'dead', heightM: null, fireDamage: 0 });
      else if (u < pAbsent + pDie + pLog) stems.push({ ...s, status: 'stump', stumpCause: 'logged', heightM: null, fireDamage: 0 });
      else {
        const dbhCm = Math.round((s.dbhCm + r() * years) * 10) / 10;
        stems.push({ ...s, dbhCm, inSubplot: s.inSubplot && dbhCm < last.dbhMinCm, heightM: s.heightM === null ? null : Math.min(60, Math.round((s.heightM + r() * 0.5 * years) * 10) / 10) });
      }
    }
    const n = options.recruits ?? 3;
    for (let j = 0; j < n; j++) {
      stems.push({ treeId: `R${plot.visits.length}-${j + 1}`, species: last.stems.find((s) => s.species !== null)?.species ?? null, dbhCm: Math.round((10 + r() * 3) * 10) / 10, heightM: null, status: 'live', stumpCause: null, fireDamage: 0, inSubplot: false });
    }
    const surveyDate = `${Number(last.surveyDate.slice(0, 4)) + years}${last.surveyDate.slice(4)}`;
    return { ...plot, visits: [...plot.visits, { ...last, surveyDate, stems }] };
  });
}
