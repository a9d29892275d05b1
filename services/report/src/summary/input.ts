import { WHOLE_REGION, type CautionSettings, type DisturbanceClass, type SamplingErrorT } from '@stemwise/core';

/** One plot's figures, as in `export plots` (numeric columns; null where not computable). */
export interface PlotMetrics {
  readonly plotId: string;
  readonly forestType: string;
  /** A key that is absent counts as null. */
  readonly values: Readonly<Record<string, number | null | undefined>>;
  /** Accepted names of the identified stems, for species counts (duplicates allowed). */
  readonly speciesNames?: readonly string[];
}

export interface RegionSummaryOptions {
  /** Confidence level of all intervals. Default 0.95. */
  readonly confidence?: number;
  /** Multiplier in sampling_error_pct: 't' (Student t at the df used, default), 1.96 or 2. */
  readonly samplingErrorT?: SamplingErrorT;
  /** df of the whole-region interval: 'satterthwaite' (default) or a fixed number. */
  readonly df?: 'satterthwaite' | number;
  /** Plot area in ha. Given (and areas known): the finite population correction is applied with
   * N_h = forest area / plot area. Default: not applied. */
  readonly plotAreaHa?: number;
  /** Classes on disturbance_index. Default DEFAULT_DISTURBANCE_CLASSES. */
  readonly disturbanceClasses?: readonly DisturbanceClass[];
  /** Thresholds of the rows' caution_flag. Default DEFAULT_CAUTION (20 plots, 20 %). */
  readonly caution?: CautionSettings;
}

export interface RegionSummaryInput {
  readonly region: string;
  /** One visit per plot. */
  readonly plots: readonly PlotMetrics[];
  /** Forest area in ha per forest type; may be empty or partial. */
  readonly forestAreas?: Readonly<Record<string, number>>;
  /** Variables to estimate, in row order. Default DEFAULT_REGION_VARIABLES. */
  readonly variables?: readonly string[];
  readonly options?: RegionSummaryOptions;
}

export type RegionSummaryErrorCode = 'BAD_REGION' | 'BAD_PLOT' | 'DUPLICATE_PLOT' | 'BAD_VALUE' | 'BAD_AREA' | 'BAD_VARIABLES' | 'BAD_OPTION';

/** The summary's input was rejected; nothing was computed and nothing is changed. */
export class RegionSummaryInputError extends Error {
  readonly code: RegionSummaryErrorCode;

  constructor(code: RegionSummaryErrorCode, detail: string) {
    super(`summariseRegion: ${detail}`);
    this.name = 'RegionSummaryInputError';
    this.code = code;
  }
}

const isName = (s: unknown): s is string => typeof s === 'string' && s.trim() !== '';

/** Throws RegionSummaryInputError unless `variables` is a non-empty list of distinct names. */
export function assertVariables(variables: readonly string[]): void {
  if (variables.length === 0) throw new RegionSummaryInputError('BAD_VARIABLES', 'at least one variable is needed');
  if (new Set(variables).size !== variables.length) throw new RegionSummaryInputError('BAD_VARIABLES', 'a variable is listed twice');
  for (const v of variables) if (!isName(v)) throw new RegionSummaryInputError('BAD_VARIABLES', `variable ${JSON.stringify(v)} is not a name`);
}

/** The error for variables that no plot of a region with plots has a key for. */
export const unknownVariables = (unknown: readonly string[]): RegionSummaryInputError =>
  new RegionSummaryInputError('BAD_VARIABLES', `no plot has a value key for ${unknown.join(', ')} (misspelt?)`);

/** Throws RegionSummaryInputError on the first fault, naming the plot, variable or area concerned. */
export function validateInput(input: RegionSummaryInput, variables: readonly string[], checked: readonly string[]): void {
  if (!isName(input.region)) throw new RegionSummaryInputError('BAD_REGION', 'region must be a non-empty string');
  if (!Array.isArray(input.plots)) throw new RegionSummaryInputError('BAD_PLOT', 'plots must be an array');
  assertVariables(variables);

  const seen = new Set<string>();
  const present = new Set<string>();
  for (const [i, p] of input.plots.entries()) {
    if (!isName(p.plotId)) throw new RegionSummaryInputError('BAD_PLOT', `plot ${i} has no plotId`);
    if (seen.has(p.plotId)) throw new RegionSummaryInputError('DUPLICATE_PLOT', `plot '${p.plotId}' appears twice; pass one visit per plot`);
    seen.add(p.plotId);
    if (!isName(p.forestType)) throw new RegionSummaryInputError('BAD_PLOT', `plot '${p.plotId}' has no forest type`);
    if (p.forestType === WHOLE_REGION) throw new RegionSummaryInputError('BAD_PLOT', `plot '${p.plotId}': forest type '${WHOLE_REGION}' is reserved for the whole region`);
    if (typeof p.values !== 'object' || p.values === null) throw new RegionSummaryInputError('BAD_PLOT', `plot '${p.plotId}' has no values object`);
    for (const v of checked) {
      const x = p.values[v];
      if (x === undefined) continue;
      present.add(v);
      if (x !== null && (typeof x !== 'number' || !Number.isFinite(x))) {
        throw new RegionSummaryInputError('BAD_VALUE', `plot '${p.plotId}' ${v} is ${String(x)}; expected a finite number or null`);
      }
    }
    if (p.speciesNames !== undefined && (!Array.isArray(p.speciesNames) || (p.speciesNames as readonly unknown[]).some((s) => typeof s !== 'string'))) {
      throw new RegionSummaryInputError('BAD_PLOT', `plot '${p.plotId}' speciesNames must be an array of strings`);
    }
  }
  if (input.plots.length > 0) {
    const unknown = variables.filter((v) => !present.has(v));
    if (unknown.length > 0) throw unknownVariables(unknown);
  }

  assertForestAreas(input.forestAreas);
  const plotArea = input.options?.plotAreaHa;
  if (plotArea !== undefined && (!(plotArea > 0) || !Number.isFinite(plotArea))) {
    throw new RegionSummaryInputError('BAD_OPTION', `plotAreaHa must be a finite positive number, got ${String(plotArea)}`);
  }
}

/** Throws RegionSummaryInputError unless every forest area is a finite number ≥ 0. */
export function assertForestAreas(forestAreas: Readonly<Record<string, number>> | undefined): void {
  for (const [type, area] of Object.entries(forestAreas ?? {})) {
    if (typeof area !== 'number' || !Number.isFinite(area) || area < 0) {
      throw new RegionSummaryInputError('BAD_AREA', `forest area of '${type}' is ${String(area)}; expected a finite number ≥ 0 (ha)`);
    }
  }
}

/** Plots grouped by forest type: the types sorted, each with its plots in their order (the strata of a region). */
export function byForestType<P extends { readonly forestType: string }>(plots: readonly P[]): { types: string[]; byType: Map<string, P[]> } {
  const byType = new Map<string, P[]>();
  for (const p of plots) {
    const list = byType.get(p.forestType);
    if (list === undefined) byType.set(p.forestType, [p]);
    else list.push(p);
  }
  return { types: [...byType.keys()].sort(), byType };
}

/**
 * A region's plots as strata by forest type, with each variable's values read from the plots once and
 * kept as columns (one array per forest type, in plot order, null where a plot has no value) for the
 * estimates, the aggregates and the notes that need them.
 */
export class PlotStrata {
  readonly types: readonly string[];
  readonly byType: ReadonlyMap<string, readonly PlotMetrics[]>;
  private readonly columns = new Map<string, { readonly values: ReadonlyArray<readonly (number | null)[]>; readonly keyed: boolean }>();

  constructor(readonly plots: readonly PlotMetrics[]) {
    const { types, byType } = byForestType(plots);
    this.types = types;
    this.byType = byType;
  }

  private column(variable: string): { readonly values: ReadonlyArray<readonly (number | null)[]>; readonly keyed: boolean } {
    let c = this.columns.get(variable);
    if (c === undefined) {
      let keyed = false;
      const values = this.types.map((t) =>
        (this.byType.get(t) as readonly PlotMetrics[]).map((p) => {
          const x = p.values[variable];
          if (x === undefined) return null;
          keyed = true;
          return x;
        }),
      );
      this.columns.set(variable, (c = { values, keyed }));
    }
    return c;
  }

  /** The values of `variable` per forest type (in `types` order), each in plot order; null where absent. */
  values(variable: string): ReadonlyArray<readonly (number | null)[]> {
    return this.column(variable).values;
  }

  /** Whether some plot has a key for `variable` (a null value counts). */
  keyed(variable: string): boolean {
    return this.column(variable).keyed;
  }
}
