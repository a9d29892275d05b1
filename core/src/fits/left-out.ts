// Why a plot has no value in a column of `export plots`, so that the fits and the region summaries can
// say how many plots they left out and why instead of dropping them silently (docs/methods.md#plots-left-out-of-a-fit).
// Reason codes are stable (they appear in `export fits`, column left_out_reasons).

/** Why a plot's value of a column is empty; `no_value` when none of the known causes applies. */
export type LeftOutReason =
  | 'no_identified_stem'
  | 'one_identified_stem'
  | 'all_singletons'
  | 'one_species'
  | 'under_50_identified'
  | 'no_live_stem'
  | 'measured_from_larger_dbh'
  | 'no_value';

/** Plain words for each reason, for the pages. */
export const LEFT_OUT_WORDS: Readonly<Record<LeftOutReason, string>> = {
  no_identified_stem: 'no live stem identified to species',
  one_identified_stem: 'a single identified stem (too few for a diversity index)',
  all_singletons: "every identified species with a single stem (S = N: Fisher's alpha is infinite)",
  one_species: 'one species only (evenness undefined)',
  under_50_identified: 'fewer than 50 identified stems (rarefaction to 50 impossible)',
  no_live_stem: 'no live stem',
  measured_from_larger_dbh: 'stems measured only from a larger diameter than the reporting threshold or class (dbh_min_cm)',
  no_value: 'no value',
};

const DIVERSITY = new Set(['shannon', 'simpson', 'inv_simpson', 'pielou', 'fisher_alpha', 'rarefied_50', 'chao1']);
const NEEDS_LIVE_STEMS = new Set(['qmd_cm', 'pioneer_ba_share', 'light_demander_ba_share', 'shade_tolerant_ba_share', 'unassigned_ba_share', 'logging_removed_ba_frac']);

const FROM_THRESHOLD = /^(reporting_(stems|basal_area_m2|agb_mg|carbon_mg)_ha|stand_.+_ha)$/;

type Values = Readonly<Record<string, number | null | undefined>>;

/** The reason a plot has no value of `column` (call it only when the value is missing or not finite). */
export function leftOutReason(values: Values, column: string): LeftOutReason {
  const n = values.n_identified;
  const s = values.richness;
  if (DIVERSITY.has(column) && typeof n === 'number') {
    if (n === 0) return 'no_identified_stem';
    if (n === 1) return 'one_identified_stem';
    if (column === 'fisher_alpha' && s === n) return 'all_singletons';
    if (column === 'pielou' && s === 1) return 'one_species';
    if (column === 'rarefied_50' && n < 50) return 'under_50_identified';
  }
  if (NEEDS_LIVE_STEMS.has(column) && values.stems_ha === 0) return 'no_live_stem';
  // Empty only where the plot did not measure every stem from the threshold (or the class) up: docs/methods.md#reporting-threshold.
  if (FROM_THRESHOLD.test(column)) return 'measured_from_larger_dbh';
  return 'no_value';
}

const known = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v);

/**
 * Counts per reason of the plots without a value in one of `columns` (a plot counts once, for the first
 * column it lacks), in a stable key order. Keys are `<column>:<reason>`; empty when no plot is left out.
 */
export function countLeftOut(plots: Iterable<Values>, columns: readonly string[]): Record<string, number> {
  const counts = new Map<string, number>();
  for (const values of plots) {
    const column = columns.find((c) => !known(values[c]));
    if (column === undefined) continue;
    const key = `${column}:${leftOutReason(values, column)}`;
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  return Object.fromEntries([...counts].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)));
}

/** `fisher_alpha:all_singletons=3;fisher_alpha:no_identified_stem=1` (the `left_out_reasons` cell); null when none. */
export function leftOutText(counts: Readonly<Record<string, number>> | null | undefined): string | null {
  if (!counts) return null;
  const parts = Object.entries(counts).map(([k, v]) => `${k}=${v}`);
  return parts.length ? parts.join(';') : null;
}

/** Total plots left out. */
export function leftOutTotal(counts: Readonly<Record<string, number>> | null | undefined): number | null {
  if (!counts) return null;
  return Object.values(counts).reduce((a, b) => a + b, 0);
}

/** "3 (fisher_alpha) with every identified species …; 1 (qmd_cm) with no live stem" from a `left_out_reasons` cell, for a page; null when none. */
export function leftOutSentence(reasons: string | null | undefined): string | null {
  if (!reasons) return null;
  const parts = reasons.split(';').map((part) => {
    const [key, count] = part.split('=');
    const [column, reason] = key.split(':') as [string, LeftOutReason];
    return `${count} (${column}) with ${LEFT_OUT_WORDS[reason] ?? reason}`;
  });
  return parts.join('; ');
}
