// Which estimates to read with particular care: few plots, or a wide sampling error. The thresholds are
// settings (STEMWISE_CAUTION_MIN_PLOTS, STEMWISE_CAUTION_MAX_SAMPLING_ERROR_PCT); their defaults, 20 plots
// and 20 %, are common practice (no single published source), see docs/methods.md#estimates-to-read-with-care.

/** The `caution_flag` values of `export regions` (docs/exports.md): stable, names of our own. */
export type CautionFlag = 'none' | 'few_plots' | 'wide_error' | 'few_plots_wide_error' | 'no_error_estimate';

export interface CautionSettings {
  /** An estimate from fewer plots than this is flagged `few_plots`. */
  readonly min_plots: number;
  /** An estimate with a sampling error above this (percent) is flagged `wide_error`. */
  readonly max_sampling_error_pct: number;
}

export const DEFAULT_CAUTION: CautionSettings = { min_plots: 20, max_sampling_error_pct: 20 };

/** The thresholds set in the configuration. */
export function cautionSettings(config: { readonly cautionMinPlots: number; readonly cautionMaxSamplingErrorPct: number }): CautionSettings {
  return { min_plots: config.cautionMinPlots, max_sampling_error_pct: config.cautionMaxSamplingErrorPct };
}

/** Plain words of each flag, for the pages. */
export const CAUTION_WORDS: Readonly<Record<Exclude<CautionFlag, 'none'>, string>> = {
  few_plots: 'few plots',
  wide_error: 'wide error',
  few_plots_wide_error: 'few plots, wide error',
  no_error_estimate: 'no error estimate',
};

// few_plots when n < min_plots; wide_error when sampling error % > max; both; no_error_estimate when enough plots but no sampling error (common practice thresholds)
export function cautionFlag(nPlots: number, samplingErrorPct: number | null, settings: CautionSettings = DEFAULT_CAUTION): CautionFlag {
  const few = nPlots < settings.min_plots;
  const wide = samplingErrorPct !== null && Number.isFinite(samplingErrorPct) && samplingErrorPct > settings.max_sampling_error_pct;
  if (few && wide) return 'few_plots_wide_error';
  if (few) return 'few_plots';
  if (wide) return 'wide_error';
  if (samplingErrorPct === null || !Number.isFinite(samplingErrorPct)) return 'no_error_estimate';
  return 'none';
}

/** Checks settings from configuration or options; names the bad one. */
export function assertCautionSettings(s: CautionSettings): void {
  if (!Number.isInteger(s.min_plots) || s.min_plots < 1) throw new RangeError(`caution settings: min_plots must be an integer >= 1 (got ${s.min_plots})`);
  if (!(s.max_sampling_error_pct > 0) || !Number.isFinite(s.max_sampling_error_pct)) throw new RangeError(`caution settings: max_sampling_error_pct must be a number > 0 (got ${s.max_sampling_error_pct})`);
}
