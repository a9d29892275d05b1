// Diameter at breast height from the diameter of a stump's cut surface. A stump is cut below 1.3 m,
// where the stem is thicker (butt swell), so its diameter read as if it were the DBH overstates the
// basal area that was removed. Formula, default and caveats: docs/methods.md#stump-diameter-to-dbh.

/** A linear relation D = a + b · D_stump (both diameters in cm). */
export interface StumpToDbh {
  /** a, cm. */
  readonly interceptCm: number;
  /** b, cm of DBH per cm of stump diameter. */
  readonly slope: number;
}

/**
 * Default a = 0, b = 0.8: a proportional rule of common practice for stumps cut at about 0.3 m (no
 * single published source; published species relations have slopes mostly between 0.7 and 0.95 from
 * memory). A setting: replace it with a relation fitted to local paired measurements.
 */
export const DEFAULT_STUMP_TO_DBH: Readonly<StumpToDbh> = { interceptCm: 0, slope: 0.8 };

/** Throws unless the relation has a finite intercept and a positive, finite slope. */
export function assertStumpToDbh(fn: string, r: StumpToDbh): void {
  if (!Number.isFinite(r.interceptCm) || !(r.slope > 0) || !Number.isFinite(r.slope)) {
    throw new RangeError(`${fn}: the stump-to-DBH relation needs a finite intercept and a slope > 0 (got a = ${r.interceptCm}, b = ${r.slope})`);
  }
}

// D = a + b · D_stump, linear stump-to-DBH relation (docs/methods.md#stump-diameter-to-dbh; default b = 0.8 common practice)
export function dbhFromStump(stumpDiameterCm: number, relation: StumpToDbh = DEFAULT_STUMP_TO_DBH): number {
  if (!(stumpDiameterCm > 0) || !Number.isFinite(stumpDiameterCm)) {
    throw new RangeError(`dbhFromStump: stump diameter must be a finite number > 0 cm (got ${stumpDiameterCm})`);
  }
  assertStumpToDbh('dbhFromStump', relation);
  const d = relation.interceptCm + relation.slope * stumpDiameterCm;
  if (!(d > 0)) {
    throw new RangeError(`dbhFromStump: the relation D = ${relation.interceptCm} + ${relation.slope} · D_stump gives no positive DBH for a ${stumpDiameterCm} cm stump`);
  }
  return d;
}
