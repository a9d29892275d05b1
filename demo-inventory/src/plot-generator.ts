// One plot visit of the demo inventory: where and when it was measured, its latent disturbance,
// its stand, its realised disturbance index, and the species its crew recorded.

import { crpPartition, SpeciesPool } from './community';
import { plotDisturbance, type PlotDisturbance } from './disturbance-index';
import { PLANTED_CURVES, plantedAlpha } from './planted-curves';
import { rngFor, type Rng } from './random';
import { FOREST_TYPE_PROFILES, FOREST_TYPES, REGIONS, SURVEY_YEARS, type ForestType, type Region } from './scenario';
import type { Flora } from './species';
import { drawStand, type StandStem } from './stand';

export interface PlotRow {
  readonly plotId: string;
  readonly region: string;
  readonly forestType: ForestType;
  readonly latitude: number;
  readonly longitude: number;
  readonly areaHa: number;
  readonly dbhMinCm: number;
  readonly subplotAreaHa: number;
  readonly subplotDbhMinCm: number;
  readonly surveyDate: string;
  readonly loggingClass: number;
  readonly fireClass: number;
  readonly elevationM: number;
}

export interface TreeStem extends StandStem {
  /** Tag number, unique within the plot. */
  readonly treeId: string;
  /** The name as the crew wrote it: accepted name, synonym, unlisted name, or an unidentified form. */
  readonly species: string;
  /** The stem's true species (index into the flora), known to the generator only. */
  readonly trueSpecies: number;
  /** True when the name identifies the species (counts for diversity). */
  readonly identified: boolean;
}

export interface GeneratedPlot {
  readonly row: PlotRow;
  readonly regionCode: string;
  readonly stems: readonly TreeStem[];
  readonly latentDisturbance: number;
  readonly realised: PlotDisturbance;
  readonly targetAlpha: number;
  /** Logging and fire intensities of the plot in [0, 1]: they shape its stand and raise its change rates. */
  readonly loggingIntensity: number;
  readonly fireIntensity: number;
  /** Whether the crew measured heights, and the share of main-plot stems it leaves unidentified. */
  readonly measureHeights: boolean;
  readonly unidentifiedShare: number;
}

export interface PlotContext {
  readonly seed: number;
  readonly flora: Flora;
  /** Share of plots whose live stems have heights, in [0, 1]. */
  readonly heightsFraction: number;
}

const SUBPLOT_SHARE_OF_AREA = 0.1;
const NO_SUBPLOT_SHARE = 0.04;
const SYNONYM_USE = 0.12;
export const DAY_MS = 86_400_000;
const FIRST_DAY = Date.UTC(SURVEY_YEARS[0], 0, 1);
const SURVEY_DAYS = (Date.UTC(SURVEY_YEARS[1], 11, 31) - FIRST_DAY) / DAY_MS + 1;
const REGION_WEIGHTS: Readonly<Record<ForestType, readonly number[]>> = {
  wet: REGIONS.map((r) => r.forestAreaHa.wet),
  moist: REGIONS.map((r) => r.forestAreaHa.moist),
  dry: REGIONS.map((r) => r.forestAreaHa.dry),
};

/** Plot `index` (0-based) of the inventory with seed `ctx.seed`; independent of every other plot. */
export function generatePlot(ctx: PlotContext, index: number): GeneratedPlot {
  const rng = rngFor(ctx.seed, 'plot', index);
  // Equal allocation to forest types (each gets a third of the plots); regions by forest area.
  const forestType = FOREST_TYPES[index % FOREST_TYPES.length];
  const profile = FOREST_TYPE_PROFILES[forestType];
  const region = REGIONS[rng.weightedIndex(REGION_WEIGHTS[forestType])];
  const areaHa = rng.chance(region.halfHectareShare) ? 0.5 : 1;
  const subplotAreaHa = rng.chance(NO_SUBPLOT_SHARE) ? 0 : areaHa * SUBPLOT_SHARE_OF_AREA;
  const place = drawPlace(region, rng);

  const d = rng.beta(profile.disturbanceBeta[0], profile.disturbanceBeta[1]);
  const m = profile.loggingShareMean;
  const loggingShare = rng.beta(6 * m, 6 * (1 - m));
  const measureHeights = rng.chance(ctx.heightsFraction);
  const stand = drawStand({ profile, areaHa, subplotAreaHa, disturbance: d, loggingShare, measureHeights }, rng);
  const realised = plotDisturbance(stand.stems, stand.loggingClass, stand.fireClass);
  const targetAlpha =
    plantedAlpha(forestType, realised.disturbanceIndex) * Math.exp(rng.normal(0, PLANTED_CURVES[forestType].noiseSdLog));
  const unidentifiedShare = rng.uniform(0.02, 0.08);
  const stems = nameStems(ctx.flora, new SpeciesPool(ctx.flora, forestType, realised.disturbanceIndex), stand.stems, targetAlpha, unidentifiedShare, rng);

  const row: PlotRow = {
    plotId: `${region.code}-${String(index + 1).padStart(5, '0')}`,
    region: region.name,
    forestType,
    latitude: place.latitude,
    longitude: place.longitude,
    areaHa,
    dbhMinCm: 10,
    subplotAreaHa,
    subplotDbhMinCm: 5,
    surveyDate: place.surveyDate,
    loggingClass: stand.loggingClass,
    fireClass: stand.fireClass,
    elevationM: place.elevationM,
  };
  return {
    row, regionCode: region.code, stems, latentDisturbance: d, realised, targetAlpha,
    loggingIntensity: stand.loggingTarget, fireIntensity: stand.fireTarget, measureHeights, unidentifiedShare,
  };
}

function drawPlace(region: Region, rng: Rng): { latitude: number; longitude: number; elevationM: number; surveyDate: string } {
  const margin = 0.02;
  return {
    latitude: round(rng.uniform(region.latMin + margin, region.latMax - margin), 5),
    longitude: round(rng.uniform(region.lonMin + margin, region.lonMax - margin), 5),
    elevationM: Math.round(rng.uniform(region.elevationM[0], region.elevationM[1])),
    surveyDate: new Date(FIRST_DAY + rng.int(SURVEY_DAYS) * DAY_MS).toISOString().slice(0, 10),
  };
}

// Live main-plot stems the crew identified get their species from a Chinese restaurant process with
// the plot's target alpha (so their Fisher's alpha follows it); every other stem draws from the pool.
function nameStems(flora: Flora, pool: SpeciesPool, stand: readonly StandStem[], targetAlpha: number, unidentifiedShare: number, rng: Rng): TreeStem[] {
  const identifiedMain: number[] = [];
  const identified = stand.map((s, i) => {
    const p = s.status === 'live' ? (s.inSubplot ? 0.85 : 1 - unidentifiedShare) : s.stumpCause === 'logged' ? 0.7 : s.status === 'dead' ? 0.45 : 0.3;
    const known = rng.chance(p);
    if (known && s.status === 'live' && !s.inSubplot) identifiedMain.push(i);
    return known;
  });
  const trueSpecies = stand.map(() => -1);
  const partition = crpPartition(identifiedMain.length, targetAlpha, rng);
  const founders = pool.drawDistinct(partition.species, rng);
  identifiedMain.forEach((stemIndex, k) => {
    trueSpecies[stemIndex] = founders[partition.labels[k]];
  });
  for (let i = 0; i < stand.length; i++) if (trueSpecies[i] < 0) trueSpecies[i] = pool.draw(rng);

  const order = rng.shuffleInPlace(stand.map((_, i) => i));
  return order.map((i, tag) => ({
    dbhCm: stand[i].dbhCm,
    status: stand[i].status,
    stumpCause: stand[i].stumpCause,
    inSubplot: stand[i].inSubplot,
    fireDamage: stand[i].fireDamage,
    heightM: stand[i].heightM,
    treeId: String(tag + 1),
    species: identified[i] ? writtenName(flora, trueSpecies[i], rng) : unidentifiedName(flora, trueSpecies[i], rng),
    trueSpecies: trueSpecies[i],
    identified: identified[i],
  }));
}

export function writtenName(flora: Flora, species: number, rng: Rng): string {
  const s = flora.species[species];
  return s.synonyms.length > 0 && rng.chance(SYNONYM_USE) ? rng.choice(s.synonyms) : s.name;
}

// The forms crews write for a stem they could not name: blank, indet, unknown, or the genus with sp.
export function unidentifiedName(flora: Flora, species: number, rng: Rng): string {
  const u = rng.next();
  if (u < 0.35) return '';
  if (u < 0.6) return 'indet';
  if (u < 0.7) return 'Indet';
  if (u < 0.78) return 'unknown';
  return `${flora.species[species].genus} sp.`;
}

function round(x: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
}
