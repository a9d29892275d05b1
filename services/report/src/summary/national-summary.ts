import { assertCautionSettings, assertStratifiedOptions, DEFAULT_CAUTION, DEFAULT_REGION_VARIABLES, isPerHectare, stratifiedEstimate, type StratifiedEstimate, type StratifiedOptions, type StratumSummary } from '@stemwise/core';
import { resolveForestAreas } from './forest-areas';
import { assertForestAreas, assertVariables, PlotStrata, RegionSummaryInputError, unknownVariables, validateInput, type PlotMetrics, type RegionSummaryOptions } from './input';
import { strataMoments, type StrataMoments } from './region-aggregates';
import { fmtHa, note } from './notes';
import { estimateDetail, regionRow } from './region-summary';
import { NATIONAL, WHOLE_REGION, type EstimateDetail, type NationalStratum, type NationalSummary, type RegionRow, type SummaryNote, type TotalRow } from '@stemwise/core';

// The national estimate: every region together, with region × forest type as the strata of one
// stratified random sample (Cochran 1977, Sampling Techniques 3rd ed., ch. 5; docs/methods.md#national-estimates).
// It is the estimator of the region summaries with finer strata, so the same decisions hold: weights
// W_h = A_h / A from the forest areas of strata.csv when every stratum with plots has one, else
// W_h = n_h / n for every national figure; Satterthwaite df; no finite population correction.

export interface NationalRegionInput {
  readonly region: string;
  /** One visit per plot (the latest). */
  readonly plots: readonly PlotMetrics[];
  /** Forest area in ha per forest type of this region; may be empty or partial. */
  readonly forestAreas?: Readonly<Record<string, number>>;
}

export interface NationalSummaryInput {
  readonly regions: readonly NationalRegionInput[];
  /** Variables to estimate, in row order. Default DEFAULT_REGION_VARIABLES. */
  readonly variables?: readonly string[];
  readonly options?: Pick<RegionSummaryOptions, 'confidence' | 'samplingErrorT' | 'df' | 'caution'>;
}

/** A region given by its strata (forest types) and the moments of their values, as its summary keeps them (region-aggregates.ts). */
export interface NationalRegionStrata {
  readonly region: string;
  readonly strata: StrataMoments;
  /** Forest area in ha per forest type of this region; may be empty or partial. */
  readonly forestAreas?: Readonly<Record<string, number>>;
}

export interface NationalStrataInput extends Omit<NationalSummaryInput, 'regions'> {
  readonly regions: readonly NationalRegionStrata[];
}

interface Stratum {
  readonly name: string;
  readonly region: string;
  readonly forestType: string;
  readonly nPlots: number;
  /** Per variable, this stratum's moments. */
  readonly moments: StrataMoments['moments'];
  /** Index of this stratum in its region's moments. */
  readonly h: number;
  readonly area: number | null;
}

const stratumName = (region: string, forestType: string): string => `${region} / ${forestType}`;

function assertRegionNames(regions: ReadonlyArray<{ readonly region: string }>): void {
  const seen = new Set<string>();
  for (const r of regions) {
    if (r.region === NATIONAL) throw new RegionSummaryInputError('BAD_REGION', `a region may not be named '${NATIONAL}': that name stands for the national rows`);
    if (seen.has(r.region)) throw new RegionSummaryInputError('BAD_REGION', `region '${r.region}' is given twice`);
    seen.add(r.region);
  }
}

/** The national summary from every region's plots: each region's strata moments (strataMoments), then combineNation. */
export function summariseNation(input: NationalSummaryInput): NationalSummary {
  const variables = input.variables ?? DEFAULT_REGION_VARIABLES;
  assertRegionNames(input.regions);
  for (const r of input.regions) validateInput({ region: r.region, plots: r.plots, forestAreas: r.forestAreas }, variables, variables);
  return combineNation({ ...input, variables, regions: input.regions.map((r) => ({ region: r.region, forestAreas: r.forestAreas, strata: strataMoments(new PlotStrata(r.plots), variables) })) });
}

// National rows: ȳ_st = Σ W_h ȳ_h, v = Σ W_h² s_h²/n_h over h = region × forest type, Satterthwaite df (Cochran 1977 ch. 5, eq. 5.16), each stratum by its n_h, ȳ_h, s_h²
export function combineNation(input: NationalStrataInput): NationalSummary {
  const variables = input.variables ?? DEFAULT_REGION_VARIABLES;
  assertRegionNames(input.regions);
  if (input.regions.length > 0) assertVariables(variables);
  for (const r of input.regions) {
    const { forest_types: types, moments } = r.strata;
    if (types.length === 0) continue;
    const unknown = variables.filter((v) => !Object.hasOwn(moments, v));
    if (unknown.length > 0) throw unknownVariables(unknown);
    for (const v of variables) {
      if (moments[v].length !== types.length) throw new RegionSummaryInputError('BAD_VARIABLES', `region '${r.region}' has moments of ${v} for ${moments[v].length} forest types, not ${types.length}`);
    }
  }
  for (const r of input.regions) assertForestAreas(r.forestAreas);
  const opts = input.options ?? {};
  const estimatorBase: StratifiedOptions = { confidence: opts.confidence, samplingErrorT: opts.samplingErrorT, df: opts.df };
  assertStratifiedOptions(estimatorBase);
  const caution = opts.caution ?? DEFAULT_CAUTION;
  assertCautionSettings(caution);

  // Strata and their areas, region by region, with the region summaries' own rule for missing areas.
  const strata: Stratum[] = [];
  const areaNotes: SummaryNote[] = [];
  let allAreas = true;
  const regions = input.regions.filter((r) => r.strata.forest_types.length > 0).sort((a, b) => (a.region < b.region ? -1 : a.region > b.region ? 1 : 0));
  for (const r of regions) {
    const types = r.strata.forest_types.map((t) => t.forest_type);
    const resolved = resolveForestAreas(types, r.forestAreas ?? {});
    if (resolved.weighting !== 'area') allAreas = false;
    for (const n of resolved.notes) {
      const t = n.forest_type as string;
      if (n.code === 'unsampled_area') areaNotes.push(note('unsampled_area', `'${stratumName(r.region, t)}' (${fmtHa((r.forestAreas ?? {})[t])}) has no plot; national estimates and totals do not cover it.`, t));
      if (n.code === 'area_zero_with_plots') areaNotes.push(note('area_zero_with_plots', `'${stratumName(r.region, t)}' has plots but a forest area of 0 ha; its area is treated as unknown.`, t));
    }
    r.strata.forest_types.forEach((t, h) => strata.push({ name: stratumName(r.region, t.forest_type), region: r.region, forestType: t.forest_type, nPlots: t.n_plots, moments: r.strata.moments, h, area: resolved.areas[t.forest_type] }));
  }
  const weighting = allAreas && strata.length > 0 ? 'area' : 'plot_count';
  const options: StratifiedOptions = { ...estimatorBase, weighting };
  const forestTypes = [...new Set(strata.map((s) => s.forestType))].sort();

  const estimate = (subset: readonly Stratum[], variable: string): StratifiedEstimate =>
    stratifiedEstimate(
      subset.map((s): StratumSummary => ({ name: s.name, size: s.area, ...s.moments[variable][s.h] })),
      options,
    );

  const rows: RegionRow[] = [];
  const totals: TotalRow[] = [];
  const details: (EstimateDetail & { forest_type: string })[] = [];
  const coverage: SummaryNote[] = [];
  const groups: Array<[string, readonly Stratum[]]> = strata.length ? [[WHOLE_REGION, strata], ...forestTypes.map((t): [string, Stratum[]] => [t, strata.filter((s) => s.forestType === t)])] : [];
  for (const [forestType, subset] of groups) {
    for (const variable of variables) {
      const e = estimate(subset, variable);
      const perHa = isPerHectare(variable);
      rows.push(regionRow(NATIONAL, forestType, variable, e.n, e, e.size, perHa ? e.total : null, caution));
      if (perHa && e.size !== null && e.total !== null) {
        totals.push({ forest_type: forestType, variable, forest_area_ha: e.size, total: e.total, se: e.totalSe, ci_low: e.totalCiLow, ci_high: e.totalCiHigh });
      }
      details.push({ forest_type: forestType, ...estimateDetail(variable, e) });
      if (forestType === WHOLE_REGION) coverage.push(...coverageNotes(variable, e));
    }
  }

  const missingAreas = strata.filter((s) => s.area === null).map((s) => `'${s.name}'`);
  const weightNote =
    strata.length === 0
      ? note('no_plots', 'No region has plots: nothing to estimate.')
      : weighting === 'area'
        ? note('weights_area', `Strata (region × forest type) are weighted by forest area (W_h = A_h / A, ${fmtHa(strata.reduce((a, s) => a + (s.area as number), 0))} in all).`)
        : note('areas_incomplete', `No forest area for ${missingAreas.join(', ')}: every national figure is weighted by plot counts (W_h = n_h / n), which assumes plots were placed in proportion to area; no national totals.`);
  const stratumRows: NationalStratum[] = strata.map((s) => ({ region: s.region, forest_type: s.forestType, n_plots: s.nPlots, forest_area_ha: s.area }));
  const df = opts.df ?? 'satterthwaite';
  const seT = opts.samplingErrorT ?? 't';
  return {
    n_plots: strata.reduce((a, s) => a + s.nPlots, 0),
    regions: regions.map((r) => r.region),
    forest_types: forestTypes,
    strata: stratumRows,
    weighting,
    confidence: opts.confidence ?? 0.95,
    sampling_error_t: seT,
    caution,
    rows,
    totals,
    estimate_details: details,
    notes: [
      weightNote,
      ...areaNotes,
      note('national_strata', `National figures are stratified by region × forest type (${strata.length} strata in ${regions.length} regions); each forest type nationally is stratified by region. Strata are named 'region / forest type'.`),
      note('fpc_not_applied', 'No finite population correction: plots are a negligible share of forest area.'),
      note(
        'degrees_of_freedom',
        df === 'satterthwaite'
          ? 'Intervals use Student t at Satterthwaite effective degrees of freedom (Cochran 1977 eq. 5.16; n − 1 where one stratum has values).'
          : `Intervals use Student t at ${df} degrees of freedom (set).`,
      ),
      note(
        'sampling_error_multiplier',
        seT === 't' ? 'Sampling error % = 100 · t · SE / mean, t the two-sided Student t at the df above.' : `Sampling error % = 100 · ${seT} · SE / mean (fixed multiplier by protocol); intervals still use Student t.`,
      ),
      ...coverage,
      note('totals_per_hectare_only', 'Totals (mean × forest area) are given for per-hectare variables only.'),
      note('caution', 'Standard errors and intervals cover sampling error only, not the error of biomass models or measurements. Carbon and biomass figures are estimates: for reporting and for logging decisions, defer to national methods and local regulations.'),
    ],
  };
}

function coverageNotes(variable: string, e: StratifiedEstimate): SummaryNote[] {
  const list = (names: readonly string[]) => names.map((t) => `'${t}'`).join(', ');
  if (e.strataUsed.length === 0) return [note('no_values', `No plot has a value for ${variable}.`, null, variable)];
  const out: SummaryNote[] = [];
  if (e.singleValueStrata.length > 0) {
    out.push(note('single_plot_stratum', `${list(e.singleValueStrata)} ${e.singleValueStrata.length === 1 ? 'has' : 'have'} a single plot with a value for ${variable}: no variance can be estimated, so the national SE, interval and sampling error are empty (strata are not merged automatically).`, null, variable));
  }
  if (e.strataWithoutValues.length > 0) {
    out.push(note('stratum_without_values', `No plot of ${list(e.strataWithoutValues)} has a value for ${variable}: the national estimate covers only the other strata.`, null, variable));
  }
  return out;
}
