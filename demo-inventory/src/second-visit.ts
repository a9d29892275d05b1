// The second visit of a demo plot, simulated forward from the first with the planted rates of its
// forest type (planted-change.ts): trees die (standing dead, or fallen and not found), stems of
// commercial size are felled (logged stumps), survivors grow, subplot stems grow into the main plot
// and new trees recruit under new tags. Fisher's alpha of the identified live main-plot stems keeps
// the plot's target: recruits continue the plot's Chinese restaurant process, deaths are blind to species.

import { SpeciesPool } from './community';
import { plotDisturbance, STUMP_DBH_RATIO, type PlotDisturbance } from './disturbance-index';
import { DAY_MS, type GeneratedPlot, type PlotRow, type TreeStem, unidentifiedName, writtenName } from './plot-generator';
import { PLANTED_CHANGE, plotRates, REVISIT } from './planted-change';
import { rngFor, type Rng } from './random';
import { FOREST_TYPE_PROFILES } from './scenario';
import type { Flora } from './species';
import { cm, drawHeight, smallDbh } from './stand';

export interface SecondVisit {
  readonly row: PlotRow;
  readonly stems: readonly TreeStem[];
  readonly years: number;
  /** The disturbance index of the second visit, computed as the pipeline does. */
  readonly realised: PlotDisturbance;
}

const MAIN_DBH_MIN_CM = 10;
// The tape reads the same stem a little differently; a survivor never reads more than 0.5 cm smaller.
const MAX_SHRINK_CM = 0.5;

/** The second visit of `plot` (plot `index` of the inventory with `seed`), or null for a plot measured once. */
export function secondVisit(seed: number, flora: Flora, plot: GeneratedPlot, index: number, always = false): SecondVisit | null {
  const rng = rngFor(seed, 'second-visit', index);
  if (!rng.chance(REVISIT.share) && !always) return null;
  const days = Math.round(rng.uniform(REVISIT.yearsMin, REVISIT.yearsMax) * 365.25);
  const years = days / 365.25;
  const type = plot.row.forestType;
  const profile = FOREST_TYPE_PROFILES[type];
  const rates = plotRates(type, plot.loggingIntensity, plot.fireIntensity);
  const pDie = 1 - Math.exp(-rates.death * years);
  const pFelled = 1 - Math.exp(-rates.harvest * years);
  const heightOf = (dbh: number): number | null => (plot.measureHeights ? drawHeight(dbh, profile.heightShift, rng) : null);

  const stems: TreeStem[] = [];
  let nLiveMain = 0;
  let lastTag = 0;
  let ingrowth = 0;
  for (const s of plot.stems) {
    lastTag = Math.max(lastTag, Number(s.treeId));
    if (s.status === 'stump') {
      stems.push(s);
      continue;
    }
    if (s.status === 'dead') {
      if (!rng.chance(REVISIT.oldDeadFallenShare)) stems.push(s);
      continue;
    }
    if (!s.inSubplot) nLiveMain += 1;
    if (!s.inSubplot && s.dbhCm >= REVISIT.harvestMinDbhCm && rng.chance(pFelled)) {
      // The crew records the wider cut surface of the stump (to 0.1 cm), as at the first visit (stand.ts).
      stems.push({ ...s, dbhCm: Math.round((s.dbhCm / STUMP_DBH_RATIO) * 10) / 10, status: 'stump', stumpCause: 'logged', fireDamage: 0, heightM: null });
      continue;
    }
    if (rng.chance(pDie)) {
      if (!rng.chance(REVISIT.fallenShare)) stems.push({ ...s, status: 'dead', heightM: null });
      continue;
    }
    const mean = rates.growthCmYr * (1 - PLANTED_CHANGE[type].growthLossPerFireDamage * s.fireDamage) * (s.inSubplot ? 0.6 : 1);
    // A lognormal spread about the mean (mean kept: exp(N(−σ²/2, σ))), and the tape's error.
    const grown = mean * years * Math.exp(rng.normal(-(REVISIT.growthSdLog ** 2) / 2, REVISIT.growthSdLog)) + rng.normal(0, REVISIT.remeasureSdCm);
    const dbh = cm(Math.max(s.dbhCm - MAX_SHRINK_CM, s.dbhCm + grown));
    // A subplot stem that reached 10 cm is now a main-plot stem (ingrowth, a recruit).
    const inSubplot = s.inSubplot && dbh < MAIN_DBH_MIN_CM;
    if (s.inSubplot && !inSubplot) ingrowth += 1;
    stems.push({ ...s, dbhCm: dbh, inSubplot, heightM: heightOf(dbh) });
  }

  const pool = new SpeciesPool(flora, type, plot.realised.disturbanceIndex);
  const tag = (): string => String(++lastTag);
  // Recruits into 10 cm on the main plot: those grown in from the subplot count towards the draw.
  const recruits = Math.max(0, rng.poisson(nLiveMain * rates.recruitment * years) - ingrowth);
  const crp = crpState(stems);
  for (let i = 0; i < recruits; i++) {
    const dbh = cm(MAIN_DBH_MIN_CM + rng.exponential(1.5));
    const identified = rng.chance(1 - plot.unidentifiedShare);
    const species = identified ? crp.next(plot.targetAlpha, pool, rng) : pool.draw(rng);
    stems.push(newStem(flora, tag(), dbh, false, species, identified, heightOf(dbh), rng));
  }
  if (plot.row.subplotAreaHa > 0) {
    const n = rng.poisson(plot.row.subplotAreaHa * profile.smallStemsPerHa * REVISIT.subplotIngrowth * years);
    for (let i = 0; i < n; i++) {
      const dbh = smallDbh(rng);
      const identified = rng.chance(0.85);
      stems.push(newStem(flora, tag(), dbh, true, pool.draw(rng), identified, heightOf(dbh), rng));
    }
  }

  const date = new Date(Date.parse(plot.row.surveyDate) + days * DAY_MS).toISOString().slice(0, 10);
  return {
    row: { ...plot.row, surveyDate: date },
    stems,
    years,
    realised: plotDisturbance(stems, plot.row.loggingClass, plot.row.fireClass),
  };
}

// The Chinese restaurant process of the plot continued: a new identified stem founds a new species
// with probability θ/(θ + n), else joins species k with probability n_k/(θ + n) (Ewens 1972).
function crpState(stems: readonly TreeStem[]): { next(theta: number, pool: SpeciesPool, rng: Rng): number } {
  const members: number[] = [];
  const present = new Set<number>();
  for (const s of stems) {
    if (s.status === 'live' && !s.inSubplot && s.identified) {
      members.push(s.trueSpecies);
      present.add(s.trueSpecies);
    }
  }
  return {
    next(theta, pool, rng) {
      let species: number;
      if (members.length === 0 || rng.next() * (theta + members.length) < theta) {
        species = pool.draw(rng);
        for (let tries = 0; present.has(species) && tries < 60; tries++) species = pool.draw(rng);
      } else species = members[rng.int(members.length)];
      members.push(species);
      present.add(species);
      return species;
    },
  };
}

function newStem(flora: Flora, treeId: string, dbhCm: number, inSubplot: boolean, species: number, identified: boolean, heightM: number | null, rng: Rng): TreeStem {
  return {
    dbhCm, status: 'live', stumpCause: null, inSubplot, fireDamage: 0, heightM, treeId,
    species: identified ? writtenName(flora, species, rng) : unidentifiedName(flora, species, rng),
    trueSpecies: species,
    identified,
  };
}
