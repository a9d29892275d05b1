// Below-ground (root) biomass of a plot from its above-ground biomass, by a published root-to-shoot
// relation chosen per forest type. Rules, sources and check values: docs/methods.md#below-ground-biomass.
// AGB and BGB in Mg (tonnes) of dry matter per hectare. The relations are applied to the plot's live
// above-ground biomass per hectare: the biomass class of a ratio is the plot's own (IPCC 2006 Vol. 4
// gives the classes per hectare of above-ground biomass). Values of the table and the equation are from
// memory (not checked against a copy of the source): national values take precedence where they exist.
//
// Uncertainty of a ratio: the table gives, for most rows, the range of the ratios it was built from. The
// range is one of observed ratios, not a confidence interval; stemwise reads it as a uniform
// distribution over that range, SD = (max − min) / √12. A row without a range, and the equation, get a
// relative SD of 20 % (stemwise's choice: the relative SD the uniform rule gives the tropical moist
// deciduous row below 125 Mg/ha, 0.046 / 0.20 ≈ 0.23, rounded down; not a published figure).

/** Relative SD of a ratio whose source gives no range (stemwise's choice; see above). */
export const ROOT_SHOOT_RELATIVE_SD_WITHOUT_RANGE = 0.2;

/** One row of IPCC 2006 Guidelines Vol. 4 Ch. 4 Table 4.4: R for AGB in [agbFrom, agbBelow) Mg/ha. */
export interface RootShootTableRow {
  /** Lower end of the row's above-ground biomass class, Mg/ha (inclusive). */
  readonly agbFrom: number;
  /** Upper end of the class, Mg/ha (exclusive); Infinity for the last class. */
  readonly agbBelow: number;
  /** The table's ratio R = below-ground / above-ground biomass. */
  readonly ratio: number;
  /** The table's range of R, or null where it gives none. */
  readonly range: readonly [number, number] | null;
}

/** An ecological zone of Table 4.4 (tropical domain) and its rows, lowest biomass class first. */
export interface RootShootTableZone {
  readonly label: string;
  /** The source the table names for the row (as the table cites it; memory). */
  readonly cites: string;
  readonly rows: readonly RootShootTableRow[];
}

/**
 * IPCC 2006 Guidelines for National Greenhouse Gas Inventories, Vol. 4 (AFOLU), Ch. 4 (Forest Land),
 * Table 4.4 "Ratio of below-ground biomass to above-ground biomass (R)", tropical domain rows (memory).
 */
export const IPCC_2006_TABLE_4_4 = {
  // Tropical rainforest: R 0.37, no range (table cites Fittkau & Klinge 1973) — memory
  tropical_rainforest: {
    label: 'Tropical rainforest',
    cites: 'Fittkau & Klinge 1973',
    rows: [{ agbFrom: 0, agbBelow: Infinity, ratio: 0.37, range: null }],
  },
  // Tropical moist deciduous forest: AGB < 125 Mg/ha R 0.20 (0.09–0.25); > 125 R 0.24 (0.22–0.33) (table cites Mokany et al. 2006) — memory
  tropical_moist_deciduous: {
    label: 'Tropical moist deciduous forest',
    cites: 'Mokany et al. 2006',
    rows: [
      { agbFrom: 0, agbBelow: 125, ratio: 0.2, range: [0.09, 0.25] },
      { agbFrom: 125, agbBelow: Infinity, ratio: 0.24, range: [0.22, 0.33] },
    ],
  },
  // Tropical dry forest: AGB < 20 Mg/ha R 0.56 (0.28–0.68); > 20 R 0.28 (0.27–0.28) (table cites Mokany et al. 2006) — memory
  tropical_dry: {
    label: 'Tropical dry forest',
    cites: 'Mokany et al. 2006',
    rows: [
      { agbFrom: 0, agbBelow: 20, ratio: 0.56, range: [0.28, 0.68] },
      { agbFrom: 20, agbBelow: Infinity, ratio: 0.28, range: [0.27, 0.28] },
    ],
  },
  // Tropical mountain systems: R 0.27 (0.27–0.28) (table cites Singh et al. 1994) — memory
  tropical_mountain: {
    label: 'Tropical mountain systems',
    cites: 'Singh et al. 1994',
    rows: [{ agbFrom: 0, agbBelow: Infinity, ratio: 0.27, range: [0.27, 0.28] }],
  },
} as const satisfies Record<string, RootShootTableZone>;

export type RootShootZone = keyof typeof IPCC_2006_TABLE_4_4;

/** Coefficients of BGB = a · AGB^b, Mg/ha: Mokany, Raison & Prokushkin 2006, Global Change Biology 12:84–96 (memory). */
export const MOKANY_2006 = { a: 0.489, b: 0.89 } as const;

/** The relation a forest type uses: a zone of Table 4.4, or the Mokany et al. 2006 equation. */
export type RootShootRelation = RootShootZone | 'mokany_2006';

export const ROOT_SHOOT_RELATIONS: readonly RootShootRelation[] = [...(Object.keys(IPCC_2006_TABLE_4_4) as RootShootZone[]), 'mokany_2006'];

/** The default relation of each climate class of a forest type (stemwise's choice of zone; docs/methods.md#below-ground-biomass). */
export const DEFAULT_ROOT_SHOOT_BY_CLIMATE: Readonly<Record<'dry' | 'moist' | 'wet', RootShootRelation>> = {
  wet: 'tropical_rainforest',
  moist: 'tropical_moist_deciduous',
  dry: 'tropical_dry',
};

export interface RootShootRatio {
  /** R = BGB / AGB applied to the plot. */
  readonly ratio: number;
  /** Standard deviation of R (rule above), for the uncertainty of the pool. */
  readonly sd: number;
  /**
   * Which row of the relation gave R ('tropical_dry:1' the second biomass class of the dry zone;
   * 'mokany_2006' the equation): the error of a row is shared by every plot that uses it
   * (docs/methods.md#carbon-uncertainty).
   */
  readonly row: string;
}

function fail(fn: string, message: string): never {
  throw new RangeError(`${fn}: ${message}`);
}

function checkAgb(fn: string, agbMgHa: number): void {
  if (!(agbMgHa >= 0) || !Number.isFinite(agbMgHa)) fail(fn, `above-ground biomass must be finite and >= 0 Mg/ha (got ${agbMgHa})`);
}

// SD = (max − min)/√12 — the range read as a uniform distribution (stemwise's rule, docs/methods.md#below-ground-biomass)
export function sdOfRange(range: readonly [number, number] | null, ratio: number): number {
  if (range === null) return ROOT_SHOOT_RELATIVE_SD_WITHOUT_RANGE * ratio;
  const [lo, hi] = range;
  if (!(hi >= lo) || !(lo >= 0)) fail('sdOfRange', `range must be 0 <= min <= max (got ${lo}–${hi})`);
  return (hi - lo) / Math.sqrt(12);
}

// BGB = 0.489 · AGB^0.890 Mg/ha — Mokany, Raison & Prokushkin 2006, Global Change Biology 12:84–96 (memory)
export function bgbMokany2006(agbMgHa: number): number {
  checkAgb('bgbMokany2006', agbMgHa);
  return MOKANY_2006.a * Math.pow(agbMgHa, MOKANY_2006.b);
}

// R by the plot's AGB class — IPCC 2006 GL Vol. 4 Ch. 4 Table 4.4; for the equation R = BGB/AGB (null at AGB 0)
export function rootShootRatio(relation: RootShootRelation, agbMgHa: number): RootShootRatio | null {
  checkAgb('rootShootRatio', agbMgHa);
  if (relation === 'mokany_2006') {
    if (agbMgHa === 0) return null;
    const ratio = bgbMokany2006(agbMgHa) / agbMgHa;
    return { ratio, sd: ROOT_SHOOT_RELATIVE_SD_WITHOUT_RANGE * ratio, row: relation };
  }
  const zone: RootShootTableZone | undefined = IPCC_2006_TABLE_4_4[relation];
  if (zone === undefined) fail('rootShootRatio', `unknown relation ${String(relation)} (known: ${ROOT_SHOOT_RELATIONS.join(', ')})`);
  const at = zone.rows.findIndex((r) => agbMgHa >= r.agbFrom && agbMgHa < r.agbBelow);
  const row = zone.rows[at] as RootShootTableRow;
  return { ratio: row.ratio, sd: sdOfRange(row.range, row.ratio), row: `${relation}:${at}` };
}

// BGB = R · AGB Mg/ha — R as defined in IPCC 2006 GL Vol. 4 Ch. 4 Table 4.4 (memory); 0 where AGB is 0
export function belowGroundBiomass(relation: RootShootRelation, agbMgHa: number): number {
  const r = rootShootRatio(relation, agbMgHa);
  return r === null ? 0 : r.ratio * agbMgHa;
}

/** A forest type's configured relation (STEMWISE_ROOT_SHOOT), as the configuration lists them. */
export interface ConfiguredRootShoot {
  readonly forestType: string;
  readonly relation: RootShootRelation;
}

/** The relation a forest type uses: the configured one, else the default of its climate class. */
export function rootShootRelationOf(forestType: string, climate: 'dry' | 'moist' | 'wet', configured: readonly ConfiguredRootShoot[]): RootShootRelation {
  const chosen = configured.find((c) => c.forestType === forestType)?.relation;
  if (chosen !== undefined) return chosen;
  const byClimate = DEFAULT_ROOT_SHOOT_BY_CLIMATE[climate];
  if (byClimate === undefined) fail('rootShootRelationOf', `climate must be dry, moist or wet (got ${String(climate)})`);
  return byClimate;
}
