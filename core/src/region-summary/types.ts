import type { SamplingErrorT, Weighting } from '../science/stratified';
import type { CautionFlag, CautionSettings } from './caution-flag';

// The region summary as the report page and the API receive it. Plain JSON: arrays and objects only,
// no Map, NaN or Infinity; what cannot be computed is null. Keys are snake_case like the export columns.

/** Column order of `export regions` (docs/exports.md, version 1): a contract, columns may be added, never renamed. */
export const REGION_COLUMNS = [
  'region',
  'forest_type',
  'variable',
  'n_plots',
  'mean',
  'se',
  'ci_low',
  'ci_high',
  'sampling_error_pct',
  'forest_area_ha',
  'total',
  'caution_flag',
  'whole_se',
  'whole_ci_low',
  'whole_ci_high',
  'total_whole_ci_low',
  'total_whole_ci_high',
] as const;

export type RegionColumn = (typeof REGION_COLUMNS)[number];

/** `forest_type` of the stratified estimate of the whole region. */
export const WHOLE_REGION = 'all';

/** `region` of the national rows (all regions together); refused as a region name at ingest. */
export const NATIONAL = 'national';

/** One `export regions` row: one region × stratum × variable. */
export interface RegionRow {
  readonly region: string;
  /** A forest type, or `all` for the stratified estimate of the whole region. */
  readonly forest_type: string;
  readonly variable: string;
  /** Plots with a value for this variable (plots where it is null are left out). */
  readonly n_plots: number;
  readonly mean: number | null;
  readonly se: number | null;
  readonly ci_low: number | null;
  readonly ci_high: number | null;
  readonly sampling_error_pct: number | null;
  readonly forest_area_ha: number | null;
  /** mean × forest_area_ha, for per-hectare variables (names ending in `_ha`) only. */
  readonly total: number | null;
  /** Few plots or a wide sampling error (docs/exports.md); absent in summaries made before it existed. */
  readonly caution_flag?: CautionFlag;
  /**
   * carbon_mg_ha rows only: SD and percentile interval of the Monte Carlo of every error source (sampling,
   * biomass and height models, wood density; docs/methods.md#carbon-uncertainty), and that interval of the total.
   */
  readonly whole_se?: number | null;
  readonly whole_ci_low?: number | null;
  readonly whole_ci_high?: number | null;
  readonly total_whole_ci_low?: number | null;
  readonly total_whole_ci_high?: number | null;
}

/** A total over forest area with its uncertainty (per-hectare variables, known areas). */
export interface TotalRow {
  readonly forest_type: string;
  readonly variable: string;
  readonly forest_area_ha: number;
  readonly total: number;
  readonly se: number | null;
  readonly ci_low: number | null;
  readonly ci_high: number | null;
}

/** How the whole-region (`all`) estimate of one variable was made. */
export interface EstimateDetail {
  readonly variable: string;
  readonly n_plots: number;
  /** Degrees of freedom of the interval; null when no SE could be computed. */
  readonly df: number | null;
  readonly df_method: 'satterthwaite' | 'n_minus_strata' | 'fixed' | null;
  readonly t: number | null;
  /** Multiplier used in sampling_error_pct (the t above, 1.96 or 2). */
  readonly sampling_error_multiplier: number | null;
  readonly strata_used: readonly string[];
  readonly strata_without_values: readonly string[];
  readonly single_plot_strata: readonly string[];
}

export type SummaryGuild = 'pioneer' | 'light_demander' | 'shade_tolerant' | 'unassigned';

/** Mean of the plots' basal-area shares of one guild (a mean of plot shares, not a ratio of totals). */
export interface GuildRow {
  readonly forest_type: string;
  readonly guild: SummaryGuild;
  readonly n_plots: number;
  readonly mean_share: number | null;
  readonly se: number | null;
}

/** A disturbance class on disturbance_index: lower ≤ value < upper (null = open end). */
export interface DisturbanceClass {
  readonly name: string;
  /** Exclusive upper bound; null for the last, open class. */
  readonly below: number | null;
}

export interface DisturbanceRow {
  readonly forest_type: string;
  readonly class: string;
  readonly lower: number | null;
  readonly upper: number | null;
  readonly n_plots: number;
  /** Per forest type: share of its plots with an index. For `all`: the stratified share (Σ W_h p_h),
   * an estimate of the share of forest area when areas are known. */
  readonly share: number | null;
  readonly share_se: number | null;
}

export interface DisturbanceSummary {
  readonly classes: readonly DisturbanceClass[];
  readonly rows: readonly DisturbanceRow[];
  readonly plots_without_index: readonly { readonly forest_type: string; readonly n_plots: number }[];
}

export interface SpeciesCountRow {
  readonly forest_type: string;
  /** Distinct names among the plots that came with names. */
  readonly n_species: number;
  readonly n_plots_with_names: number;
}

export type NoteCode =
  | 'no_plots'
  | 'weights_area'
  | 'weights_plot_count'
  | 'areas_incomplete'
  | 'area_zero_with_plots'
  | 'unsampled_area'
  | 'fpc_not_applied'
  | 'fpc_applied'
  | 'fpc_unavailable'
  | 'degrees_of_freedom'
  | 'sampling_error_multiplier'
  | 'single_plot_stratum'
  | 'stratum_without_values'
  | 'no_values'
  | 'plots_left_out'
  | 'totals_per_hectare_only'
  | 'species_names_partial'
  | 'caution'
  | 'national_strata';

export interface SummaryNote {
  readonly code: NoteCode;
  readonly message: string;
  readonly forest_type: string | null;
  readonly variable: string | null;
}

export interface RegionSummary {
  readonly region: string;
  readonly n_plots: number;
  /** Forest types with plots, sorted: the strata. */
  readonly forest_types: readonly string[];
  readonly weighting: Weighting;
  readonly confidence: number;
  readonly sampling_error_t: SamplingErrorT;
  readonly fpc_applied: boolean;
  /** Thresholds of the rows' caution_flag; absent in summaries made before it existed. */
  readonly caution?: CautionSettings;
  /** `export regions` rows: `all` first, then forest types sorted; variables in the order asked. */
  readonly rows: readonly RegionRow[];
  readonly totals: readonly TotalRow[];
  readonly estimate_details: readonly EstimateDetail[];
  readonly guild_composition: readonly GuildRow[];
  readonly disturbance: DisturbanceSummary;
  /** null when no plot came with species names. */
  readonly species: readonly SpeciesCountRow[] | null;
  readonly notes: readonly SummaryNote[];
}

/** One stratum of the national estimate: a region × forest type with plots. */
export interface NationalStratum {
  readonly region: string;
  readonly forest_type: string;
  readonly n_plots: number;
  /** Its forest area (strata.csv); null where unknown. */
  readonly forest_area_ha: number | null;
}

/** All regions together, stratified by region × forest type (Cochran 1977 ch. 5). */
export interface NationalSummary {
  readonly n_plots: number;
  /** Regions with plots, sorted. */
  readonly regions: readonly string[];
  /** Forest types with plots, sorted. */
  readonly forest_types: readonly string[];
  readonly strata: readonly NationalStratum[];
  readonly weighting: Weighting;
  readonly confidence: number;
  readonly sampling_error_t: SamplingErrorT;
  /** Thresholds of the rows' caution_flag; absent in summaries made before it existed. */
  readonly caution?: CautionSettings;
  /** `export regions` rows with region `national`: `all` (over every region × forest type stratum)
   * first, then each forest type nationally (over the regions where it has plots). */
  readonly rows: readonly RegionRow[];
  readonly totals: readonly TotalRow[];
  /** How each row was made; `forest_type` says which row (strata are named `region / forest type`). */
  readonly estimate_details: readonly (EstimateDetail & { readonly forest_type: string })[];
  readonly notes: readonly SummaryNote[];
}
