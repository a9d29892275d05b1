import { REGION_CHANGE_COLUMNS } from '@stemwise/db';
import { assertCautionSettings, orderStandVariables, standTableVariables, assertStratifiedOptions, cautionFlag, countLeftOut, DEFAULT_CAUTION, DEFAULT_REGION_VARIABLES, isPerHectare, leftOutSentence, leftOutText, stratifiedEstimate, WHOLE_REGION, type CautionSettings, type DisturbanceSummary, type EstimateDetail, type GuildRow, type PlotMetricColumn, type RegionRow, type RegionSummary, type StratifiedEstimate, type StratifiedOptions, type SummaryGuild, type SummaryNote, type TotalRow } from '@stemwise/core';
import { DEFAULT_DISTURBANCE_CLASSES, assertDisturbanceClasses, disturbanceClassIndex } from './disturbance-classes';
import { resolveForestAreas } from './forest-areas';
import { PlotStrata, validateInput, type PlotMetrics, type RegionSummaryInput } from './input';
import { note } from './notes';
import { countSpecies } from './species-counts';

export { DEFAULT_DISTURBANCE_CLASSES } from './disturbance-classes';
export { RegionSummaryInputError, type PlotMetrics, type RegionSummaryInput, type RegionSummaryOptions } from './input';

/**
 * Change between visits, estimated like the other variables over the plots whose latest visit has a
 * previous one (docs/methods.md#change-between-visits); added to the rows only where such plots exist.
 */
export const CHANGE_VARIABLES: readonly string[] = REGION_CHANGE_COLUMNS;

/** The default variables, those of change when any plot has a change value (a plot measured twice), and the stand-table classes of the plots (docs/methods.md#stand-tables). */
export function summaryVariables(plots: ReadonlyArray<{ readonly values: Readonly<Record<string, number | null | undefined>> }>): readonly string[] {
  const change = plots.some((p) => CHANGE_VARIABLES.some((v) => p.values[v] !== undefined && p.values[v] !== null));
  return variableList(change, standTableVariables(plots));
}

/** summaryVariables from what it depends on: whether some plot has a change value, and the stand-table variables some plot has a key for. */
export function variableList(change: boolean, standVariables: Iterable<string>): readonly string[] {
  return [...DEFAULT_REGION_VARIABLES, ...(change ? CHANGE_VARIABLES : []), ...orderStandVariables(standVariables)];
}

export const GUILD_VARIABLES: Readonly<Record<SummaryGuild, PlotMetricColumn>> = {
  pioneer: 'pioneer_ba_share',
  light_demander: 'light_demander_ba_share',
  shade_tolerant: 'shade_tolerant_ba_share',
  unassigned: 'unassigned_ba_share',
};

const DISTURBANCE_VARIABLE: PlotMetricColumn = 'disturbance_index';

type Estimator = (valueOf: (p: PlotMetrics) => number | null) => StratifiedEstimate;

// Region summary: per variable ȳ_st, SE, t-interval, sampling error and totals over forest types as strata (Cochran 1977 ch. 5)
export function summariseRegion(input: RegionSummaryInput, strata: PlotStrata = new PlotStrata(input.plots)): RegionSummary {
  if (strata.plots !== input.plots) throw new Error('summariseRegion: the strata given are not of these plots');
  const variables = input.variables ?? DEFAULT_REGION_VARIABLES;
  const guildVariables = Object.values(GUILD_VARIABLES);
  validateInput(input, variables, [...new Set([...variables, ...guildVariables, DISTURBANCE_VARIABLE])]);
  const opts = input.options ?? {};
  const classes = opts.disturbanceClasses ?? DEFAULT_DISTURBANCE_CLASSES;
  assertDisturbanceClasses(classes);
  const caution = opts.caution ?? DEFAULT_CAUTION;
  assertCautionSettings(caution);

  const { types, byType } = strata;
  const resolved = resolveForestAreas(types, input.forestAreas ?? {});
  const fpc = opts.plotAreaHa !== undefined && resolved.weighting === 'area';
  const estimatorOptions: StratifiedOptions = {
    confidence: opts.confidence,
    samplingErrorT: opts.samplingErrorT,
    df: opts.df,
    weighting: resolved.weighting,
    fpcUnitSize: fpc ? opts.plotAreaHa : undefined,
  };
  const estimate: Estimator = (valueOf) =>
    stratifiedEstimate(
      types.map((t) => ({ name: t, size: resolved.areas[t], values: (byType.get(t) as PlotMetrics[]).map(valueOf) })),
      estimatorOptions,
    );

  const estimates = new Map<string, StratifiedEstimate>();
  const estimateOf = (variable: string): StratifiedEstimate => {
    let e = estimates.get(variable);
    if (e === undefined) {
      e = stratifiedEstimate(
        strata.values(variable).map((values, h) => ({ name: types[h], size: resolved.areas[types[h]], values })),
        estimatorOptions,
      );
      estimates.set(variable, e);
    }
    return e;
  };
  // Checked here too so that an empty region does not let a bad option pass silently.
  assertStratifiedOptions(estimatorOptions);

  const rows: RegionRow[] = [];
  const totals: TotalRow[] = [];
  const details: EstimateDetail[] = [];
  for (const variable of variables) {
    const e = types.length === 0 ? null : estimateOf(variable);
    if (e === null) continue;
    const perHa = isPerHectare(variable);
    rows.push(regionRow(input.region, WHOLE_REGION, variable, e.n, e, e.size, perHa ? e.total : null, caution));
    if (perHa && e.size !== null && e.total !== null) {
      totals.push({ forest_type: WHOLE_REGION, variable, forest_area_ha: e.size, total: e.total, se: e.totalSe, ci_low: e.totalCiLow, ci_high: e.totalCiHigh });
    }
    details.push(estimateDetail(variable, e));
  }
  for (const [h, t] of types.entries()) {
    for (const variable of variables) {
      const s = estimateOf(variable).strata[h];
      const perHa = isPerHectare(variable);
      rows.push(regionRow(input.region, t, variable, s.n, s, s.size, perHa ? s.total : null, caution));
      if (perHa && s.size !== null && s.total !== null) {
        totals.push({ forest_type: t, variable, forest_area_ha: s.size, total: s.total, se: s.totalSe, ci_low: s.totalCiLow, ci_high: s.totalCiHigh });
      }
    }
  }

  const guild_composition: GuildRow[] = [];
  for (const [guild, variable] of Object.entries(GUILD_VARIABLES) as [SummaryGuild, string][]) {
    const e = types.length === 0 ? null : estimateOf(variable);
    if (e === null) continue;
    guild_composition.push({ forest_type: WHOLE_REGION, guild, n_plots: e.n, mean_share: e.mean, se: e.se });
    for (const s of e.strata) guild_composition.push({ forest_type: s.name, guild, n_plots: s.n, mean_share: s.mean, se: s.se });
  }

  const disturbance = summariseDisturbance(types, byType, classes, estimate);
  const species = countSpecies(input.plots, types);
  const notes = [
    ...(types.length === 0 ? [note('no_plots', `Region '${input.region}' has no plots: nothing to estimate.`)] : []),
    ...resolved.notes,
    ...methodNotes(opts.plotAreaHa, fpc, opts.confidence ?? 0.95, opts.samplingErrorT ?? 't', opts.df ?? 'satterthwaite'),
    ...coverageNotes(types, [...estimates.entries()].filter(([v]) => variables.includes(v))),
    ...leftOutNotes(strata, variables),
    ...(species !== null && species[0].n_plots_with_names < input.plots.length
      ? [note('species_names_partial', `Species counts use the ${species[0].n_plots_with_names} of ${input.plots.length} plots that came with names.`)]
      : []),
    note('totals_per_hectare_only', 'Totals (mean × forest area) are given for per-hectare variables only.'),
    note('caution', 'Standard errors and intervals cover sampling error only, not the error of biomass models or measurements. Carbon and biomass figures are estimates: for reporting and for logging decisions, defer to national methods and local regulations.'),
  ];

  return {
    region: input.region,
    n_plots: input.plots.length,
    forest_types: types,
    weighting: resolved.weighting,
    confidence: opts.confidence ?? 0.95,
    sampling_error_t: opts.samplingErrorT ?? 't',
    fpc_applied: fpc,
    caution,
    rows,
    totals,
    estimate_details: details,
    guild_composition,
    disturbance,
    species,
    notes,
  };
}

// Plots without a value of a variable are left out of its estimates: say how many, and why.
function leftOutNotes(strata: PlotStrata, variables: readonly string[]): SummaryNote[] {
  const out: SummaryNote[] = [];
  for (const variable of variables) {
    // The plots whose value is not a number (read from the columns); countLeftOut gives their reasons.
    const without = strata.values(variable).flatMap((values, h) => (strata.byType.get(strata.types[h]) as readonly PlotMetrics[]).filter((_, i) => values[i] === null));
    if (without.length === 0) continue;
    const counts = countLeftOut(without.map((p) => p.values), [variable]);
    const n = Object.values(counts).reduce((a, b) => a + b, 0);
    if (n === 0) continue;
    out.push(note('plots_left_out', `${variable}: ${n} of ${strata.plots.length} plots left out of the estimates, having no value: ${leftOutSentence(leftOutText(counts))}.`, null, variable));
  }
  return out;
}

/** How a stratified estimate of one variable was made (df, t, strata covered). */
export function estimateDetail(variable: string, e: StratifiedEstimate): EstimateDetail {
  return {
    variable,
    n_plots: e.n,
    df: e.df,
    df_method: e.dfMethod,
    t: e.tMultiplier,
    sampling_error_multiplier: e.samplingErrorMultiplier,
    strata_used: e.strataUsed,
    strata_without_values: e.strataWithoutValues,
    single_plot_strata: e.singleValueStrata,
  };
}

export interface Estimated {
  readonly mean: number | null;
  readonly se: number | null;
  readonly ciLow: number | null;
  readonly ciHigh: number | null;
  readonly samplingErrorPct: number | null;
}

export function regionRow(region: string, forestType: string, variable: string, n: number, e: Estimated, area: number | null, total: number | null, caution: CautionSettings): RegionRow {
  // Key order is REGION_COLUMNS order.
  return {
    region,
    forest_type: forestType,
    variable,
    n_plots: n,
    mean: e.mean,
    se: e.se,
    ci_low: e.ciLow,
    ci_high: e.ciHigh,
    sampling_error_pct: e.samplingErrorPct,
    forest_area_ha: area,
    total,
    caution_flag: cautionFlag(n, e.samplingErrorPct, caution),
    // The whole interval of carbon_mg_ha is added by the summaries job (carbon-uncertainty.ts); empty elsewhere.
    whole_se: null,
    whole_ci_low: null,
    whole_ci_high: null,
    total_whole_ci_low: null,
    total_whole_ci_high: null,
  };
}

// p_h = share of plots in the class per forest type; p_st = Σ W_h p_h for the region, SE from the 0/1 indicator (Cochran 1977 ch. 5)
function summariseDisturbance(types: readonly string[], byType: ReadonlyMap<string, readonly PlotMetrics[]>, classes: RegionSummary['disturbance']['classes'], estimate: Estimator): DisturbanceSummary {
  const indexOf = new Map<PlotMetrics, number>();
  for (const list of byType.values()) {
    for (const p of list) {
      const x = p.values[DISTURBANCE_VARIABLE];
      if (x !== null && x !== undefined) indexOf.set(p, disturbanceClassIndex(x, classes));
    }
  }
  const rows: DisturbanceSummary['rows'][number][] = [];
  if (types.length > 0) {
    classes.forEach((c, k) => {
      const e = estimate((p) => {
        const i = indexOf.get(p);
        return i === undefined ? null : i === k ? 1 : 0;
      });
      const lower = k === 0 ? null : classes[k - 1].below;
      const count = (ps: readonly PlotMetrics[]): number => ps.reduce((a, p) => a + (indexOf.get(p) === k ? 1 : 0), 0);
      const perType = e.strata.map((s) => ({ forest_type: s.name, class: c.name, lower, upper: c.below, n_plots: count(byType.get(s.name) ?? []), share: s.mean, share_se: s.se }));
      rows.push({ forest_type: WHOLE_REGION, class: c.name, lower, upper: c.below, n_plots: perType.reduce((a, r) => a + r.n_plots, 0), share: e.mean, share_se: e.se }, ...perType);
    });
  }
  const plots_without_index = types.map((t) => ({ forest_type: t, n_plots: (byType.get(t) ?? []).filter((p) => !indexOf.has(p)).length }));
  return { classes, rows, plots_without_index };
}

function methodNotes(plotAreaHa: number | undefined, fpc: boolean, confidence: number, seT: 't' | 1.96 | 2, df: 'satterthwaite' | number): SummaryNote[] {
  const notes: SummaryNote[] = [];
  if (fpc) notes.push(note('fpc_applied', `Finite population correction applied: N_h = forest area / ${plotAreaHa} ha plot area.`));
  else if (plotAreaHa !== undefined) notes.push(note('fpc_unavailable', 'A plot area was given but forest areas are incomplete: no finite population correction.'));
  else notes.push(note('fpc_not_applied', 'No finite population correction: plots are a negligible share of forest area.'));
  notes.push(
    note(
      'degrees_of_freedom',
      df === 'satterthwaite'
        ? 'Region intervals use Student t at Satterthwaite effective degrees of freedom (Cochran 1977 eq. 5.16; n − 1 with one forest type); forest-type intervals use n_h − 1.'
        : `Region intervals use Student t at ${df} degrees of freedom (set); forest-type intervals use n_h − 1.`,
    ),
  );
  notes.push(
    note(
      'sampling_error_multiplier',
      seT === 't'
        ? `Sampling error % = 100 · t · SE / mean, t the two-sided Student t at ${Number((confidence * 100).toPrecision(6))} % and the df above.`
        : `Sampling error % = 100 · ${seT} · SE / mean (fixed multiplier by protocol); intervals still use Student t.`,
    ),
  );
  return notes;
}

function coverageNotes(types: readonly string[], estimates: readonly [string, StratifiedEstimate][]): SummaryNote[] {
  const notes: SummaryNote[] = [];
  for (const t of types) {
    const single = estimates.filter(([, e]) => e.singleValueStrata.includes(t)).map(([v]) => v);
    if (single.length > 0) {
      notes.push(
        note('single_plot_stratum', `Forest type '${t}' has a single plot with a value for ${single.join(', ')}: no variance can be estimated, so SE, interval and sampling error are empty for it and for the region on these variables (strata are not merged automatically).`, t),
      );
    }
  }
  for (const [v, e] of estimates) {
    if (e.strataUsed.length === 0) notes.push(note('no_values', `No plot has a value for ${v}.`, null, v));
    else if (e.strataWithoutValues.length > 0) {
      notes.push(note('stratum_without_values', `No plot of ${e.strataWithoutValues.map((t) => `'${t}'`).join(', ')} has a value for ${v}: the region estimate covers only ${e.strataUsed.map((t) => `'${t}'`).join(', ')}.`, null, v));
    }
  }
  return notes;
}
