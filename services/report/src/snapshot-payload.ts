import type { RegionSummary, TestOutcome } from '@stemwise/core';
import type { TopLevelSpec } from '@stemwise/core/charts';
import type { CarbonUncertaintySection } from './carbon-uncertainty';
import type { ChangeCoverage } from './summary/change-coverage';
import type { BiomassMethodRow } from './summary/biomass-method';

// What one region_summaries.payload holds (format 1). The API serves it without `charts`; the page
// draws the charts from their specifications when it is served (chart-svgs.ts). Plain JSON; null where a
// value cannot be computed.

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

/**
 * A chart as a snapshot keeps it: the vega-lite specification the page draws it from; snapshots made
 * before charts were drawn when served kept the SVG itself (a string).
 */
export type ChartSource = TopLevelSpec | string;

export interface FitChart {
  readonly forest_type: string;
  readonly metric: string;
  readonly axis: string;
  /** Plots of the forest type drawn, and how many of them are this region's (highlighted). */
  readonly points: number;
  readonly highlighted: number;
  /** What the page draws (null: no chart, see `missing`); absent in snapshots that kept the SVG instead. */
  readonly spec?: TopLevelSpec | null;
  /** The chart as drawn: on a page, and in snapshots made before charts were drawn when served. */
  readonly svg?: string | null;
  /** Why there is no chart (too few plots, no stored fit, drawing failed). */
  readonly missing: string | null;
}

/** The charts of a snapshot as stored: their specifications (or, in older snapshots, their SVG). */
export interface SnapshotCharts {
  readonly means: ChartSource | null;
  readonly guilds: ChartSource | null;
  /** Gains, losses and net change per forest type (null without change estimates); absent in older snapshots. */
  readonly change?: ChartSource | null;
  readonly fits: readonly FitChart[];
}

/** The charts of a snapshot as a page shows them: drawn (chart-svgs.ts); null where there is none or it could not be drawn. */
export interface DrawnCharts extends SnapshotCharts {
  readonly means: string | null;
  readonly guilds: string | null;
  readonly change?: string | null;
  readonly fits: ReadonlyArray<Omit<FitChart, 'spec' | 'svg'> & { readonly svg: string | null }>;
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

export interface SnapshotPayload<C extends SnapshotCharts = SnapshotCharts> {
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
  /** The same for the tree pool's net carbon change (tree_carbon_net_change_mg_ha_yr); absent in older snapshots. */
  readonly tree_carbon_change_uncertainty?: CarbonUncertaintySection | null;
  /** The pairs of visits behind the estimates of change (null: no plot measured twice); absent in snapshots made before it. */
  readonly change?: ChangeCoverage | null;
  /** Share of the AGB from each height source and wood-density level (absent in older snapshots). */
  readonly biomass_method?: readonly BiomassMethodRow[];
  /** Plots per forest type and plot area in ha (absent in older snapshots). */
  readonly plot_sizes?: readonly PlotSize[];
  readonly charts: C;
}

/** A stored snapshot as the API and the page use it. */
export interface Snapshot<C extends SnapshotCharts = SnapshotCharts> {
  readonly region: string;
  readonly version: number;
  readonly etag: string;
  readonly createdAt: Date;
  readonly payload: SnapshotPayload<C>;
}
