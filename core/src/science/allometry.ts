// Above-ground biomass (AGB) of a tree from pantropical allometric models, and its carbon content.
// Formulas, sources and check values: docs/methods.md#biomass-with-height, docs/methods.md#biomass-without-height, docs/methods.md#carbon-fraction.
// D = dbh in cm, H = total height in m, ρ = basic wood density in g/cm³, AGB in kg of dry matter.
// These models carry their own error (eq. 4 of Chave et al. 2014 has a residual standard error of
// about 0.36 on the log scale: memory), so a plot figure is an estimate with its uncertainty, and
// national methods and local regulations take precedence where they exist.

export type Climate = 'dry' | 'moist' | 'wet';

function assertPositive(fn: string, name: string, value: number): void {
  if (!(value > 0) || !Number.isFinite(value)) {
    throw new RangeError(`${fn}: ${name} must be a finite number > 0 (got ${value})`);
  }
}

// AGB = 0.0673 (ρ D² H)^0.976 kg — Chave et al. 2014, Global Change Biology 20:3177–3190, eq. 4
export function agbChave2014(woodDensity: number, dbhCm: number, heightM: number): number {
  assertPositive('agbChave2014', 'wood density', woodDensity);
  assertPositive('agbChave2014', 'dbh', dbhCm);
  assertPositive('agbChave2014', 'height', heightM);
  return 0.0673 * Math.pow(woodDensity * dbhCm * dbhCm * heightM, 0.976);
}

/** Intercept a and ln D slope b of the Chave et al. 2005 models without height, by forest type. */
export const CHAVE_2005_NO_HEIGHT: Readonly<Record<Climate, { readonly a: number; readonly b: number }>> = {
  dry: { a: -0.667, b: 1.784 },
  moist: { a: -1.499, b: 2.148 },
  wet: { a: -1.239, b: 1.98 },
};

// AGB = ρ exp(a + b ln D + 0.207 (ln D)² − 0.0281 (ln D)³) kg — Chave et al. 2005, Oecologia 145:87–99
// (forest-type models without height; calibrated on trees of about 5–156 cm dbh)
export function agbChave2005(woodDensity: number, dbhCm: number, climate: Climate): number {
  assertPositive('agbChave2005', 'wood density', woodDensity);
  assertPositive('agbChave2005', 'dbh', dbhCm);
  const c = CHAVE_2005_NO_HEIGHT[climate];
  if (c === undefined) {
    throw new RangeError(`agbChave2005: climate must be dry, moist or wet (got ${String(climate)})`);
  }
  const l = Math.log(dbhCm);
  return woodDensity * Math.exp(c.a + c.b * l + 0.207 * l * l - 0.0281 * l * l * l);
}

/** Default carbon fraction of dry biomass, tropical and subtropical: IPCC 2006 GL Vol. 4 Table 4.3 (range 0.44–0.49). */
export const IPCC_2006_CARBON_FRACTION = 0.47;

// C = CF · B, CF = 0.47 by default — IPCC 2006 Guidelines, Vol. 4, Ch. 4, Table 4.3
export function carbonFromBiomass(biomass: number, carbonFraction: number = IPCC_2006_CARBON_FRACTION): number {
  if (!(biomass >= 0) || !Number.isFinite(biomass)) {
    throw new RangeError(`carbonFromBiomass: biomass must be finite and >= 0 (got ${biomass})`);
  }
  if (!(carbonFraction > 0 && carbonFraction <= 1)) {
    throw new RangeError(`carbonFromBiomass: carbon fraction must be in (0, 1] (got ${carbonFraction})`);
  }
  return carbonFraction * biomass;
}
