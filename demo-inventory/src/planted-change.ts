// The planted change between visits: how often trees die, are logged and recruit, and how fast they
// grow, per forest type, raised by the plot's logging and fire intensities. Invented for the demo,
// taken from no study (the ranges are common practice for tropical permanent plots, from memory:
// 1–3 % of trees dying a year, diameter growth of a few millimetres a year).

import type { ForestType } from './scenario';

export interface PlantedChange {
  /** Natural death hazard per tree and year in undisturbed forest (instantaneous rate, 1/yr). */
  readonly mortality: number;
  /** Added share of the death hazard at full logging (L = 1) and at full fire (F = 1). */
  readonly mortalityLogging: number;
  readonly mortalityFire: number;
  /** Hazard per year × L of a live stem of 30 cm and more being felled (a logged stump at the next visit). */
  readonly harvest: number;
  /** Recruits into 10 cm per live main-plot stem of the first visit and year in undisturbed forest. */
  readonly recruitment: number;
  /** Added share of recruitment at full logging and at full fire (gaps let recruits in). */
  readonly recruitmentLogging: number;
  readonly recruitmentFire: number;
  /** Mean diameter increment of a live stem (cm/yr) in undisturbed forest. */
  readonly growthCmYr: number;
  /** Added share of growth at full logging (released trees grow faster). */
  readonly growthLogging: number;
  /** Share of growth lost per class of fire damage (0–3) of the stem. */
  readonly growthLossPerFireDamage: number;
}

export const PLANTED_CHANGE: Readonly<Record<ForestType, PlantedChange>> = {
  wet: {
    mortality: 0.011, mortalityLogging: 0.5, mortalityFire: 1.0, harvest: 0.03,
    recruitment: 0.014, recruitmentLogging: 0.8, recruitmentFire: 0.5,
    growthCmYr: 0.4, growthLogging: 0.4, growthLossPerFireDamage: 0.15,
  },
  moist: {
    mortality: 0.013, mortalityLogging: 0.5, mortalityFire: 1.0, harvest: 0.03,
    recruitment: 0.016, recruitmentLogging: 0.7, recruitmentFire: 0.6,
    growthCmYr: 0.33, growthLogging: 0.35, growthLossPerFireDamage: 0.15,
  },
  dry: {
    mortality: 0.017, mortalityLogging: 0.4, mortalityFire: 0.8, harvest: 0.02,
    recruitment: 0.018, recruitmentLogging: 0.5, recruitmentFire: 0.8,
    growthCmYr: 0.22, growthLogging: 0.3, growthLossPerFireDamage: 0.15,
  },
};

/** The design of the second visit: which plots, when, and how the crews record trees that died. */
export const REVISIT = {
  /** Share of plots measured a second time. */
  share: 0.85,
  /** Interval between the visits, in years (uniform). */
  yearsMin: 4,
  yearsMax: 6,
  /** Share of trees dying in the interval that have fallen and are not found (absent at the second visit). */
  fallenShare: 0.15,
  /** Share of stems standing dead at the first visit that have fallen by the second (absent). */
  oldDeadFallenShare: 0.3,
  /** Smallest diameter a tree is felled at (commercial size), cm. */
  harvestMinDbhCm: 30,
  /** Sd (lognormal, ln scale) of a tree's growth about the plot's mean; sd of the tape's re-measurement error (cm). */
  growthSdLog: 0.5,
  remeasureSdCm: 0.15,
  /** New subplot stems (5–10 cm) per year as a share of the forest type's small stems per ha. */
  subplotIngrowth: 0.03,
} as const;

/** The plot's rates: hazards per year, recruits per stem and year, mean growth in cm/yr. */
export function plotRates(type: ForestType, logging: number, fire: number): { death: number; harvest: number; recruitment: number; growthCmYr: number } {
  const c = PLANTED_CHANGE[type];
  return {
    death: c.mortality * (1 + c.mortalityLogging * logging + c.mortalityFire * fire),
    harvest: c.harvest * logging,
    recruitment: c.recruitment * (1 + c.recruitmentLogging * logging + c.recruitmentFire * fire),
    growthCmYr: c.growthCmYr * (1 + c.growthLogging * logging),
  };
}
