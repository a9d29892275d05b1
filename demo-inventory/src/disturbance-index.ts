// The per-plot disturbance index as the pipeline defines it (tool defaults of this project, not
// published constants), recomputed here from the generator's own stems so that the planted
// diversity curve can be driven by the index the pipeline will actually see.

/** The parts of a stem the index needs. */
export interface IndexStem {
  readonly dbhCm: number;
  readonly status: 'live' | 'dead' | 'stump';
  readonly stumpCause: 'logged' | 'natural' | 'unknown' | null;
  readonly fireDamage: number;
  readonly inSubplot: boolean;
}

/**
 * DBH = this × the diameter of a stump's cut surface: the pipeline's default stump-to-DBH relation
 * (docs/methods.md#stump-diameter-to-dbh, a = 0, b = 0.8, common practice). Stumps are recorded at their
 * cut surface, as crews measure them.
 */
export const STUMP_DBH_RATIO = 0.8;

/** Basal area at which logging counts as total (removed share 0.5 → score 1), a tool default. */
export const LOGGING_SATURATION_FRAC = 0.5;

// Basal area of a stem, g = π (D / 200)² m² with D in cm (standard mensuration definition; docs/methods.md#basal-area).
export function basalAreaM2(dbhCm: number): number {
  if (!(dbhCm > 0)) throw new RangeError(`basalAreaM2: dbh must be > 0 cm, got ${dbhCm}`);
  const r = dbhCm / 200;
  return Math.PI * r * r;
}

// f = BA(logged stumps at DBH = 0.8 × stump diameter) / (BA(live) + BA(logged stumps)), main plot only (project definition, docs/methods.md#removed-basal-area-fraction); null when both are 0.
export function loggingRemovedBaFrac(stems: readonly IndexStem[]): number | null {
  let live = 0;
  let logged = 0;
  for (const s of stems) {
    if (s.inSubplot) continue;
    if (s.status === 'live') live += basalAreaM2(s.dbhCm);
    else if (s.status === 'stump' && s.stumpCause === 'logged') logged += basalAreaM2(STUMP_DBH_RATIO * s.dbhCm);
  }
  return live + logged > 0 ? logged / (live + logged) : null;
}

// w̄ = Σ gᵢ · fireᵢ / Σ gᵢ over live main-plot stems, g = basal area (project definition); null without live stems.
export function baWeightedFireDamage(stems: readonly IndexStem[]): number | null {
  let weight = 0;
  let sum = 0;
  for (const s of stems) {
    if (s.inSubplot || s.status !== 'live') continue;
    const g = basalAreaM2(s.dbhCm);
    weight += g;
    sum += g * s.fireDamage;
  }
  return weight > 0 ? sum / weight : null;
}

// logging_score = mean(min(1, f / 0.5), class / 3); a missing f leaves the class alone (project definition).
export function loggingScore(removedBaFrac: number | null, loggingClass: number): number {
  checkClass('loggingScore', loggingClass);
  const byClass = loggingClass / 3;
  if (removedBaFrac === null) return byClass;
  return (Math.min(1, removedBaFrac / LOGGING_SATURATION_FRAC) + byClass) / 2;
}

// fire_score = mean(w̄ / 3, class / 3), w̄ the BA-weighted mean fire damage; a missing w̄ leaves the class alone (project definition).
export function fireScore(weightedFireDamage: number | null, fireClass: number): number {
  checkClass('fireScore', fireClass);
  const byClass = fireClass / 3;
  if (weightedFireDamage === null) return byClass;
  return (weightedFireDamage / 3 + byClass) / 2;
}

// disturbance_index = 1 − (1 − logging_score)(1 − fire_score): the chance that either agent disturbed the plot (project definition).
export function disturbanceIndex(logging: number, fire: number): number {
  if (!(logging >= 0 && logging <= 1 && fire >= 0 && fire <= 1)) {
    throw new RangeError(`disturbanceIndex: scores must be in [0, 1], got ${logging}, ${fire}`);
  }
  return 1 - (1 - logging) * (1 - fire);
}

export interface PlotDisturbance {
  readonly loggingRemovedBaFrac: number | null;
  readonly loggingScore: number;
  readonly fireScore: number;
  readonly disturbanceIndex: number;
}

/** All four disturbance figures of one plot from its stems and its field classes. */
export function plotDisturbance(stems: readonly IndexStem[], loggingClass: number, fireClass: number): PlotDisturbance {
  const frac = loggingRemovedBaFrac(stems);
  const logging = loggingScore(frac, loggingClass);
  const fire = fireScore(baWeightedFireDamage(stems), fireClass);
  return { loggingRemovedBaFrac: frac, loggingScore: logging, fireScore: fire, disturbanceIndex: disturbanceIndex(logging, fire) };
}

function checkClass(fn: string, value: number): void {
  if (!(Number.isInteger(value) && value >= 0 && value <= 3)) throw new RangeError(`${fn}: class must be an integer 0..3, got ${value}`);
}
