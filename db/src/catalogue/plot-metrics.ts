// The plot-metric catalogue: one entry per numeric column of `export plots`, in column order. Pure data
// (no imports, no I/O), so the schema of this package and the pure science of @stemwise/core can both
// read it (entry point `@stemwise/db/catalogue`). Derived from it: the plot_metrics columns of the drizzle
// schema and their SQL types, the db column list, the columns of `export plots`, the `PlotMetrics` type
// that computePlotMetrics fills, the report's labels, units and total units, the region variables and
// headline cards, and the columns a fit may use. Columns are documented in docs/exports.md; methods and
// sources in docs/methods.md.

export interface PlotMetricSpec {
  /** camelCase name: the key in `PlotMetrics` and the property of the drizzle table. */
  readonly key: string;
  /** snake_case name: the plot_metrics column and the `export plots` column (never renamed). */
  readonly column: string;
  /** PostgreSQL type of the stored column (nullable in the table either way). */
  readonly sqlType: 'float8' | 'int';
  /** true: null where the value cannot be computed (e.g. too few identified stems). */
  readonly nullable: boolean;
  /** Full name for tables. */
  readonly label: string;
  /** A few words for chart panels and cards. */
  readonly short: string;
  /** Unit, or '' for a plain number. */
  readonly unit: string;
  /** A share stored as 0–1 (unit ''): the pages and charts show it × 100, in percent. */
  readonly share?: true;
  /** Per-hectare figures only: the unit of a total (mean × forest area). Its presence marks a density. */
  readonly totalUnit?: string;
  /** What the value is, in one sentence. */
  readonly description: string;
  /**
   * Row position in region (and national) summaries, 1 first; null: not summarised by region. A new
   * metric takes the next free number, so the rows of `export regions` keep their order.
   */
  readonly regionRow: number | null;
  /** Shown as a headline card on the report pages (summarised metrics only, in regionRow order). */
  readonly headline: boolean;
  /** May be the metric or the axis of a diversity–disturbance fit. */
  readonly fittable: boolean;
  /**
   * The column this one restates at the reporting threshold: its headline card and chart panel take
   * that column's place on the pages (both stay in the exports).
   */
  readonly restates?: string;
}

export const PLOT_METRICS = [
  {
    key: 'stemsHa', column: 'stems_ha', sqlType: 'float8', nullable: false,
    label: 'Stem density', short: 'Stems per ha', unit: 'stems/ha', totalUnit: 'stems',
    description: 'Live stems per hectare, each expanded by the area it was measured on.',
    regionRow: 1, headline: true, fittable: true,
  },
  {
    key: 'basalAreaM2Ha', column: 'basal_area_m2_ha', sqlType: 'float8', nullable: false,
    label: 'Basal area', short: 'Basal area (m²/ha)', unit: 'm²/ha', totalUnit: 'm²',
    description: 'Basal area of live stems per hectare.',
    regionRow: 2, headline: true, fittable: true,
  },
  {
    key: 'qmdCm', column: 'qmd_cm', sqlType: 'float8', nullable: true,
    label: 'Quadratic mean diameter', short: 'QMD (cm)', unit: 'cm',
    description: 'Quadratic mean diameter of live stems; null without live stems.',
    regionRow: null, headline: false, fittable: true,
  },
  {
    key: 'agbMgHa', column: 'agb_mg_ha', sqlType: 'float8', nullable: false,
    label: 'Above-ground biomass', short: 'Biomass (Mg/ha)', unit: 'Mg/ha', totalUnit: 'Mg',
    description: 'Above-ground biomass of live stems (pantropical allometry), a model estimate.',
    regionRow: 3, headline: true, fittable: true,
  },
  {
    key: 'carbonMgHa', column: 'carbon_mg_ha', sqlType: 'float8', nullable: false,
    label: 'Carbon in above-ground biomass', short: 'Carbon (Mg C/ha)', unit: 'Mg C/ha', totalUnit: 'Mg C',
    description: 'Carbon in above-ground biomass (biomass × carbon fraction), a model estimate.',
    regionRow: 4, headline: true, fittable: true,
  },
  {
    key: 'nIdentified', column: 'n_identified', sqlType: 'int', nullable: false,
    label: 'Live main-plot stems identified to species', short: 'Identified stems', unit: 'stems',
    description: 'Live main-plot stems identified to species: the sample of every diversity column.',
    regionRow: null, headline: false, fittable: true,
  },
  {
    key: 'richness', column: 'richness', sqlType: 'int', nullable: false,
    label: 'Species per plot', short: 'Species per plot', unit: 'species',
    description: 'Number of species among the identified stems (a count: 0 or 1 with fewer than 2 identified stems).',
    regionRow: 6, headline: true, fittable: true,
  },
  {
    key: 'shannon', column: 'shannon', sqlType: 'float8', nullable: true,
    label: 'Shannon index', short: 'Shannon', unit: '',
    description: "Shannon's H′ with the natural log.",
    regionRow: null, headline: false, fittable: true,
  },
  {
    key: 'simpson', column: 'simpson', sqlType: 'float8', nullable: true,
    label: 'Simpson diversity (1 − Σp²)', short: 'Simpson (1 − Σp²)', unit: '',
    description: 'Simpson diversity, 1 − Σp².',
    regionRow: null, headline: false, fittable: true,
  },
  {
    key: 'invSimpson', column: 'inv_simpson', sqlType: 'float8', nullable: true,
    label: 'Inverse Simpson (1 / Σp²)', short: 'Inverse Simpson', unit: '',
    description: 'Inverse Simpson index, 1 / Σp².',
    regionRow: null, headline: false, fittable: true,
  },
  {
    key: 'pielou', column: 'pielou', sqlType: 'float8', nullable: true,
    label: "Pielou's evenness J′", short: "Pielou's J′", unit: '',
    description: "Pielou's evenness, H′ / ln S.",
    regionRow: null, headline: false, fittable: true,
  },
  {
    key: 'fisherAlpha', column: 'fisher_alpha', sqlType: 'float8', nullable: true,
    label: "Fisher's alpha (per plot)", short: "Fisher's alpha", unit: '',
    description: "Fisher's log-series α, solving S = α ln(1 + N/α).",
    regionRow: 5, headline: true, fittable: true,
  },
  {
    key: 'rarefied50', column: 'rarefied_50', sqlType: 'float8', nullable: true,
    label: 'Expected species among 50 stems', short: 'Species in 50 stems', unit: 'species',
    description: 'Expected species among 50 identified stems (rarefaction); null below 50 stems.',
    regionRow: null, headline: false, fittable: true,
  },
  {
    key: 'chao1', column: 'chao1', sqlType: 'float8', nullable: true,
    label: 'Chao1 richness estimate', short: 'Chao1', unit: 'species',
    description: 'Bias-corrected Chao1 estimate of species richness.',
    regionRow: null, headline: false, fittable: true,
  },
  {
    key: 'pioneerBaShare', column: 'pioneer_ba_share', sqlType: 'float8', nullable: true,
    label: 'Pioneer share of basal area', short: 'Pioneer share', unit: '', share: true,
    description: 'Share of live basal area in pioneer species.',
    regionRow: 8, headline: false, fittable: true,
  },
  {
    key: 'lightDemanderBaShare', column: 'light_demander_ba_share', sqlType: 'float8', nullable: true,
    label: 'Light-demanding share of basal area', short: 'Light-demanding share', unit: '', share: true,
    description: 'Share of live basal area in light-demanding species.',
    regionRow: 9, headline: false, fittable: true,
  },
  {
    key: 'shadeTolerantBaShare', column: 'shade_tolerant_ba_share', sqlType: 'float8', nullable: true,
    label: 'Shade-tolerant share of basal area', short: 'Shade-tolerant share', unit: '', share: true,
    description: 'Share of live basal area in shade-tolerant species.',
    regionRow: 10, headline: false, fittable: true,
  },
  {
    key: 'unassignedBaShare', column: 'unassigned_ba_share', sqlType: 'float8', nullable: true,
    label: 'Unassigned share of basal area', short: 'Unassigned share', unit: '', share: true,
    description: 'Share of live basal area in unidentified stems or names not in the species list.',
    regionRow: 11, headline: false, fittable: true,
  },
  {
    key: 'loggingRemovedBaFrac', column: 'logging_removed_ba_frac', sqlType: 'float8', nullable: true,
    label: 'Share of basal area removed by logging', short: 'Logged basal area', unit: '', share: true,
    description: 'Basal area of logged stumps over live basal area plus logged stumps, main plot.',
    regionRow: null, headline: false, fittable: true,
  },
  {
    key: 'loggingScore', column: 'logging_score', sqlType: 'float8', nullable: false,
    label: 'Logging score (0–1)', short: 'Logging score', unit: '',
    description: 'Logging disturbance score, 0 none to 1 severe.',
    regionRow: 12, headline: false, fittable: true,
  },
  {
    key: 'fireScore', column: 'fire_score', sqlType: 'float8', nullable: false,
    label: 'Fire score (0–1)', short: 'Fire score', unit: '',
    description: 'Fire disturbance score, 0 none to 1 severe.',
    regionRow: 13, headline: false, fittable: true,
  },
  {
    key: 'disturbanceIndex', column: 'disturbance_index', sqlType: 'float8', nullable: false,
    label: 'Disturbance index (0 none – 1 severe)', short: 'Disturbance index', unit: '',
    description: 'Combined disturbance index of the logging and fire scores, 0 none to 1 severe.',
    regionRow: 7, headline: true, fittable: true,
  },
  // Carbon pools (docs/methods.md#below-ground-biomass, #standing-dead-wood): kept together.
  {
    key: 'rootShootRatio', column: 'root_shoot_ratio', sqlType: 'float8', nullable: true,
    label: 'Root-to-shoot ratio applied', short: 'Root-to-shoot ratio', unit: '',
    description: "Ratio of below-ground to above-ground biomass applied to the plot (its forest type's relation at its biomass); null where none applies.",
    regionRow: null, headline: false, fittable: false,
  },
  {
    key: 'bgbMgHa', column: 'bgb_mg_ha', sqlType: 'float8', nullable: false,
    label: 'Below-ground biomass', short: 'Root biomass (Mg/ha)', unit: 'Mg/ha', totalUnit: 'Mg',
    description: 'Below-ground (root) biomass of live trees from above-ground biomass by a published root-to-shoot relation, a model estimate.',
    regionRow: 14, headline: false, fittable: false,
  },
  {
    key: 'bgbCarbonMgHa', column: 'bgb_carbon_mg_ha', sqlType: 'float8', nullable: false,
    label: 'Carbon in below-ground biomass', short: 'Root carbon (Mg C/ha)', unit: 'Mg C/ha', totalUnit: 'Mg C',
    description: 'Carbon in below-ground biomass (biomass × carbon fraction), a model estimate.',
    regionRow: 15, headline: false, fittable: false,
  },
  {
    key: 'standingDeadMgHa', column: 'standing_dead_mg_ha', sqlType: 'float8', nullable: false,
    label: 'Standing dead wood biomass', short: 'Standing dead wood (Mg/ha)', unit: 'Mg/ha', totalUnit: 'Mg',
    description: 'Biomass of standing dead stems: the allometry of a live stem times the share a dead stem keeps, a model estimate.',
    regionRow: 16, headline: false, fittable: false,
  },
  {
    key: 'standingDeadCarbonMgHa', column: 'standing_dead_carbon_mg_ha', sqlType: 'float8', nullable: false,
    label: 'Carbon in standing dead wood', short: 'Dead wood carbon (Mg C/ha)', unit: 'Mg C/ha', totalUnit: 'Mg C',
    description: 'Carbon in standing dead wood (biomass × carbon fraction), a model estimate.',
    regionRow: 17, headline: false, fittable: false,
  },
  {
    key: 'treeCarbonMgHa', column: 'tree_carbon_mg_ha', sqlType: 'float8', nullable: false,
    label: 'Carbon in trees (above-ground, below-ground, standing dead)', short: 'Tree carbon (Mg C/ha)', unit: 'Mg C/ha', totalUnit: 'Mg C',
    description: 'Carbon of the three pools the tally covers: live above-ground and below-ground biomass and standing dead wood (not lying dead wood, litter or soil).',
    regionRow: 18, headline: false, fittable: false,
  },
  // Figures at the reporting threshold (a setting, default 10 cm; docs/methods.md#reporting-threshold):
  // comparable between plots whatever their diameter minima and subplots. Kept together.
  {
    key: 'reportingDbhMinCm', column: 'reporting_dbh_min_cm', sqlType: 'float8', nullable: false,
    label: 'Reporting threshold of the reporting_ columns', short: 'Reporting threshold (cm)', unit: 'cm',
    description: 'The diameter from which the reporting_ columns and the stand table count stems (STEMWISE_REPORTING_DBH_MIN_CM when the visit was computed).',
    regionRow: null, headline: false, fittable: false,
  },
  {
    key: 'reportingStemsHa', column: 'reporting_stems_ha', sqlType: 'float8', nullable: true,
    label: 'Stem density from the reporting threshold', short: 'Stems per ha ≥ threshold', unit: 'stems/ha', totalUnit: 'stems',
    description: 'Live stems per hectare from the reporting threshold up; null when the plot did not measure every stem from the threshold up.',
    regionRow: 19, headline: true, fittable: true, restates: 'stems_ha',
  },
  {
    key: 'reportingBasalAreaM2Ha', column: 'reporting_basal_area_m2_ha', sqlType: 'float8', nullable: true,
    label: 'Basal area from the reporting threshold', short: 'Basal area ≥ threshold (m²/ha)', unit: 'm²/ha', totalUnit: 'm²',
    description: 'Basal area of live stems from the reporting threshold up; null when the plot did not measure every stem from the threshold up.',
    regionRow: 20, headline: true, fittable: true, restates: 'basal_area_m2_ha',
  },
  {
    key: 'reportingAgbMgHa', column: 'reporting_agb_mg_ha', sqlType: 'float8', nullable: true,
    label: 'Above-ground biomass from the reporting threshold', short: 'Biomass ≥ threshold (Mg/ha)', unit: 'Mg/ha', totalUnit: 'Mg',
    description: 'Above-ground biomass of live stems from the reporting threshold up, a model estimate; null when the plot did not measure every stem from the threshold up.',
    regionRow: 21, headline: true, fittable: true, restates: 'agb_mg_ha',
  },
  {
    key: 'reportingCarbonMgHa', column: 'reporting_carbon_mg_ha', sqlType: 'float8', nullable: true,
    label: 'Carbon in above-ground biomass from the reporting threshold', short: 'Carbon ≥ threshold (Mg C/ha)', unit: 'Mg C/ha', totalUnit: 'Mg C',
    description: 'Carbon in the above-ground biomass of live stems from the reporting threshold up, a model estimate; null when the plot did not measure every stem from the threshold up.',
    regionRow: 22, headline: true, fittable: true, restates: 'carbon_mg_ha',
  },
] as const satisfies readonly PlotMetricSpec[];

export type PlotMetricEntry = (typeof PLOT_METRICS)[number];
export type PlotMetricKey = PlotMetricEntry['key'];
export type PlotMetricColumn = PlotMetricEntry['column'];

/** One visit's values by catalogue key: `number | null` where the entry is nullable. */
export type PlotMetricValues = {
  -readonly [E in PlotMetricEntry as E['key']]: E['nullable'] extends true ? number | null : number;
};

const BY_COLUMN: ReadonlyMap<string, PlotMetricSpec> = new Map(PLOT_METRICS.map((m) => [m.column, m]));

/** The catalogue entry of a column, or undefined for a name that is not a plot metric. */
export function plotMetricByColumn(column: string): PlotMetricSpec | undefined {
  return BY_COLUMN.get(column);
}

/** Columns summarised by region, in the row order of region summaries. */
export const REGION_METRIC_COLUMNS: readonly PlotMetricColumn[] = PLOT_METRICS.filter((m) => m.regionRow !== null)
  .sort((a, b) => (a.regionRow as number) - (b.regionRow as number))
  .map((m) => m.column);

/** The column that restates `column` at the reporting threshold, or `column` itself when none does. */
export function reportingColumnOf(column: string): string {
  return PLOT_METRICS.find((m) => 'restates' in m && m.restates === column)?.column ?? column;
}

/**
 * Columns shown as headline cards, in region row order; a column restated at the reporting threshold
 * gives its place to the restating column.
 */
export const HEADLINE_METRIC_COLUMNS: readonly PlotMetricColumn[] = REGION_METRIC_COLUMNS.filter((c) => {
  const m = BY_COLUMN.get(c);
  return m?.headline === true && m.restates === undefined;
}).map((c) => reportingColumnOf(c) as PlotMetricColumn);

/** Columns a fit may use as its metric or axis, in export order. */
export const FITTABLE_METRIC_COLUMNS: readonly PlotMetricColumn[] = PLOT_METRICS.filter((m) => m.fittable).map((m) => m.column);
