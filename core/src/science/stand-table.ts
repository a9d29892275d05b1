// Figures at one reporting threshold and stand tables by diameter class, so that plots measured with
// different diameter minima (and with or without a nested subplot) give comparable per-hectare
// figures. Rules and check values: docs/methods.md#reporting-threshold and docs/methods.md#stand-tables.

/** Default reporting threshold, cm (a setting): the usual lower diameter limit of tropical inventory plots, common practice. */
export const DEFAULT_REPORTING_DBH_MIN_CM = 10;
/** Width of the stand-table classes, cm. */
export const DIAMETER_CLASS_WIDTH_CM = 10;
/** The last, open class starts at the first class bound at or above this diameter, cm. */
export const OPEN_CLASS_FROM_CM = 100;

/** lowerCm ≤ D < upperCm; upperCm null for the open top class. */
export interface DiameterClass {
  readonly lowerCm: number;
  readonly upperCm: number | null;
}

function assertThreshold(fn: string, thresholdCm: number): void {
  if (!(thresholdCm > 0) || !Number.isFinite(thresholdCm)) {
    throw new RangeError(`${fn}: the reporting threshold must be a finite number > 0 cm (got ${thresholdCm})`);
  }
}

// Classes [T + 10k, T + 10(k + 1)) from the reporting threshold T, the last open from the first bound ≥ 100 cm — stemwise choice (docs/methods.md#stand-tables)
export function diameterClasses(thresholdCm: number): DiameterClass[] {
  assertThreshold('diameterClasses', thresholdCm);
  const out: DiameterClass[] = [];
  let lower = thresholdCm;
  while (lower < OPEN_CLASS_FROM_CM) {
    out.push({ lowerCm: lower, upperCm: lower + DIAMETER_CLASS_WIDTH_CM });
    lower += DIAMETER_CLASS_WIDTH_CM;
  }
  out.push({ lowerCm: lower, upperCm: null });
  return out;
}

// D_from = min(dbh_min, subplot_dbh_min) with a subplot, dbh_min without: every live stem from it up was measured on some area (docs/methods.md#reporting-threshold)
export function measuredFromCm(dbhMinCm: number, subplotAreaHa: number, subplotDbhMinCm: number): number {
  for (const [name, v] of [['dbh_min_cm', dbhMinCm], ['subplot_area_ha', subplotAreaHa], ['subplot_dbh_min_cm', subplotDbhMinCm]] as const) {
    if (!(v >= 0) || !Number.isFinite(v)) throw new RangeError(`measuredFromCm: ${name} must be a finite number >= 0 (got ${v})`);
  }
  return subplotAreaHa > 0 ? Math.min(dbhMinCm, subplotDbhMinCm) : dbhMinCm;
}

/** Per-hectare figures of a set of stems: stems/ha, basal area m²/ha, AGB Mg/ha. */
export interface StandFigures {
  readonly stemsHa: number;
  readonly basalAreaM2Ha: number;
  readonly agbMgHa: number;
}

/** The included live stems of a plot: diameter (cm), expansion factor (stems/ha), basal area (m²) and AGB (kg) of each. */
export interface ExpandedStems {
  readonly dbhCm: readonly number[];
  readonly weight: readonly number[];
  readonly basalAreaM2: readonly number[];
  readonly agbKg: readonly number[];
}

function assertStems(fn: string, s: ExpandedStems): void {
  const n = s.dbhCm.length;
  if (s.weight.length !== n || s.basalAreaM2.length !== n || s.agbKg.length !== n) {
    throw new RangeError(`${fn}: stem arrays differ in length (${n}, ${s.weight.length}, ${s.basalAreaM2.length}, ${s.agbKg.length})`);
  }
}

// N/ha = Σ wᵢ, G/ha = Σ wᵢ gᵢ, AGB/ha = Σ wᵢ Bᵢ / 1000 over stems with lower ≤ Dᵢ < upper (forest mensuration; docs/methods.md#stand-tables)
export function figuresInRange(stems: ExpandedStems, lowerCm: number, upperCm: number | null): StandFigures {
  assertStems('figuresInRange', stems);
  let n = 0;
  let g = 0;
  let b = 0;
  for (let i = 0; i < stems.dbhCm.length; i += 1) {
    const d = stems.dbhCm[i];
    if (d < lowerCm || (upperCm !== null && d >= upperCm)) continue;
    const w = stems.weight[i];
    n += w;
    g += w * stems.basalAreaM2[i];
    b += w * stems.agbKg[i];
  }
  return { stemsHa: n, basalAreaM2Ha: g, agbMgHa: b / 1000 };
}

// Figures of stems ≥ T, null when the plot did not measure every stem from T up (D_from > T) — docs/methods.md#reporting-threshold
export function figuresAtThreshold(stems: ExpandedStems, thresholdCm: number, fromCm: number): StandFigures | null {
  assertThreshold('figuresAtThreshold', thresholdCm);
  return fromCm > thresholdCm ? null : figuresInRange(stems, thresholdCm, null);
}

/** One plot's stand table: per class of `diameterClasses(T)`, its figures, or null where the plot did not measure the class. */
export type PlotStandTable = (StandFigures | null)[];

// Per class [L, U): figures of the stems in it, null when L < D_from (the class was not measured on this plot) — docs/methods.md#stand-tables
export function plotStandTable(stems: ExpandedStems, classes: readonly DiameterClass[], fromCm: number): PlotStandTable {
  assertStems('plotStandTable', stems);
  const k = classes.length;
  const n = new Array<number>(k).fill(0);
  const g = new Array<number>(k).fill(0);
  const b = new Array<number>(k).fill(0);
  // One pass: classes are contiguous and sorted, so a stem's class is the last whose lower bound it reaches.
  for (let i = 0; i < stems.dbhCm.length; i += 1) {
    const d = stems.dbhCm[i];
    if (k === 0 || d < classes[0].lowerCm) continue;
    let c = k - 1;
    while (c > 0 && d < classes[c].lowerCm) c -= 1;
    const upper = classes[c].upperCm;
    if (upper !== null && d >= upper) continue;
    const w = stems.weight[i];
    n[c] += w;
    g[c] += w * stems.basalAreaM2[i];
    b[c] += w * stems.agbKg[i];
  }
  return classes.map((c, j) => (c.lowerCm < fromCm ? null : { stemsHa: n[j], basalAreaM2Ha: g[j], agbMgHa: b[j] / 1000 }));
}
