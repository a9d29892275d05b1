// The planted change as a number to compare with what the pipeline recovers: the expected value,
// per forest type, of each plot's annual mortality, annual recruitment and net carbon change under
// the planted process, estimated by simulating many independent plots (another seed than the
// inventory's) and computing each plot's change by the rules of docs/methods.md#change-between-visits
// from the TRUE stems: true species' wood density and the generator's own height curve.

import { agbChave2014, plotChange, type ChangeTree, type ChangeVisit } from '@stemwise/core/science';
import { generatePlot, type TreeStem } from './plot-generator';
import { FOREST_TYPE_PROFILES, FOREST_TYPES, type ForestType } from './scenario';
import { secondVisit } from './second-visit';
import { buildFlora, type Flora } from './species';
import { HEIGHT_CURVE } from './stand';

export interface ExpectedValue {
  readonly mean: number;
  /** Standard error of the simulated mean (Monte Carlo error). */
  readonly se: number;
}

export interface ExpectedChange {
  readonly plots: number;
  readonly mortality_annual: ExpectedValue;
  readonly recruitment_annual: ExpectedValue;
  readonly carbon_net_change_mg_ha_yr: ExpectedValue;
}

export interface ExpectationOptions {
  /** Simulated plots per forest type. */
  readonly plotsPerType: number;
  /** Seed of the simulation; use another than the inventory's, so that the two are independent. */
  readonly seed: number;
}

/** Mean and Monte Carlo SE of each plot's change per forest type, over `plotsPerType` simulated re-measured plots each. */
export function expectedChange(options: ExpectationOptions, flora: Flora = buildFlora()): Record<ForestType, ExpectedChange> {
  const values: Record<ForestType, number[][]> = { wet: [[], [], []], moist: [[], [], []], dry: [[], [], []] };
  const density = woodDensities(flora);
  // Plot i has forest type FOREST_TYPES[i % 3], so 3 × plotsPerType plots give each type its share.
  for (let i = 0; i < FOREST_TYPES.length * options.plotsPerType; i++) {
    const plot = generatePlot({ seed: options.seed, flora, heightsFraction: 0 }, i);
    const next = secondVisit(options.seed, flora, plot, i, true)!;
    const type = plot.row.forestType;
    const asVisit = (date: string, stems: readonly TreeStem[]): ChangeVisit => ({
      surveyDate: date,
      areaHa: plot.row.areaHa,
      dbhMinCm: plot.row.dbhMinCm,
      trees: stems.map((s): ChangeTree => ({
        treeId: s.treeId, dbhCm: s.dbhCm, status: s.status, stumpCause: s.stumpCause, inSubplot: s.inSubplot,
        agbKg: s.status === 'live' ? agbChave2014(density[s.trueSpecies], s.dbhCm, meanHeight(s.dbhCm, type)) : null,
      })),
    });
    const c = plotChange(asVisit(plot.row.surveyDate, plot.stems), asVisit(next.row.surveyDate, next.stems));
    if (c.mortalityAnnual !== null) values[type][0].push(c.mortalityAnnual);
    if (c.recruitmentAnnual !== null) values[type][1].push(c.recruitmentAnnual);
    values[type][2].push(c.carbonNetChangeMgHaYr);
  }
  const out = {} as Record<ForestType, ExpectedChange>;
  for (const t of FOREST_TYPES) {
    const [m, r, c] = values[t];
    out[t] = { plots: options.plotsPerType, mortality_annual: meanSe(m), recruitment_annual: meanSe(r), carbon_net_change_mg_ha_yr: meanSe(c) };
  }
  return out;
}

// Mean height of the generator's curve: exp(a + shift + b ln D + c (ln D)² + σ²/2), the lognormal mean, within its bounds.
function meanHeight(dbhCm: number, type: ForestType): number {
  const l = Math.log(dbhCm);
  const h = Math.exp(HEIGHT_CURVE.a + FOREST_TYPE_PROFILES[type].heightShift + HEIGHT_CURVE.b * l + HEIGHT_CURVE.c * l * l + HEIGHT_CURVE.residualSd ** 2 / 2);
  return Math.min(HEIGHT_CURVE.maxM, 1.1 * dbhCm, Math.max(1.5, 0.2 * dbhCm, h));
}

// A species without a wood density in the reference list takes the mean of its genus, else of the flora.
function woodDensities(flora: Flora): number[] {
  const known = flora.species.filter((s) => s.woodDensity !== null);
  const overall = known.reduce((a, s) => a + (s.woodDensity as number), 0) / known.length;
  const byGenus = new Map<string, number[]>();
  for (const s of known) byGenus.set(s.genus, [...(byGenus.get(s.genus) ?? []), s.woodDensity as number]);
  return flora.species.map((s) => {
    if (s.woodDensity !== null) return s.woodDensity;
    const g = byGenus.get(s.genus);
    return g ? g.reduce((a, b) => a + b, 0) / g.length : overall;
  });
}

// Sample mean and its standard error s/√n.
function meanSe(xs: readonly number[]): ExpectedValue {
  const n = xs.length;
  const mean = xs.reduce((a, b) => a + b, 0) / n;
  const s2 = xs.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1);
  return { mean, se: Math.sqrt(s2 / n) };
}
