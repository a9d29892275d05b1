// Stand structure per hectare from stem diameters and per-stem expansion factors.
// Each stem carries its own expansion factor w (stems per hectare it stands for): 1/area_ha on the
// main plot, 1/subplot_area_ha on the nested subplot (docs/methods.md#expansion-factors).
// Formulas and check values: docs/methods.md#stand-structure.

// g = π (D/200)² m², D = dbh in cm — basal area of a stem (docs/methods.md#basal-area; forest mensuration)
export function basalAreaM2(dbhCm: number): number {
  if (!(dbhCm > 0) || !Number.isFinite(dbhCm)) {
    throw new RangeError(`basalAreaM2: dbh must be a finite number > 0 cm (got ${dbhCm})`);
  }
  const r = dbhCm / 200;
  return Math.PI * r * r;
}

// w = 1/a, a = area (ha) of the plot or subplot the stem was recorded on — docs/methods.md#expansion-factors
export function expansionFactor(inSubplot: boolean, areaHa: number, subplotAreaHa: number): number {
  const a = inSubplot ? subplotAreaHa : areaHa;
  if (!(a > 0) || !Number.isFinite(a)) {
    throw new RangeError(
      `expansionFactor: ${inSubplot ? 'subplot_area_ha' : 'area_ha'} must be > 0 for a ` +
        `${inSubplot ? 'subplot' : 'main-plot'} stem (got ${a})`,
    );
  }
  return 1 / a;
}

function assertSameLength(fn: string, a: readonly number[], b: readonly number[]): void {
  if (a.length !== b.length) {
    throw new RangeError(`${fn}: dbh and weight arrays differ in length (${a.length} vs ${b.length})`);
  }
}

function assertWeight(fn: string, w: number, i: number): void {
  if (!(w >= 0) || !Number.isFinite(w)) {
    throw new RangeError(`${fn}: expansion factors must be finite and >= 0 (got ${w} at index ${i})`);
  }
}

// N/ha = Σ wᵢ — stems per hectare (forest mensuration)
export function stemsPerHa(weights: readonly number[]): number {
  let sum = 0;
  for (let i = 0; i < weights.length; i += 1) {
    assertWeight('stemsPerHa', weights[i], i);
    sum += weights[i];
  }
  return sum;
}

// G/ha = Σ wᵢ π (Dᵢ/200)² m²/ha — basal area per hectare (forest mensuration)
export function basalAreaPerHa(dbhCm: readonly number[], weights: readonly number[]): number {
  assertSameLength('basalAreaPerHa', dbhCm, weights);
  let sum = 0;
  for (let i = 0; i < dbhCm.length; i += 1) {
    assertWeight('basalAreaPerHa', weights[i], i);
    sum += weights[i] * basalAreaM2(dbhCm[i]);
  }
  return sum;
}

// Dq = sqrt(Σ wᵢ Dᵢ² / Σ wᵢ) cm — quadratic mean diameter (forest mensuration); null with no stems
export function quadraticMeanDiameter(dbhCm: readonly number[], weights: readonly number[]): number | null {
  assertSameLength('quadraticMeanDiameter', dbhCm, weights);
  let sumW = 0;
  let sumWD2 = 0;
  for (let i = 0; i < dbhCm.length; i += 1) {
    const d = dbhCm[i];
    if (!(d > 0) || !Number.isFinite(d)) {
      throw new RangeError(`quadraticMeanDiameter: dbh must be finite and > 0 cm (got ${d} at index ${i})`);
    }
    assertWeight('quadraticMeanDiameter', weights[i], i);
    sumW += weights[i];
    sumWD2 += weights[i] * d * d;
  }
  return sumW > 0 ? Math.sqrt(sumWD2 / sumW) : null;
}
