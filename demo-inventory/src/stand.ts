// The structure of one plot's stand: live stems in a reverse-J diameter distribution, standing dead
// stems, stumps, small stems on the subplot, fire damage and heights — all shaped by the plot's
// latent disturbance so that the disturbance index the pipeline computes follows it.

import { basalAreaM2, LOGGING_SATURATION_FRAC, STUMP_DBH_RATIO, type IndexStem } from './disturbance-index';
import type { Rng } from './random';
import type { ForestTypeProfile } from './scenario';

/** A stem before it has a species or a tag number (an `IndexStem` the generator still fills in). */
export interface StandStem {
  readonly dbhCm: number;
  readonly status: IndexStem['status'];
  readonly stumpCause: IndexStem['stumpCause'];
  readonly inSubplot: boolean;
  fireDamage: number;
  heightM: number | null;
}

export interface Stand {
  readonly stems: StandStem[];
  readonly loggingClass: number;
  readonly fireClass: number;
  /** The plot's logging and fire intensities in [0, 1] (1 − (1 − L)(1 − F) = d); they also raise its change rates. */
  readonly loggingTarget: number;
  readonly fireTarget: number;
}

export interface StandInput {
  readonly profile: ForestTypeProfile;
  readonly areaHa: number;
  readonly subplotAreaHa: number;
  /** Latent disturbance d in [0, 1]. */
  readonly disturbance: number;
  /** Share of d due to logging, in [0, 1]; the rest is fire. */
  readonly loggingShare: number;
  readonly measureHeights: boolean;
}

const MAX_DBH_CM = 250;
const CLASS_NOISE_SD = 0.3;

/** Draws the stand of one plot. */
export function drawStand(input: StandInput, rng: Rng): Stand {
  const { profile, areaHa, subplotAreaHa, disturbance: d, loggingShare } = input;
  // Split d between the two agents so that 1 − (1 − L*)(1 − F*) = d exactly.
  const loggingTarget = 1 - Math.pow(1 - d, loggingShare);
  const fireTarget = 1 - Math.pow(1 - d, 1 - loggingShare);

  const stems: StandStem[] = [];
  const nLive = rng.negativeBinomial(areaHa * profile.stemsPerHa * (1 - 0.25 * d), profile.stemsSize);
  const excessMean = profile.dbhExcessMeanCm * (1 - 0.15 * d);
  let liveBa = 0;
  for (let i = 0; i < nLive; i++) {
    const dbh = rng.chance(profile.emergentShare) ? cm(60 + rng.exponential(35)) : cm(10 + rng.exponential(excessMean));
    liveBa += basalAreaM2(dbh);
    stems.push(stem(dbh, 'live', null, false));
  }

  // Field classes are noisy readings of each agent; the measured part makes up the difference.
  const loggingClass = fieldClass(loggingTarget, rng);
  const removedNormTarget = clamp01(2 * loggingTarget - loggingClass / 3);
  const removedFrac = LOGGING_SATURATION_FRAC * removedNormTarget;
  addLoggedStumps(stems, (removedFrac / (1 - removedFrac)) * liveBa, rng);

  const fireClass = fieldClass(fireTarget, rng);
  const meanDamage = 3 * clamp01(2 * fireTarget - fireClass / 3);
  const damageP = meanDamage / 3;
  for (const s of stems) if (s.status === 'live') s.fireDamage = rng.binomial(3, damageP);

  const nDead = rng.poisson(areaHa * (profile.deadPerHa + 70 * fireTarget + 15 * loggingTarget));
  for (let i = 0; i < nDead; i++) {
    const burnt = fireClass > 0 ? Math.min(3, rng.binomial(3, damageP) + 1) : 0;
    stems.push(stem(cm(10 + rng.exponential(excessMean * 1.2)), 'dead', null, false, burnt));
  }
  const nNatural = rng.poisson(areaHa * 3);
  for (let i = 0; i < nNatural; i++) stems.push(stem(cm(10 + rng.exponential(15)), 'stump', 'natural', false));
  const nUnknown = rng.poisson(areaHa * (0.5 + 4 * loggingTarget));
  for (let i = 0; i < nUnknown; i++) stems.push(stem(cm(20 + rng.exponential(20)), 'stump', 'unknown', false));

  if (subplotAreaHa > 0) {
    // Gaps let small stems in: more of them where the canopy was opened.
    const nSmall = rng.poisson(subplotAreaHa * profile.smallStemsPerHa * (1 + 0.4 * d));
    for (let i = 0; i < nSmall; i++) stems.push(stem(smallDbh(rng), 'live', null, true, rng.binomial(3, damageP)));
    const nSmallDead = rng.poisson(subplotAreaHa * (40 + 60 * fireTarget));
    for (let i = 0; i < nSmallDead; i++) stems.push(stem(smallDbh(rng), 'dead', null, true, fireClass > 0 ? rng.binomial(3, damageP) : 0));
  }

  if (input.measureHeights) {
    for (const s of stems) if (s.status === 'live') s.heightM = drawHeight(s.dbhCm, profile.heightShift, rng);
  }
  return { stems, loggingClass, fireClass, loggingTarget, fireTarget };
}

// Logged stumps (commercial sizes, 30 cm and up) until their basal area is as close as it gets to the target.
function addLoggedStumps(stems: StandStem[], targetBa: number, rng: Rng): void {
  let sum = 0;
  while (sum < targetBa) {
    const dbh = cm(30 + rng.exponential(20));
    const g = basalAreaM2(dbh);
    if (sum + g - targetBa > targetBa - sum) break;
    sum += g;
    // The felled tree had this DBH; the crew records the wider cut surface of its stump (to 0.1 cm),
    // which the pipeline converts back (docs/methods.md#stump-diameter-to-dbh).
    stems.push(stem(Math.round((dbh / STUMP_DBH_RATIO) * 10) / 10, 'stump', 'logged', false));
  }
}

function fieldClass(target: number, rng: Rng): number {
  return Math.min(3, Math.max(0, Math.round(3 * target + rng.normal(0, CLASS_NOISE_SD))));
}

// Subplot stems 5–10 cm: the same falling exponential, truncated below the main plot's 10 cm limit.
export function smallDbh(rng: Rng): number {
  for (;;) {
    const dbh = cm(5 + rng.exponential(3));
    if (dbh < 10) return dbh;
  }
}

/** Height–diameter curve of the demo: ln H = a + shift + b ln D + c (ln D)², H in m, D in cm. */
export const HEIGHT_CURVE = { a: -0.4236, b: 1.4057, c: -0.1163, residualSd: 0.15, maxM: 55 } as const;

// ln H = a + b ln D + c (ln D)² + ε, the form of Chave et al. 2014 (Glob. Change Biol. 20:3177) eq. 6a with demo coefficients; kept within 0.2·D ≤ H ≤ 1.1·D (slenderness 20–110, common practice) and H ≤ 55 m.
export function drawHeight(dbhCm: number, shift: number, rng: Rng): number {
  const lnD = Math.log(dbhCm);
  let eps = rng.normal(0, HEIGHT_CURVE.residualSd);
  while (Math.abs(eps) > 2.5 * HEIGHT_CURVE.residualSd) eps = rng.normal(0, HEIGHT_CURVE.residualSd);
  const h = Math.exp(HEIGHT_CURVE.a + shift + HEIGHT_CURVE.b * lnD + HEIGHT_CURVE.c * lnD * lnD + eps);
  // Bounds rounded inwards to the decimetre, so the written value stays inside them.
  const upper = Math.floor(Math.min(HEIGHT_CURVE.maxM, 1.1 * dbhCm) * 10) / 10;
  const lower = Math.ceil(Math.max(1.5, 0.2 * dbhCm) * 10) / 10;
  return Math.min(upper, Math.max(lower, Math.round(h * 10) / 10));
}

export function stem(dbhCm: number, status: StandStem['status'], stumpCause: StandStem['stumpCause'], inSubplot: boolean, fireDamage = 0): StandStem {
  return { dbhCm, status, stumpCause, fireDamage, inSubplot, heightM: null };
}

// Diameters are read to the millimetre below (tape practice), capped at 250 cm.
export function cm(x: number): number {
  return Math.floor(Math.min(MAX_DBH_CM, x) * 10) / 10;
}

function clamp01(x: number): number {
  return Math.min(1, Math.max(0, x));
}
