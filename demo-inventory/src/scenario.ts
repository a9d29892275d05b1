// The invented scenario of the demo inventory: an island country, its regions and its forest types.
// Every name and number here is made up for the demo; none describes a real place or forest.

export const FOREST_TYPES = ['wet', 'moist', 'dry'] as const;
export type ForestType = (typeof FOREST_TYPES)[number];

/**
 * The Republic of Tavolira, an invented island country. Its box lies in open ocean of the tropical
 * South Pacific, over 1,000 km from any real land (distances from memory: Ducie Island of the
 * Pitcairns about 1,300 km to the south-west, Easter Island about 1,600 km to the south-east, the
 * Marquesas about 1,900 km to the west), so no coordinate implies a real place.
 */
export const COUNTRY = {
  name: 'Tavolira',
  latMin: -13.5,
  latMax: -9.5,
  lonMin: -121.0,
  lonMax: -115.0,
} as const;

export interface Region {
  readonly code: string;
  readonly name: string;
  readonly latMin: number;
  readonly latMax: number;
  readonly lonMin: number;
  readonly lonMax: number;
  readonly elevationM: readonly [number, number];
  /** Share of plots laid out as 0.5-ha main plots (the rest are 1 ha). */
  readonly halfHectareShare: number;
  /** Forest area of each stratum (ha); 0 = that forest type does not occur in the region. */
  readonly forestAreaHa: Readonly<Record<ForestType, number>>;
}

// A 3 × 2 grid inside the country box: north row (−11.5..−9.5), south row (−13.5..−11.5).
export const REGIONS: readonly Region[] = [
  {
    code: 'ALV', name: 'Alvenor', latMin: -11.5, latMax: -9.5, lonMin: -121, lonMax: -119,
    elevationM: [20, 900], halfHectareShare: 0.1,
    forestAreaHa: { wet: 612_000, moist: 184_000, dry: 0 },
  },
  {
    code: 'BRQ', name: 'Brisquet', latMin: -11.5, latMax: -9.5, lonMin: -119, lonMax: -117,
    elevationM: [150, 1400], halfHectareShare: 0.15,
    forestAreaHa: { wet: 455_000, moist: 297_000, dry: 41_000 },
  },
  {
    code: 'CDR', name: 'Caldereth', latMin: -11.5, latMax: -9.5, lonMin: -117, lonMax: -115,
    elevationM: [10, 650], halfHectareShare: 0.2,
    forestAreaHa: { wet: 238_000, moist: 402_000, dry: 96_000 },
  },
  {
    code: 'DVN', name: 'Duvanta', latMin: -13.5, latMax: -11.5, lonMin: -121, lonMax: -119,
    elevationM: [40, 1100], halfHectareShare: 0.15,
    forestAreaHa: { wet: 171_000, moist: 356_000, dry: 128_000 },
  },
  {
    code: 'ESK', name: 'Eskarel', latMin: -13.5, latMax: -11.5, lonMin: -119, lonMax: -117,
    elevationM: [5, 420], halfHectareShare: 0.35,
    forestAreaHa: { wet: 0, moist: 143_000, dry: 377_000 },
  },
  {
    code: 'MRV', name: 'Morvane', latMin: -13.5, latMax: -11.5, lonMin: -117, lonMax: -115,
    elevationM: [0, 300], halfHectareShare: 0.3,
    forestAreaHa: { wet: 52_000, moist: 118_000, dry: 289_000 },
  },
];

/** How each forest type looks before disturbance, and how it is usually disturbed. */
export interface ForestTypeProfile {
  /** Mean live stems ≥ 10 cm per ha in undisturbed forest. */
  readonly stemsPerHa: number;
  /** Size parameter of the negative binomial of stem counts (smaller = more plot-to-plot spread). */
  readonly stemsSize: number;
  /** Mean of dbh − 10 cm for live main-plot stems (the slope of the reverse-J curve). */
  readonly dbhExcessMeanCm: number;
  /** Share of live stems that are emergent giants (60 cm + an exponential excess). */
  readonly emergentShare: number;
  /** Live stems 5–10 cm per ha (subplot). */
  readonly smallStemsPerHa: number;
  /** Standing dead stems ≥ 10 cm per ha without fire. */
  readonly deadPerHa: number;
  /** Mean share of disturbance that comes from logging (the rest from fire), Beta-distributed. */
  readonly loggingShareMean: number;
  /** Shape parameters of the latent disturbance d ~ Beta(a, b). */
  readonly disturbanceBeta: readonly [number, number];
  /** Intercept shift of the height–diameter curve (ln H). */
  readonly heightShift: number;
}

export const FOREST_TYPE_PROFILES: Readonly<Record<ForestType, ForestTypeProfile>> = {
  wet: {
    stemsPerHa: 580, stemsSize: 30, dbhExcessMeanCm: 12.5, emergentShare: 0.012,
    smallStemsPerHa: 820, deadPerHa: 28, loggingShareMean: 0.75,
    disturbanceBeta: [1.15, 1.35], heightShift: 0.06,
  },
  moist: {
    stemsPerHa: 520, stemsSize: 30, dbhExcessMeanCm: 12.0, emergentShare: 0.009,
    smallStemsPerHa: 700, deadPerHa: 24, loggingShareMean: 0.55,
    disturbanceBeta: [1.15, 1.35], heightShift: 0.0,
  },
  dry: {
    stemsPerHa: 490, stemsSize: 28, dbhExcessMeanCm: 10.5, emergentShare: 0.004,
    smallStemsPerHa: 650, deadPerHa: 30, loggingShareMean: 0.35,
    disturbanceBeta: [1.15, 1.35], heightShift: -0.16,
  },
};

/** First visits ran from 2013 to 2019 (inclusive); second visits 4–6 years later, up to 2025. */
export const SURVEY_YEARS = [2013, 2019] as const;
