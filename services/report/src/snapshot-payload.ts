import type { RegionSummary, TestOutcome } from '@stemwise/core';
import type { CarbonUncertaintySection } from './carbon-uncertainty';
import type { ChangeCoverage } from './summary/change-coverage';
import type { BiomassMethodRow } from './summary/biomass-method';

// What one region_summaries.payload holds (format 1). The API serves it without `charts`; the page
// draws the charts from it. Plain JSON; null where a value cannot be computed.

export const SNAPSHOT_FORMAT = 1;

/** One `export fits` row with the scope it was fitted on (`all` = the forest type as a whole, or a region). */
export interface SnapshotFitRow {
  readonly scope: string;
  readonly forest_type: string;
  readonly metric: string;
  readonly axis: string;
  readonly n: number;
  readonly model: string;
  readonly b0: number | null;
  readonly b1: number | null;
  readonly b2: number | null;
  readonly se_b0: number | null;
  readonly se_b1: number | null;
  readonly se_b2: number | null;
  readonly p_b1: number | null;
  readonly p_b2: number | null;
  readonly r2: number | null;
  readonly adj_r2: number | null;
  readonly aicc: number | null;
  readonly peak_x: number | null;
  readonly peak_ci_low: number | null;
  readonly peak_ci_high: number | null;
  readonly verdict: string;
  /** Plots without the metric or the axis (absent in snapshots made before it was counted). */
  readonly plots_left_out?: number | null;
  readonly left_out_reasons?: string | null;
  /** The evidence behind the verdict (docs/exports.md), on the quadratic row; absent in older snapshots. */
  readonly delta_aicc?: number | null;
  readonly curvature_p?: number | null;
  readonly mos_turn_x?: number | null;
  readonly mos_turn_inside?: 'yes' | 'no' | null;
  readonly mos_result?: TestOutcome | null;
  readonly two_lines_break_x?: number | null;
  readonly two_lines_slope_1?: number | null;
  readonly two_lines_p_1?: number | null;
  readonly two_lines_slope_2?: number | null;
  readonly two_lines_p_2?: number | null;
  readonly two_lines_result?: TestOutcome | null;
  readonly peak_boot_low?: number | null;
  readonly peak_boot_high?: number | null;
}

export interface PlotSize {
  readonly forest_type: string;
  readonly area_ha: number;
  readonly n_plots: number;
}

export interface FitChart {
  readonly forest_type: string;
  readonly metric: string;
  readonly axis: string;
  /** Plots of the forest type drawn, and how many of them are this region's (highlighted). */
  readonly points: number;
  readonly highlighted: number;
  readonly svg: string | null;
  /** Why there is no chart (too few plots, no stored fit, rendering failed). */
  readonly missing: string | null;
  /** Key of the specification the SVG was drawn from (chartSpecKey): a later snapshot with the same key reuses the SVG. */
  readonly drawn_from: string | null;
}

export interface SnapshotMethod {
  readonly estimator: string;
  readonly biomass: string;
  readonly carbon_fraction: number;
  readonly carbon: string;
  readonly fits: string;
}

export interface SnapshotData {
  readonly plots: number;
  /** Survey dates of the plot visits summarised (latest visit per plot). */
  readonly first_survey: string | null;
  readonly last_survey: string | null;
  readonly species_reference_version: number | null;
}

export interface SnapshotPayload {
  readonly format: typeof SNAPSHOT_FORMAT;
  readonly region: string;
  readonly data: SnapshotData;
  readonly method: SnapshotMethod;
  readonly summary: RegionSummary;
  readonly fits: readonly SnapshotFitRow[];
  /** Whole uncertainty of the above-ground carbon stock (docs/methods.md#carbon-uncertainty); null when off, absent in older snapshots. */
  readonly carbon_uncertainty?: CarbonUncertaintySection | null;
  /** The same for the tree pool (tree_carbon_mg_ha: above- and below-ground live biomass and standing dead wood); absent in older snapshots. */
  readonly tree_carbon_uncertainty?: CarbonUncertaintySection | null;
  /** The same for the net above-ground carbon change between visits (carbon_net_change_mg_ha_yr); absent in older snapshots. */
  readonly carbon_change_uncertainty?: CarbonUncertaintySection | null;
  /** The pairs of visits behind the estimates of change (null: no plot measured twice); absent in snapshots made before it. */
  readonly change?: ChangeCoverage | null;
  /** Share of the AGB from each height source and wood-density level (absent in older snapshots). */
  readonly biomass_method?: readonly BiomassMethodRow[];
  /** Plots per forest type and plot area in ha (absent in older snapshots). */
  readonly plot_sizes?: readonly PlotSize[];
  readonly charts: {
    readonly means: string | null;
    readonly guilds: string | null;
    /** Gains, losses and net change per forest type (null without change estimates); absent in older snapshots. */
    readonly change?: string | null;
    readonly fits: readonly FitChart[];
    /** Keys of the specifications the means, guild and change charts were drawn from (see FitChart.drawn_from). */
    readonly drawn_from: { readonly means: string | null; readonly guilds: string | null; readonly change?: string | null };
  };
}

/** A stored snapshot as the API and the page use it. */
export interface Snapshot {
  readonly region: string;
  readonly version: number;
  readonly etag: string;
  readonly createdAt: Date;
  readonly payload: SnapshotPayload;
}
