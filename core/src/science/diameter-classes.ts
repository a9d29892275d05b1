// The diameter distribution of one plot visit: live stems per hectare and basal area per hectare by
// diameter class, each stem expanded by the area it was measured on (docs/methods.md#expansion-factors).

import { basalAreaM2 } from './structure';

export interface DiameterClass {
  /** Lower bound, cm (inclusive). */
  readonly lowerCm: number;
  /** Upper bound, cm (exclusive); null for the open top class. */
  readonly upperCm: number | null;
  readonly stemsHa: number;
  readonly basalAreaM2Ha: number;
  /** Stems recorded in the class (not expanded). */
  readonly stems: number;
}

/**
 * Classes of `widthCm` from `startCm` (the lowest diameter measured on the visit); the first class ends at
 * the next multiple of the width, so a 5 cm subplot minimum gives 5–10, 10–20, …; stems at or above
 * `topCm` form one open class. Empty classes between occupied ones are kept (a gap is information).
 */
// N/ha per class = Σ wᵢ and G/ha per class = Σ wᵢ π (Dᵢ/200)² over the stems of the class — the stand table (forest mensuration; docs/methods.md#diameter-distribution-of-a-plot)
export function diameterClasses(dbhCm: readonly number[], weights: readonly number[], startCm: number, widthCm = 10, topCm = 100): DiameterClass[] {
  if (dbhCm.length !== weights.length) throw new RangeError(`diameterClasses: dbh and weight arrays differ in length (${dbhCm.length} vs ${weights.length})`);
  if (!(widthCm > 0) || !(startCm >= 0) || !(topCm > startCm)) throw new RangeError(`diameterClasses: need width > 0 and 0 <= start < top (got ${widthCm}, ${startCm}, ${topCm})`);
  const bounds: number[] = [startCm];
  for (let b = (Math.floor(startCm / widthCm) + 1) * widthCm; b < topCm; b += widthCm) bounds.push(b);
  bounds.push(topCm);
  const n = bounds.length; // the last bound opens the top class
  const stemsHa = new Array<number>(n).fill(0);
  const ba = new Array<number>(n).fill(0);
  const count = new Array<number>(n).fill(0);
  let last = -1;
  for (let i = 0; i < dbhCm.length; i++) {
    const d = dbhCm[i];
    const w = weights[i];
    if (!(w >= 0) || !Number.isFinite(w)) throw new RangeError(`diameterClasses: expansion factors must be finite and >= 0 (got ${w} at index ${i})`);
    if (d < startCm) throw new RangeError(`diameterClasses: dbh ${d} cm at index ${i} is below the first class (${startCm} cm)`);
    let k = n - 1;
    while (k > 0 && d < bounds[k]) k--;
    stemsHa[k] += w;
    ba[k] += w * basalAreaM2(d);
    count[k] += 1;
    if (k > last) last = k;
  }
  const out: DiameterClass[] = [];
  for (let k = 0; k <= last; k++) out.push({ lowerCm: bounds[k], upperCm: k === n - 1 ? null : bounds[k + 1], stemsHa: stemsHa[k], basalAreaM2Ha: ba[k], stems: count[k] });
  return out;
}
