import { z } from 'zod';

// Request and response schemas of the HTTP API (zod; the OpenAPI document is generated from them).

const num = z.number().nullable();

// Text from a path or query: PostgreSQL cannot hold U+0000, and no name in the data has a control
// character or a lone surrogate, so such input is a 400 with a message, never a failed query.
const CONTROL_OR_LONE_SURROGATE = /[\u0000-\u001f\u007f]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;
export const paramText = (max: number) =>
  z
    .string()
    .min(1)
    .max(max)
    .refine((v) => !CONTROL_OR_LONE_SURROGATE.test(v), 'must not contain control characters (such as NUL) or broken Unicode');

/** Summary versions are PostgreSQL integers (int4). */
export const VersionNumber = z.coerce.number().int().min(1).max(2_147_483_647);

export const ErrorBody = z
  .object({ error: z.string().describe('stable code, e.g. unauthorized, forbidden, not_found'), message: z.string() })
  .describe('An error: a stable code and a sentence for people');

export const RegionParams = z.object({ region: paramText(80).describe('region name as loaded from plots.csv') });

export const RegionListItem = z.object({
  region: z.string(),
  plots: z.number().int(),
  latest_version: z.number().int().nullable().describe('null until the first summary is assembled'),
  updated_at: z.string().nullable(),
  links: z.object({ summary: z.string(), summary_csv: z.string(), plots: z.string(), change: z.string(), summary_changes: z.string(), page: z.string() }),
});
export const RegionList = z.object({
  national: z
    .object({
      latest_version: z.number().int().nullable(),
      updated_at: z.string().nullable(),
      links: z.object({ summary: z.string(), summary_csv: z.string(), versions: z.string(), change: z.string(), page: z.string() }),
    })
    .optional()
    .describe('the national summary (all regions together): present for admin tokens only'),
  regions: z.array(RegionListItem),
});

export const SummaryQuery = z.object({
  format: z.enum(['json', 'csv']).optional().describe('json (default) or csv; `Accept: text/csv` also selects CSV'),
  version: VersionNumber.optional().describe('an earlier snapshot; default the latest'),
});

export const RegionRowSchema = z.object({
  region: z.string(),
  forest_type: z.string().describe('a forest type, or `all` for the stratified estimate of the whole region'),
  variable: z.string(),
  n_plots: z.number().int(),
  mean: num,
  se: num,
  ci_low: num,
  ci_high: num,
  sampling_error_pct: num.describe('half-width of the 95 % interval over the mean, in percent'),
  forest_area_ha: num,
  total: num.describe('mean × forest area, for per-hectare variables with known areas'),
  caution_flag: z.enum(['none', 'few_plots', 'wide_error', 'few_plots_wide_error', 'no_error_estimate']).optional().describe('few plots or a wide sampling error (docs/exports.md); absent in summaries made before it existed'),
  whole_se: num.optional().describe('carbon_mg_ha, tree_carbon_mg_ha and carbon_net_change_mg_ha_yr rows: SD of the Monte Carlo of every error source (docs/methods.md#carbon-uncertainty)'),
  whole_ci_low: num.optional().describe('carbon_mg_ha, tree_carbon_mg_ha and carbon_net_change_mg_ha_yr rows: the whole interval (sampling and model errors)'),
  whole_ci_high: num.optional(),
  total_whole_ci_low: num.optional().describe('the same rows: the whole interval of the total'),
  total_whole_ci_high: num.optional(),
});

const SharesSchema = z.object({
  sampling: z.number(),
  allometry: z.number(),
  heightResidual: z.number(),
  woodDensity: z.number(),
  heightParameters: z.number(),
  rootShoot: z.number(),
});

const carbonSectionSchema = (variable: string, pool: string) => z
  .object({
    variable: z.literal(variable),
    pool: z.literal(pool),
    rows: z.array(
      z.object({
        forest_type: z.string(),
        n_plots: z.number().int(),
        mean: z.number(),
        sampling_se: z.number(),
        sampling_ci_low: z.number(),
        sampling_ci_high: z.number(),
        whole_se: z.number(),
        whole_ci_low: z.number(),
        whole_ci_high: z.number(),
        forest_area_ha: num,
        total: num,
        total_sampling_ci_low: num,
        total_sampling_ci_high: num,
        total_whole_ci_low: num,
        total_whole_ci_high: num,
        shares: SharesSchema.describe('share of each source in the sum of the sources’ variances'),
      }),
    ),
    draws: z.number().int(),
    seed: z.number().int(),
    confidence: z.number(),
    tree_error_scope: z.enum(['forest', 'plots']).nullable(),
    missing: z.string().nullable(),
    covers: z.array(z.string()),
    not_covered: z.array(z.string()),
  })
  .nullable();

export const CarbonUncertaintySchema = carbonSectionSchema('carbon_mg_ha', 'above-ground').describe(
  'whole uncertainty of the above-ground carbon stock (docs/methods.md#carbon-uncertainty); null when STEMWISE_CARBON_DRAWS is 0 or the summary predates it',
);
export const TreeCarbonUncertaintySchema = carbonSectionSchema('tree_carbon_mg_ha', 'trees')
  .optional()
  .describe('whole uncertainty of the tree pool, tree_carbon_mg_ha: live above- and below-ground biomass (each plot its own root-to-shoot ratio) and standing dead wood; null when off, absent in summaries made before it');
export const CarbonChangeUncertaintySchema = carbonSectionSchema('carbon_net_change_mg_ha_yr', 'above-ground change')
  .optional()
  .describe('whole uncertainty of the net above-ground carbon change between visits, carbon_net_change_mg_ha_yr (Mg C/ha/yr); null when off, absent in summaries made before it');
export const TreeCarbonChangeUncertaintySchema = carbonSectionSchema('tree_carbon_net_change_mg_ha_yr', 'tree change')
  .optional()
  .describe("whole uncertainty of the tree pool's net carbon change between visits, tree_carbon_net_change_mg_ha_yr (Mg C/ha/yr; each visit its own root-to-shoot ratio); null when off, absent in summaries made before it");

const CautionSchema = z.object({ min_plots: z.number().int(), max_sampling_error_pct: z.number() }).optional().describe('thresholds of caution_flag');

const TotalRowSchema = z.object({ forest_type: z.string(), variable: z.string(), forest_area_ha: z.number(), total: z.number(), se: num, ci_low: num, ci_high: num });
const EstimateDetailSchema = z.object({
  variable: z.string(),
  n_plots: z.number().int(),
  df: num.describe('degrees of freedom of the interval (Satterthwaite for the region)'),
  df_method: z.enum(['satterthwaite', 'n_minus_strata', 'fixed']).nullable(),
  t: num,
  sampling_error_multiplier: num,
  strata_used: z.array(z.string()),
  strata_without_values: z.array(z.string()),
  single_plot_strata: z.array(z.string()),
});
const GuildRowSchema = z.object({
  forest_type: z.string(),
  guild: z.enum(['pioneer', 'light_demander', 'shade_tolerant', 'unassigned']),
  n_plots: z.number().int(),
  mean_share: num,
  se: num,
});
const DisturbanceSchema = z.object({
  classes: z.array(z.object({ name: z.string(), below: num })),
  rows: z.array(
    z.object({ forest_type: z.string(), class: z.string(), lower: num, upper: num, n_plots: z.number().int(), share: num, share_se: num }),
  ),
  plots_without_index: z.array(z.object({ forest_type: z.string(), n_plots: z.number().int() })),
});
const NoteSchema = z.object({ code: z.string(), message: z.string(), forest_type: z.string().nullable(), variable: z.string().nullable() });

export const RegionSummarySchema = z.object({
  region: z.string(),
  n_plots: z.number().int(),
  forest_types: z.array(z.string()),
  weighting: z.enum(['area', 'plot_count']).describe('W_h from forest areas, or from plot counts when areas are missing'),
  confidence: z.number(),
  sampling_error_t: z.union([z.literal('t'), z.number()]),
  fpc_applied: z.boolean(),
  caution: CautionSchema,
  rows: z.array(RegionRowSchema),
  totals: z.array(TotalRowSchema),
  estimate_details: z.array(EstimateDetailSchema),
  guild_composition: z.array(GuildRowSchema),
  disturbance: DisturbanceSchema,
  species: z.array(z.object({ forest_type: z.string(), n_species: z.number().int(), n_plots_with_names: z.number().int() })).nullable(),
  notes: z.array(NoteSchema),
});

export const NationalSummarySchema = z.object({
  n_plots: z.number().int(),
  regions: z.array(z.string()),
  forest_types: z.array(z.string()),
  strata: z.array(z.object({ region: z.string(), forest_type: z.string(), n_plots: z.number().int(), forest_area_ha: num })).describe('the region × forest type strata'),
  weighting: z.enum(['area', 'plot_count']).describe('W_h from forest areas of every stratum, or from plot counts when one is missing'),
  confidence: z.number(),
  sampling_error_t: z.union([z.literal('t'), z.number()]),
  caution: CautionSchema,
  rows: z.array(RegionRowSchema).describe('`export regions` rows with region `national`: `all` (every region × forest type), then each forest type nationally'),
  totals: z.array(TotalRowSchema),
  estimate_details: z.array(EstimateDetailSchema.extend({ forest_type: z.string() })),
  notes: z.array(NoteSchema),
});

export const FitRowSchema = z.object({
  scope: z.string().describe('`all` = the forest type as a whole; otherwise a region'),
  forest_type: z.string(),
  metric: z.string(),
  axis: z.string(),
  n: z.number().int(),
  model: z.string(),
  b0: num,
  b1: num,
  b2: num,
  se_b0: num,
  se_b1: num,
  se_b2: num,
  p_b1: num,
  p_b2: num,
  r2: num,
  adj_r2: num,
  aicc: num,
  peak_x: num,
  peak_ci_low: num,
  peak_ci_high: num,
  verdict: z.enum(['hump', 'increasing', 'decreasing', 'u_shape', 'none']).or(z.string()),
  plots_left_out: z.number().int().nullable().optional().describe('plots without the metric or the axis, left out of the fit (absent in summaries made before it was counted)'),
  left_out_reasons: z.string().nullable().optional().describe('`<column>:<reason>=<count>` joined by `;` (docs/exports.md)'),
  delta_aicc: num.optional().describe('AICc(line) − AICc(parabola); positive favours the parabola (quadratic row)'),
  curvature_p: num.optional().describe('two-sided p of the curvature b2 in the Mitchell-Olds & Shaw test'),
  mos_turn_x: num.optional().describe("the parabola's turning point"),
  mos_turn_inside: z.enum(['yes', 'no']).nullable().optional().describe('whether the turning point lies inside the observed x range'),
  mos_result: z.enum(['pass', 'fail', 'not_testable']).nullable().optional().describe('Mitchell-Olds & Shaw test: significant curvature of the right sign and the turn inside the range'),
  two_lines_break_x: num.optional(),
  two_lines_slope_1: num.optional().describe('slope of the line below the break'),
  two_lines_p_1: num.optional(),
  two_lines_slope_2: num.optional().describe('slope of the line above the break'),
  two_lines_p_2: num.optional(),
  two_lines_result: z.enum(['pass', 'fail', 'not_testable']).nullable().optional().describe('two-lines test: a significant rise then fall (hump) or fall then rise (U)'),
  peak_boot_low: num.optional().describe('percentile bootstrap interval of the peak (hump or U verdicts)'),
  peak_boot_high: num.optional(),
});

export const ChangeCoverageSchema = z
  .object({
    n_plots_with_pair: z.number().int().describe('plots whose latest visit has a previous one: the plots the estimates of change use'),
    n_plots: z.number().int().describe('plots in all, measured once or more'),
    by_forest_type: z.array(z.object({ forest_type: z.string(), n_plots_with_pair: z.number().int(), n_plots: z.number().int() })),
    first_visit: z.string().describe('earliest first visit of a pair (ISO date)'),
    last_visit: z.string().describe('latest second visit of a pair (ISO date)'),
    interval_years: z.object({ min: z.number(), mean: z.number(), max: z.number() }).describe('years between the two visits of a pair'),
  })
  .describe('the pairs of visits behind the estimates of change');

export const ChangeResponse = z.object({
  region: z.string().describe('the region, or `national`'),
  version: z.number().int().describe('the summary version the estimates come from'),
  created_at: z.string(),
  about: z.string().describe('what the estimates are'),
  net_carbon_change: z.string().describe('what net carbon change means, and its unit'),
  coverage: ChangeCoverageSchema.nullable().describe('null when no plot has been measured twice (or the summary predates the record)'),
  variables: z.array(z.object({ variable: z.string(), name: z.string(), unit: z.string().describe('unit of the values as served'), description: z.string() })),
  estimates: z.array(RegionRowSchema).describe('the `export regions` rows of the change variables: `all` first, then each forest type; empty without plots measured twice'),
  carbon_uncertainty: carbonSectionSchema('carbon_net_change_mg_ha_yr', 'above-ground change').describe('whole uncertainty of net carbon change (docs/methods.md#carbon-uncertainty); null when off or in a summary made before it'),
  tree_carbon_uncertainty: carbonSectionSchema('tree_carbon_net_change_mg_ha_yr', 'tree change').describe("whole uncertainty of the tree pool's net carbon change (docs/methods.md#carbon-uncertainty); null when off or in a summary made before it"),
  caution: z.string(),
});

export const SummaryResponse = z.object({
  region: z.string(),
  version: z.number().int(),
  created_at: z.string(),
  etag: z.string(),
  data: z.object({
    plots: z.number().int(),
    first_survey: z.string().nullable(),
    last_survey: z.string().nullable(),
    species_reference_version: z.number().int().nullable(),
  }),
  method: z.object({ estimator: z.string(), biomass: z.string(), carbon_fraction: z.number(), carbon: z.string(), fits: z.string() }),
  summary: RegionSummarySchema,
  fits: z.array(FitRowSchema),
  carbon_uncertainty: CarbonUncertaintySchema,
  tree_carbon_uncertainty: TreeCarbonUncertaintySchema,
  carbon_change_uncertainty: CarbonChangeUncertaintySchema,
  tree_carbon_change_uncertainty: TreeCarbonChangeUncertaintySchema,
  change: ChangeCoverageSchema.nullable().optional().describe('the pairs of visits behind the estimates of change (absent in summaries made before it was recorded)'),
});

export const NationalResponse = SummaryResponse.omit({ fits: true }).extend({
  region: z.literal('national'),
  data: SummaryResponse.shape.data.omit({ species_reference_version: true }).extend({ regions: z.number().int() }),
  method: z.object({ estimator: z.string() }),
  summary: NationalSummarySchema,
  sources: z.record(z.string(), z.number().int().nullable()).describe('region → its summary version current when this was assembled'),
});

export const SummaryChangesResponse = z.object({
  region: z.string(),
  version: z.number().int(),
  previous_version: z.number().int().nullable().describe('null: the first version'),
  plots_added: z.array(z.string()).readonly().nullable().describe('plot keys; null when either version was made before plot lists were kept'),
  plots_removed: z.array(z.string()).readonly().nullable(),
  moved: z
    .array(z.object({ forest_type: z.string(), variable: z.string(), old_mean: z.number(), new_mean: z.number(), se: z.number() }))
    .readonly()
    .describe('estimates whose mean moved by more than the SE of the new estimate'),
});

export const VersionList = z.object({
  region: z.string(),
  versions: z.array(z.object({ version: z.number().int(), etag: z.string(), created_at: z.string() })),
});

export const NationalVersionList = VersionList.omit({ region: true });

export const GeoJsonCollection = z
  .object({
    type: z.literal('FeatureCollection'),
    features: z.array(
      z.object({
        type: z.literal('Feature'),
        geometry: z.object({ type: z.literal('Point'), coordinates: z.array(z.number()) }),
        properties: z.record(z.string(), z.union([z.string(), z.number(), z.null()])),
      }),
    ),
  })
  .describe('GeoJSON (RFC 7946): the latest computed visit of each plot, WGS 84 longitude/latitude');

export const FitsQuery = z.object({
  forest_type: paramText(80).optional(),
  metric: paramText(80).optional().describe('default: the configured fit metric (fisher_alpha)'),
  axis: paramText(80).optional().describe('default: the configured fit axis (disturbance_index)'),
  scope: paramText(80).optional().describe('`all` (the forest type as a whole) or a region; default every scope the token may see'),
  region: paramText(80).optional().describe('the fits of this region (any name, `all` included); takes precedence over scope'),
  format: z.enum(['json', 'csv']).optional(),
});
export const ComputeProblemSchema = z
  .object({
    stage: z.enum(['plot', 'change', 'fit', 'summary']),
    forest_type: z.string().nullable(),
    region: z.string().nullable(),
    plot_id: z.string().nullable(),
    run_id: z.string(),
    reason: z.string(),
  })
  .describe('something the latest recompute could not compute (the rest was computed): its stage, what it concerns and why');
export const FitList = z.object({
  fits: z.array(FitRowSchema),
  problems: z.array(ComputeProblemSchema).optional().describe('fits that could not be computed (present only when there are some)'),
});

export const BatchParams = z.object({ id: z.string().uuid() });
