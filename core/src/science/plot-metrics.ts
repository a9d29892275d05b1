// Every numeric column of `export plots` for one plot visit, from its stems: one pure function.
// Rules (docs/methods.md#which-stems-count; columns in docs/exports.md, fields in docs/upload-format.md):
//  - structure, biomass and carbon: all live stems, identified or not, main plot and subplot, each
//    expanded by its own area; live stems below their plot's or subplot's dbh minimum are left out
//    (they were not sampled on that area) and counted in the diagnostics;
//  - diversity: live main-plot stems identified to species (exact, synonym or normalised match;
//    synonyms count as their accepted species; genus-only and unresolved names are not identified);
//  - guild shares: of live basal area (expanded), with unassigned = unidentified or not a listed species;
//  - disturbance: logged stumps (their cut-surface diameter converted to DBH, stump.ts) against live
//    basal area on the main plot only; stem fire damage weighted by expanded live basal area (main plot
//    and subplot);
//  - the `reporting_*` columns and the stand table: the same live stems from the reporting threshold
//    up, null where the plot did not measure every stem from the threshold up (stand-table.ts);
//  - heights: measured, else the local height–diameter model, else the Chave et al. 2005 no-height model;
//  - below-ground biomass: the plot's live AGB times the ratio of its forest type's root-to-shoot relation
//    at that AGB (root-shoot.ts); standing dead wood: dead stems at or above their area's dbh minimum, by
//    the live model choice times the share a dead stem keeps (dead-wood.ts), never in the live columns.
// AGB and carbon are model estimates with their own uncertainty (see allometry.ts).

import type { PlotMetricValues } from '@stemwise/db/catalogue';
import { agbChave2005, agbChave2014, carbonFromBiomass, type Climate, IPCC_2006_CARBON_FRACTION } from './allometry';
import {
  basalAreaWeightedFireDamage,
  type DisturbanceOptions,
  disturbanceIndex,
  fireScore,
  loggingRemovedBaFraction,
  loggingScore,
} from './disturbance';
import {
  chao1,
  fisherAlpha,
  inverseSimpson,
  pielou,
  rarefiedRichness,
  richness,
  shannon,
  simpson,
} from './diversity';
import { CarbonMomentsBuilder, type CarbonMoments, type HeightSource, type PlotRootShoot } from './carbon-uncertainty';
import { standingDeadBiomass, DEFAULT_STANDING_DEAD_SHARE } from './dead-wood';
import { type HeightDiameterModel, predictHeight } from './height-diameter';
import { DEFAULT_ROOT_SHOOT_BY_CLIMATE, type RootShootRelation, rootShootRatio } from './root-shoot';
import type { SpeciesIndex, SpeciesReference } from './species-names';
import { DEFAULT_REPORTING_DBH_MIN_CM, diameterClasses, figuresAtThreshold, measuredFromCm, plotStandTable } from './stand-table';
import { basalAreaM2, basalAreaPerHa, expansionFactor, quadraticMeanDiameter, stemsPerHa } from './structure';
import { assertStumpToDbh, DEFAULT_STUMP_TO_DBH, dbhFromStump, type StumpToDbh } from './stump';
import {
  DEFAULT_WOOD_DENSITY,
  stemWoodDensities,
  type WoodDensityHit,
  type WoodDensityLevel,
  WoodDensityTable,
} from './wood-density';

export interface PlotVisitInput {
  readonly areaHa: number;
  readonly dbhMinCm: number;
  /** 0 when the plot has no subplot. */
  readonly subplotAreaHa: number;
  readonly subplotDbhMinCm: number;
  readonly loggingClass: number;
  readonly fireClass: number;
  readonly climate: Climate;
}

export interface StemInput {
  readonly species: string | null;
  readonly dbhCm: number;
  readonly heightM: number | null;
  readonly status: 'live' | 'dead' | 'stump';
  readonly stumpCause: 'logged' | 'natural' | 'unknown' | null;
  readonly fireDamage: number;
  readonly inSubplot: boolean;
}

export interface PlotMetricOptions {
  /** Local height–diameter model for the plot's forest type; null or absent: no-height models. */
  readonly heightModel?: HeightDiameterModel | null;
  /**
   * Fewest identified live main-plot stems for the diversity indices (default 2, stemwise's choice: one
   * stem tells nothing about diversity). Below it every index is null, not 0 — except `richness`,
   * which is a count and always defined (0 or 1 species among 0 or 1 stems).
   */
  readonly minStemsForDiversity?: number;
  /** Regional default wood density, g/cm³ (default DEFAULT_WOOD_DENSITY = 0.58, memory; a setting). */
  readonly defaultWoodDensity?: number;
  /** Carbon fraction of biomass (default 0.47, IPCC 2006 Vol. 4 Table 4.3). */
  readonly carbonFraction?: number;
  readonly disturbance?: DisturbanceOptions;
  /** Built from the index (and cached per index) when absent. */
  readonly woodDensityTable?: WoodDensityTable;
  /**
   * Also return the biomass of every live stem (`stemAgbKg`), below the dbh minimum too, by the same
   * models and wood densities as the plot's figures (change between visits needs it per tree).
   */
  readonly stemAgb?: boolean;
  /** Also return the sums the carbon uncertainty needs (`carbonMoments`, docs/methods.md#carbon-uncertainty). */
  readonly carbonMoments?: boolean;
  /** Root-to-shoot relation of the plot's forest type (default: DEFAULT_ROOT_SHOOT_BY_CLIMATE of its climate). */
  readonly rootShoot?: RootShootRelation;
  /** Share of the allometric biomass a standing dead stem keeps (default DEFAULT_STANDING_DEAD_SHARE = 0.7, common practice). */
  readonly standingDeadShare?: number;
  /** Reporting threshold of the `reporting_*` columns and the stand table, cm (default 10, a setting). */
  readonly reportingDbhMinCm?: number;
  /** DBH from a stump's cut-surface diameter (default DEFAULT_STUMP_TO_DBH, a setting). */
  readonly stumpToDbh?: StumpToDbh;
}

export const DEFAULT_MIN_STEMS_FOR_DIVERSITY = 2;
/** Sample size of the `rarefied_50` column. */
export const RAREFACTION_SIZE = 50;

/**
 * The numeric columns of `export plots` by catalogue key (`@stemwise/db/catalogue`, pure data); null
 * where a value cannot be computed. computePlotMetrics fills every key, and only those.
 */
export type PlotMetrics = PlotMetricValues;

export interface PlotDiagnostics {
  /** Share of live basal area by the level that gave the stem its wood density; null without live basal area. */
  woodDensityBaShare: Record<WoodDensityLevel, number> | null;
  /** Share of included live stems (by count) by height source; null without live stems. */
  heightSourceShare: { measured: number; modelled: number; noHeightModel: number } | null;
  /** Live stems whose height came from the local model at a dbh outside the model's fitted range. */
  modelledOutsideFitRange: number;
  /** Live stems below the dbh minimum of the area they were recorded on (left out of every column). */
  liveStemsBelowDbhMin: number;
  /**
   * Stand table of the live stems: per class of `diameterClasses(thresholdCm)`, [stems/ha, m²/ha, Mg/ha],
   * or null where the plot did not measure the class (docs/methods.md#stand-tables).
   */
  standTable: { thresholdCm: number; classes: ([number, number, number] | null)[] };
  /** Recorded names of the visit's stems (every status and size) not matched to a listed species: `genus` when the genus is listed, else `unresolved`. */
  unresolvedNames: { name: string; level: 'genus' | 'unresolved'; stems: number }[];
}

export interface PlotMetricsResult {
  metrics: PlotMetrics;
  diagnostics: PlotDiagnostics;
  /** With `stemAgb`: AGB in kg of each input stem, in input order; null for stems that are not live. */
  stemAgbKg?: (number | null)[];
  /** With `carbonMoments`: the plot's above-ground biomass sums by height source (Mg/ha), its root-to-shoot ratio and its standing dead wood's sums. */
  carbonMoments?: CarbonMoments;
  /** With `stemAgb`: standing dead wood in kg of each dead stem at or above its minimum, in input order; null for the others. */
  stemDeadKg?: (number | null)[];
  /** With `stemAgb`: where each live or standing dead stem's height came from (the biomass model used), in input order; null for the others. */
  stemHeightSource?: (HeightSource | null)[];
  /** With `stemAgb`: the plot's root-to-shoot ratio, its SD and row (ratio 0, SD 0 where none applies). */
  rootShoot?: PlotRootShoot;
}

const tables = new WeakMap<SpeciesIndex, WoodDensityTable>();
function tableFor(index: SpeciesIndex): WoodDensityTable {
  let t = tables.get(index);
  if (t === undefined) {
    t = new WoodDensityTable(index);
    tables.set(index, t);
  }
  return t;
}

const CLIMATES = new Set<string>(['dry', 'moist', 'wet']);
const STUMP_CAUSES = new Set<string>(['logged', 'natural', 'unknown']);
const HEIGHT_MEASURED = 0;
const HEIGHT_MODELLED = 1;
const HEIGHT_NONE = 2;

function fail(message: string): never {
  throw new RangeError(`computePlotMetrics: ${message}`);
}

function checkVisit(v: PlotVisitInput): void {
  if (!(v.areaHa > 0) || !Number.isFinite(v.areaHa)) fail(`area_ha must be > 0 (got ${v.areaHa})`);
  if (!(v.subplotAreaHa >= 0 && v.subplotAreaHa < v.areaHa)) {
    fail(`subplot_area_ha must be >= 0 and below area_ha (got ${v.subplotAreaHa})`);
  }
  if (!(v.dbhMinCm >= 0) || !(v.subplotDbhMinCm >= 0)) {
    fail(`dbh minima must be >= 0 (got ${v.dbhMinCm}, ${v.subplotDbhMinCm})`);
  }
  if (!CLIMATES.has(v.climate)) fail(`climate must be dry, moist or wet (got ${String(v.climate)})`);
}

function checkStem(i: number, s: StemInput): void {
  if (!(s.dbhCm > 0) || !Number.isFinite(s.dbhCm)) fail(`stem ${i}: dbh must be a finite number > 0 cm (got ${s.dbhCm})`);
  if (s.status !== 'live' && s.status !== 'dead' && s.status !== 'stump') {
    fail(`stem ${i}: status must be live, dead or stump (got ${String(s.status)})`);
  }
  if (s.status === 'stump' ? !STUMP_CAUSES.has(s.stumpCause as string) : s.stumpCause !== null) {
    fail(`stem ${i}: stump_cause is required for stumps (logged, natural or unknown) and empty otherwise (got ${String(s.stumpCause)})`);
  }
  if (s.heightM !== null && (!(s.heightM > 0) || !Number.isFinite(s.heightM))) {
    fail(`stem ${i}: height must be null or a finite number > 0 m (got ${s.heightM})`);
  }
  if (!Number.isInteger(s.fireDamage) || s.fireDamage < 0 || s.fireDamage > 3) {
    fail(`stem ${i}: fire_damage must be an integer 0..3 (got ${s.fireDamage})`);
  }
  if (s.inSubplot !== true && s.inSubplot !== false) fail(`stem ${i}: in_subplot must be a boolean`);
}

// Per-plot metrics of `export plots` from the stems of one visit (rules above; formulas in the modules they call)
export function computePlotMetrics(
  visit: PlotVisitInput,
  stems: readonly StemInput[],
  index: SpeciesIndex,
  options: PlotMetricOptions = {},
): PlotMetricsResult {
  checkVisit(visit);
  const heightModel = options.heightModel ?? null;
  const minStemsForDiversity = options.minStemsForDiversity ?? DEFAULT_MIN_STEMS_FOR_DIVERSITY;
  if (!Number.isInteger(minStemsForDiversity) || minStemsForDiversity < 1) {
    fail(`minStemsForDiversity must be an integer >= 1 (got ${minStemsForDiversity})`);
  }
  const carbonFraction = options.carbonFraction ?? IPCC_2006_CARBON_FRACTION;
  const table = options.woodDensityTable ?? tableFor(index);
  const reportingDbhMinCm = options.reportingDbhMinCm ?? DEFAULT_REPORTING_DBH_MIN_CM;
  const classes = diameterClasses(reportingDbhMinCm);
  const stumpToDbh = options.stumpToDbh ?? DEFAULT_STUMP_TO_DBH;
  assertStumpToDbh('computePlotMetrics', stumpToDbh);

  // Included live stems, one entry per stem in each array.
  const dbh: number[] = [];
  const weight: number[] = [];
  const baStem: number[] = []; // basal area, m²
  const baHa: number[] = []; // basal area × expansion, m²/ha
  const height: (number | null)[] = [];
  const hits: (WoodDensityHit | null)[] = [];
  const guildOf: (SpeciesReference | null)[] = [];
  const fire: number[] = [];
  let mainLiveBa = 0;
  let loggedStumpBa = 0;
  let belowMin = 0;
  const speciesCounts = new Map<SpeciesReference, number>();
  // With stemAgb: input positions of the included live stems, and the live stems below their minimum.
  const includedAt: number[] = [];
  const below: { at: number; hit: WoodDensityHit | null }[] = [];
  // Standing dead stems at or above their minimum: input position, weight and wood-density hit.
  const dead: { at: number; w: number; hit: WoodDensityHit | null }[] = [];
  const unresolved = new Map<string, { level: 'genus' | 'unresolved'; stems: number }>();

  const mainWeight = expansionFactor(false, visit.areaHa, visit.subplotAreaHa);
  const subplotWeight = visit.subplotAreaHa > 0 ? expansionFactor(true, visit.areaHa, visit.subplotAreaHa) : null;

  for (let i = 0; i < stems.length; i += 1) {
    const s = stems[i];
    checkStem(i, s);
    // Every stored stem counts towards its name (any status or size), as the ingest warnings count it.
    // Resolved once per stem (resolve(null) is the unidentified nothing) and used for everything below.
    const named = index.resolve(s.species);
    if (named.level === 'genus' || named.level === 'unresolved') {
      const key = (s.species as string).trim();
      const u = unresolved.get(key);
      if (u === undefined) unresolved.set(key, { level: named.level, stems: 1 });
      else u.stems += 1;
    }
    if (s.status === 'stump') {
      if (s.stumpCause === 'logged' && !s.inSubplot) loggedStumpBa += basalAreaM2(dbhFromStump(s.dbhCm, stumpToDbh));
      continue;
    }
    if (s.inSubplot && subplotWeight === null) {
      fail(`stem ${i}: a subplot stem on a plot without a subplot (subplot_area_ha = ${visit.subplotAreaHa})`);
    }
    if (s.status === 'dead') {
      if (s.dbhCm >= (s.inSubplot ? visit.subplotDbhMinCm : visit.dbhMinCm)) {
        dead.push({ at: i, w: s.inSubplot ? (subplotWeight as number) : mainWeight, hit: table.lookup(named) });
      }
      continue;
    }
    if (s.dbhCm < (s.inSubplot ? visit.subplotDbhMinCm : visit.dbhMinCm)) {
      belowMin += 1;
      if (options.stemAgb) below.push({ at: i, hit: table.lookup(named) });
      continue;
    }
    if (options.stemAgb) includedAt.push(i);
    const w = s.inSubplot ? (subplotWeight as number) : mainWeight;
    const g = basalAreaM2(s.dbhCm);
    const r = named;
    dbh.push(s.dbhCm);
    weight.push(w);
    baStem.push(g);
    baHa.push(g * w);
    height.push(s.heightM);
    hits.push(table.lookup(r));
    guildOf.push(r.species);
    fire.push(s.fireDamage);
    if (!s.inSubplot) {
      mainLiveBa += g;
      if (r.species !== null) speciesCounts.set(r.species, (speciesCounts.get(r.species) ?? 0) + 1);
    }
  }

  const nLive = dbh.length;
  const totalBaHa = basalAreaPerHa(dbh, weight);

  // Wood density and biomass
  // Stems below their minimum (with stemAgb) and dead stems get a density too but weigh nothing in the plot's mean.
  const wd = below.length || dead.length
    ? stemWoodDensities([...hits, ...below.map((b) => b.hit), ...dead.map((b) => b.hit)], [...baHa, ...below.map(() => 0), ...dead.map(() => 0)], options.defaultWoodDensity ?? DEFAULT_WOOD_DENSITY)
    : stemWoodDensities(hits, baHa, options.defaultWoodDensity ?? DEFAULT_WOOD_DENSITY);
  // One biomass model choice for every stem: measured height, else the local model, else no height.
  const agbOf = (rho: number, d: number, measured: number | null): number =>
    measured !== null
      ? agbChave2014(rho, d, measured)
      : heightModel !== null
        ? agbChave2014(rho, d, predictHeight(heightModel, d))
        : agbChave2005(rho, d, visit.climate);
  const stemAgbKg: (number | null)[] | undefined = options.stemAgb ? new Array<number | null>(stems.length).fill(null) : undefined;
  const stemHeightSource: (HeightSource | null)[] | undefined = options.stemAgb ? new Array<HeightSource | null>(stems.length).fill(null) : undefined;
  const sourceOf = (measured: number | null): HeightSource => (measured !== null ? 'measured' : heightModel !== null ? 'modelled' : 'noHeight');
  const wdBa: Record<WoodDensityLevel, number> = { species: 0, genus: 0, family: 0, plot: 0, default: 0 };
  const heightCount = [0, 0, 0];
  const heightAgb = [0, 0, 0];
  const wdAgb: Record<WoodDensityLevel, number> = { species: 0, genus: 0, family: 0, plot: 0, default: 0 };
  let outsideRange = 0;
  let agbKgHa = 0;
  const moments = options.carbonMoments ? new CarbonMomentsBuilder() : null;
  const agbStem = new Array<number>(nLive);
  for (let i = 0; i < nLive; i += 1) {
    const d = dbh[i];
    const rho = wd.values[i];
    wdBa[wd.levels[i]] += baHa[i];
    const measured = height[i];
    const source = measured !== null ? HEIGHT_MEASURED : heightModel !== null ? HEIGHT_MODELLED : HEIGHT_NONE;
    heightCount[source] += 1;
    if (source === HEIGHT_MODELLED && heightModel !== null && (d < heightModel.dbhMinCm || d > heightModel.dbhMaxCm)) outsideRange += 1;
    const agb = agbOf(rho, d, measured);
    agbStem[i] = agb;
    if (stemAgbKg) stemAgbKg[includedAt[i]] = agb;
    if (stemHeightSource) stemHeightSource[includedAt[i]] = sourceOf(measured);
    if (moments) {
      const source = sourceOf(measured);
      moments.addTree(source, [{ weight: weight[i], coef: 1, agbMg: agb / 1000, dbhCm: d, modelled: source === 'modelled' }]);
    }
    agbKgHa += weight[i] * agb;
    heightAgb[source] += weight[i] * agb;
    wdAgb[wd.levels[i]] += weight[i] * agb;
  }
  for (let j = 0; j < below.length; j += 1) {
    const s = stems[below[j].at];
    (stemAgbKg as (number | null)[])[below[j].at] = agbOf(wd.values[nLive + j], s.dbhCm, s.heightM);
    (stemHeightSource as (HeightSource | null)[])[below[j].at] = sourceOf(s.heightM);
  }
  const agbMgHa = agbKgHa / 1000;

  // Carbon pools: below-ground from the plot's AGB, standing dead wood from the dead stems.
  const relation = options.rootShoot ?? DEFAULT_ROOT_SHOOT_BY_CLIMATE[visit.climate];
  const ratio = rootShootRatio(relation, agbMgHa);
  const bgbMgHa = ratio === null ? 0 : ratio.ratio * agbMgHa;
  const deadShare = options.standingDeadShare ?? DEFAULT_STANDING_DEAD_SHARE;
  const stemDeadKg: (number | null)[] | undefined = options.stemAgb ? new Array<number | null>(stems.length).fill(null) : undefined;
  let deadKgHa = 0;
  const deadMoments = moments ? new CarbonMomentsBuilder() : null;
  for (let j = 0; j < dead.length; j += 1) {
    const s = stems[dead[j].at];
    const kg = standingDeadBiomass(agbOf(wd.values[nLive + below.length + j], s.dbhCm, s.heightM), deadShare);
    if (stemDeadKg) stemDeadKg[dead[j].at] = kg;
    if (stemHeightSource) stemHeightSource[dead[j].at] = sourceOf(s.heightM);
    deadKgHa += dead[j].w * kg;
    if (deadMoments) {
      const source = sourceOf(s.heightM);
      deadMoments.addTree(source, [{ weight: dead[j].w, coef: 1, agbMg: kg / 1000, dbhCm: s.dbhCm, modelled: source === 'modelled' }]);
    }
  }
  const standingDeadMgHa = deadKgHa / 1000;
  const carbonMgHa = carbonFromBiomass(agbMgHa, carbonFraction);
  const bgbCarbonMgHa = carbonFromBiomass(bgbMgHa, carbonFraction);
  const standingDeadCarbonMgHa = carbonFromBiomass(standingDeadMgHa, carbonFraction);
  // The same stems from the reporting threshold up, and by diameter class.
  const expanded = { dbhCm: dbh, weight, basalAreaM2: baStem, agbKg: agbStem };
  const fromCm = measuredFromCm(visit.dbhMinCm, visit.subplotAreaHa, visit.subplotDbhMinCm);
  const atThreshold = figuresAtThreshold(expanded, reportingDbhMinCm, fromCm);
  const standTable = plotStandTable(expanded, classes, fromCm).map((f): [number, number, number] | null => (f === null ? null : [f.stemsHa, f.basalAreaM2Ha, f.agbMgHa]));

  // Guild shares of live basal area
  let pioneer = 0;
  let light = 0;
  let shade = 0;
  let unassigned = 0;
  for (let i = 0; i < nLive; i += 1) {
    const sp = guildOf[i];
    if (sp === null) unassigned += baHa[i];
    else if (sp.guild === 'pioneer') pioneer += baHa[i];
    else if (sp.guild === 'light_demander') light += baHa[i];
    else shade += baHa[i];
  }
  const share = (x: number): number | null => (totalBaHa > 0 ? x / totalBaHa : null);
  // Biomass method shares: the part of the plot's live AGB per hectare computed each way.
  const agbShare = (x: number): number | null => (agbKgHa > 0 ? x / agbKgHa : null);

  // Diversity on identified live main-plot stems
  const counts = [...speciesCounts.values()];
  let nIdentified = 0;
  for (const c of counts) nIdentified += c;
  const enough = nIdentified >= minStemsForDiversity;

  // Disturbance
  const removed = loggingRemovedBaFraction(mainLiveBa, loggedStumpBa);
  const logging = loggingScore(removed, visit.loggingClass, options.disturbance);
  const fireValue = fireScore(basalAreaWeightedFireDamage(fire, baHa), visit.fireClass, options.disturbance);

  const metrics: PlotMetrics = {
    stemsHa: stemsPerHa(weight),
    basalAreaM2Ha: totalBaHa,
    qmdCm: quadraticMeanDiameter(dbh, weight),
    agbMgHa,
    carbonMgHa,
    nIdentified,
    richness: richness(counts),
    shannon: enough ? shannon(counts) : null,
    simpson: enough ? simpson(counts) : null,
    invSimpson: enough ? inverseSimpson(counts) : null,
    pielou: enough ? pielou(counts) : null,
    fisherAlpha: enough ? fisherAlpha(counts) : null,
    rarefied50: enough ? rarefiedRichness(counts, RAREFACTION_SIZE) : null,
    chao1: enough ? chao1(counts) : null,
    pioneerBaShare: share(pioneer),
    lightDemanderBaShare: share(light),
    shadeTolerantBaShare: share(shade),
    unassignedBaShare: share(unassigned),
    loggingRemovedBaFrac: removed,
    loggingScore: logging,
    fireScore: fireValue,
    disturbanceIndex: disturbanceIndex(logging, fireValue),
    rootShootRatio: ratio === null ? null : ratio.ratio,
    bgbMgHa,
    bgbCarbonMgHa,
    standingDeadMgHa,
    standingDeadCarbonMgHa,
    // C_trees = C_AGB + C_BGB + C_dead — the sum of the covered pools (docs/methods.md#pools-not-covered)
    treeCarbonMgHa: carbonMgHa + bgbCarbonMgHa + standingDeadCarbonMgHa,
    reportingDbhMinCm,
    reportingStemsHa: atThreshold?.stemsHa ?? null,
    reportingBasalAreaM2Ha: atThreshold?.basalAreaM2Ha ?? null,
    reportingAgbMgHa: atThreshold?.agbMgHa ?? null,
    reportingCarbonMgHa: atThreshold === null ? null : carbonFromBiomass(atThreshold.agbMgHa, carbonFraction),
    agbHeightMeasuredShare: agbShare(heightAgb[HEIGHT_MEASURED]),
    agbHeightModelledShare: agbShare(heightAgb[HEIGHT_MODELLED]),
    agbNoHeightShare: agbShare(heightAgb[HEIGHT_NONE]),
    agbWdSpeciesShare: agbShare(wdAgb.species),
    agbWdGenusShare: agbShare(wdAgb.genus),
    agbWdFamilyShare: agbShare(wdAgb.family),
    agbWdPlotShare: agbShare(wdAgb.plot),
    agbWdDefaultShare: agbShare(wdAgb.default),
  };

  const unresolvedNames = [...unresolved.entries()]
    .map(([name, u]) => ({ name, level: u.level, stems: u.stems }))
    .sort((a, b) => b.stems - a.stems || (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
  const diagnostics: PlotDiagnostics = {
    woodDensityBaShare:
      totalBaHa > 0
        ? {
            species: wdBa.species / totalBaHa,
            genus: wdBa.genus / totalBaHa,
            family: wdBa.family / totalBaHa,
            plot: wdBa.plot / totalBaHa,
            default: wdBa.default / totalBaHa,
          }
        : null,
    heightSourceShare:
      nLive > 0
        ? {
            measured: heightCount[HEIGHT_MEASURED] / nLive,
            modelled: heightCount[HEIGHT_MODELLED] / nLive,
            noHeightModel: heightCount[HEIGHT_NONE] / nLive,
          }
        : null,
    modelledOutsideFitRange: outsideRange,
    liveStemsBelowDbhMin: belowMin,
    standTable: { thresholdCm: reportingDbhMinCm, classes: standTable },
    unresolvedNames,
  };
  const rootShoot: PlotRootShoot = ratio ?? { ratio: 0, sd: 0, row: relation };
  const result: PlotMetricsResult = stemAgbKg ? { metrics, diagnostics, stemAgbKg, stemDeadKg, stemHeightSource, rootShoot } : { metrics, diagnostics };
  // The tree pool's uncertainty also needs the plot's ratio (its row's error is shared) and the dead stems' sums.
  if (moments && deadMoments) {
    result.carbonMoments = { ...moments.build(), rootShoot, deadWood: deadMoments.build() };
  }
  return result;
}
