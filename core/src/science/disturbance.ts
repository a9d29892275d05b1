// Disturbance scores of a plot visit from logged stumps, stem fire damage and the field classes.
// Formulas and check values: docs/methods.md#disturbance-scores.
// These are stemwise's own documented defaults, NOT published constants or a published index: the
// 0.5 saturation of the removed basal-area fraction and the equal weights of stem evidence and field
// class are choices of this tool, all configurable through DisturbanceOptions. Scores lie in [0, 1].

/** Top of the field scales (logging_class, fire_class, fire_damage are 0..3 in the inventory format). */
export const FIELD_CLASS_MAX = 3;

export interface DisturbanceOptions {
  /** Removed basal-area fraction at which the stump term of logging_score reaches 1. Default 0.5 (stemwise choice). */
  readonly removedFracAtFullScore?: number;
  /** Weight of logging_class/3 in logging_score; the stump term gets 1 − weight. Default 0.5, a plain mean (stemwise choice). */
  readonly loggingClassWeight?: number;
  /** Weight of fire_class/3 in fire_score; the stem fire-damage term gets 1 − weight. Default 0.5, a plain mean (stemwise choice). */
  readonly fireClassWeight?: number;
}

export const DEFAULT_DISTURBANCE_OPTIONS: Readonly<Required<DisturbanceOptions>> = {
  removedFracAtFullScore: 0.5,
  loggingClassWeight: 0.5,
  fireClassWeight: 0.5,
};

function resolveOptions(fn: string, options: DisturbanceOptions): Required<DisturbanceOptions> {
  const o = { ...DEFAULT_DISTURBANCE_OPTIONS, ...options };
  if (!(o.removedFracAtFullScore > 0 && o.removedFracAtFullScore <= 1)) {
    throw new RangeError(`${fn}: removedFracAtFullScore must be in (0, 1] (got ${o.removedFracAtFullScore})`);
  }
  for (const key of ['loggingClassWeight', 'fireClassWeight'] as const) {
    if (!(o[key] >= 0 && o[key] <= 1)) throw new RangeError(`${fn}: ${key} must be in [0, 1] (got ${o[key]})`);
  }
  return o;
}

function assertFieldClass(fn: string, name: string, value: number): void {
  if (!Number.isInteger(value) || value < 0 || value > FIELD_CLASS_MAX) {
    throw new RangeError(`${fn}: ${name} must be an integer 0..${FIELD_CLASS_MAX} (got ${value})`);
  }
}

// f = G_logged stumps / (G_live + G_logged stumps), main plot only — docs/methods.md#removed-basal-area-fraction (stemwise definition); null if both 0
export function loggingRemovedBaFraction(liveBaM2: number, loggedStumpBaM2: number): number | null {
  if (!(liveBaM2 >= 0) || !(loggedStumpBaM2 >= 0) || !Number.isFinite(liveBaM2 + loggedStumpBaM2)) {
    throw new RangeError(
      `loggingRemovedBaFraction: basal areas must be finite and >= 0 (got ${liveBaM2}, ${loggedStumpBaM2})`,
    );
  }
  const total = liveBaM2 + loggedStumpBaM2;
  return total > 0 ? loggedStumpBaM2 / total : null;
}

// L = (1 − w) min(1, f / f_full) + w · class/3, defaults w = 0.5, f_full = 0.5 (f null → 0) — stemwise default, not published
export function loggingScore(removedBaFrac: number | null, loggingClass: number, options: DisturbanceOptions = {}): number {
  const o = resolveOptions('loggingScore', options);
  assertFieldClass('loggingScore', 'logging_class', loggingClass);
  const f = removedBaFrac ?? 0;
  if (!(f >= 0 && f <= 1)) throw new RangeError(`loggingScore: removed basal-area fraction must be in [0, 1] (got ${f})`);
  const stumps = Math.min(1, f / o.removedFracAtFullScore);
  return (1 - o.loggingClassWeight) * stumps + o.loggingClassWeight * (loggingClass / FIELD_CLASS_MAX);
}

// d̄ = Σ gᵢ dᵢ / Σ gᵢ over live stems, 0 when Σ gᵢ = 0 — basal-area-weighted mean fire damage (stemwise definition)
export function basalAreaWeightedFireDamage(fireDamage: readonly number[], basalArea: readonly number[]): number {
  if (fireDamage.length !== basalArea.length) {
    throw new RangeError(
      `basalAreaWeightedFireDamage: arrays differ in length (${fireDamage.length} vs ${basalArea.length})`,
    );
  }
  let sumG = 0;
  let sumGD = 0;
  let dMin = FIELD_CLASS_MAX;
  let dMax = 0;
  for (let i = 0; i < fireDamage.length; i += 1) {
    const d = fireDamage[i];
    const g = basalArea[i];
    if (!(d >= 0 && d <= FIELD_CLASS_MAX)) {
      throw new RangeError(`basalAreaWeightedFireDamage: fire damage must be 0..3 (got ${d} at index ${i})`);
    }
    if (!(g >= 0) || !Number.isFinite(g)) {
      throw new RangeError(`basalAreaWeightedFireDamage: basal area must be finite and >= 0 (got ${g} at index ${i})`);
    }
    sumG += g;
    sumGD += g * d;
    if (g > 0) {
      dMin = Math.min(dMin, d);
      dMax = Math.max(dMax, d);
    }
  }
  // A weighted mean lies between the smallest and largest value; rounding in the sums may step just
  // outside (3.0000000000000004 when every stem has damage 3), which the range checks downstream reject.
  return sumG > 0 ? Math.min(dMax, Math.max(dMin, sumGD / sumG)) : 0;
}

// F = (1 − w) d̄/3 + w · class/3, default w = 0.5 — stemwise default, not published
export function fireScore(weightedFireDamage: number, fireClass: number, options: DisturbanceOptions = {}): number {
  const o = resolveOptions('fireScore', options);
  assertFieldClass('fireScore', 'fire_class', fireClass);
  if (!(weightedFireDamage >= 0 && weightedFireDamage <= FIELD_CLASS_MAX)) {
    throw new RangeError(`fireScore: weighted fire damage must be in [0, 3] (got ${weightedFireDamage})`);
  }
  return (1 - o.fireClassWeight) * (weightedFireDamage / FIELD_CLASS_MAX) + o.fireClassWeight * (fireClass / FIELD_CLASS_MAX);
}

// I = 1 − (1 − L)(1 − F): either disturbance raises the index, as independent events would — stemwise definition
export function disturbanceIndex(loggingScoreValue: number, fireScoreValue: number): number {
  for (const [name, v] of [['logging score', loggingScoreValue], ['fire score', fireScoreValue]] as const) {
    if (!(v >= 0 && v <= 1)) throw new RangeError(`disturbanceIndex: ${name} must be in [0, 1] (got ${v})`);
  }
  return 1 - (1 - loggingScoreValue) * (1 - fireScoreValue);
}
