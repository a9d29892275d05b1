import { defineRule, shown } from './rule';

const stemCount = (n: number) => `${n.toLocaleString('en-US')} stem${n === 1 ? '' : 's'}`;

// Plausibility: values that are allowed but unlikely. Warnings only: they never block a batch.

export const PLAUSIBILITY = {
  dbhLooksMm: defineRule('plausibility', 'plausibility_dbh_looks_mm', 'warning', 'The median diameter of a plot is far above tropical norms: diameters may be in millimetres.'),
  dbhLarge: defineRule('plausibility', 'plausibility_dbh_large', 'warning', 'A diameter is over 250 cm.'),
  heightForDiameter: defineRule('plausibility', 'plausibility_height_for_diameter', 'warning', 'A live stem\'s height/diameter ratio (both in m) is below 20 or above 120.'),
  heightTall: defineRule('plausibility', 'plausibility_height_tall', 'warning', 'A height is above 80 m, which is rare even in tall tropical forest.'),
  speciesUnknown: defineRule('plausibility', 'plausibility_species_unknown', 'warning', 'A species name is not in the reference list, and neither is its genus.'),
  speciesGenusKnown: defineRule('plausibility', 'plausibility_species_genus_known', 'warning', 'A species name is not in the reference list, but its genus is (the genus\'s mean wood density is used).'),
  speciesGenusOnly: defineRule('plausibility', 'plausibility_species_genus_only', 'warning', 'A name identifies a stem only to a genus or family of the reference list (Genus sp., or a genus alone).'),
  speciesNoReference: defineRule('plausibility', 'plausibility_species_no_reference', 'warning', 'No species reference list is loaded, so names were not checked.'),
  sameCoordinates: defineRule('plausibility', 'plausibility_same_coordinates', 'warning', 'Two different plots have exactly the same coordinates.'),
  dbhShrank: defineRule('plausibility', 'plausibility_dbh_shrank', 'warning', 'A tree live at both visits of a re-measured plot lost more than 1 cm of diameter.'),
  dbhGrowthFast: defineRule('plausibility', 'plausibility_dbh_growth_fast', 'warning', 'A tree live at both visits of a re-measured plot grew more than 5 cm a year in diameter.'),
  treesAbsent: defineRule('plausibility', 'plausibility_trees_absent', 'warning', 'Trees live at the previous visit of a re-measured plot are not in trees.csv (they count as died).'),
  speciesChanged: defineRule('plausibility', 'plausibility_species_changed', 'warning', 'A tree of a re-measured plot is recorded under another species name than at the previous visit.'),
  surveyDateEarly: defineRule('plausibility', 'plausibility_survey_date_early', 'warning', 'A survey date lies before 1950.'),
} as const;

/**
 * Bounds of the plausibility warnings. None comes from a measured standard: they are common practice,
 * recalled from memory (docs/methods.md#plausibility-warnings), so they are options, not constants.
 */
export interface PlausibilityOptions {
  /** A plot whose median diameter exceeds this (cm) probably recorded millimetres. Common practice: tropical
   *  plots of stems ≥ 10 cm have median diameters of about 15–30 cm; 100 cm is far above any such plot. */
  mmMedianCm: number;
  /** Diameters above this (cm) are flagged (memory: giants exist, but are rare enough to check). */
  largeDbhCm: number;
  /** Height/diameter ratio, both in metres: below ~20 or above ~100–120 is implausible (memory, common practice). */
  hdRatioMin: number;
  hdRatioMax: number;
  /** Heights above this (m) are suspect in tropical forest (memory: about 70–90 m). */
  tallHeightM: number;
  /** Survey dates before this year are flagged. */
  earlyYear: number;
  /** Re-measurement: a live tree whose diameter fell by more than this (cm) is flagged. Common practice
   *  (memory): repeat measurements at the same point differ by a few millimetres; more is a recording slip. */
  dbhShrinkCm: number;
  /** Re-measurement: diameter growth above this (cm/yr) is flagged. Common practice (memory): even fast
   *  pioneers rarely exceed 2–4 cm a year. */
  dbhGrowthMaxCmYr: number;
}

export const PLAUSIBILITY_DEFAULTS: PlausibilityOptions = Object.freeze({
  mmMedianCm: 100,
  largeDbhCm: 250,
  hdRatioMin: 20,
  hdRatioMax: 120,
  tallHeightM: 80,
  earlyYear: 1950,
  dbhShrinkCm: 1,
  dbhGrowthMaxCmYr: 5,
});

export const plausibilityMessages = {
  dbhShrank: (tree: string, dbh: number, before: number, date: string, bound: number) =>
    `tree ${tree} has dbh_cm ${dbh}, but ${before} at the previous visit (${date}): it lost more than ${bound} cm (common practice); please check both measurements`,
  dbhGrowthFast: (tree: string, dbh: number, before: number, date: string, perYear: number, bound: number) =>
    `tree ${tree} grew from ${before} cm (${date}) to ${dbh} cm, ${perYear.toFixed(1)} cm a year, more than ${bound} (common practice); please check the tree_id and both measurements`,
  treesAbsent: (plot: string, n: number, date: string, examples: string) =>
    `plot ${plot}: ${n} tree${n === 1 ? '' : 's'} live at the previous visit (${date}) ${n === 1 ? 'is' : 'are'} not in trees.csv (tree_id ${examples}); ${n === 1 ? 'it counts' : 'they count'} as died in the change between visits — list them as dead or as stumps if they were found`,
  speciesChanged: (tree: string, name: string, before: string, date: string) => `tree ${tree} is recorded as ${name}, but as ${before} at the previous visit (${date})`,
  dbhLooksMm: (plot: string, over: number, n: number, bound: number) =>
    `plot ${plot}: ${over} of ${n} stems have dbh_cm above ${bound}, so the median diameter is above ${bound} cm; were diameters written in millimetres?`,
  dbhLarge: (dbh: number, bound: number) => `dbh_cm is ${dbh}, above ${bound} cm; please check it`,
  heightForDiameter: (h: number, dbh: number, ratio: number, lo: number, hi: number) =>
    `height ${h} m for a diameter of ${dbh} cm gives a height/diameter ratio of ${Math.round(ratio)}; usual trees lie between ${lo} and ${hi} (common practice)`,
  heightTall: (h: number, bound: number) => `height_m is ${h}, above ${bound} m; please check it`,
  speciesUnknown: (name: string, stems: number) =>
    `species ${shown(name)} is not in the reference list, and neither is its genus; stems keep the name but count as unassigned (${stemCount(stems)})`,
  speciesGenusKnown: (name: string, genus: string, stems: number) =>
    `species ${shown(name)} is not in the reference list, but its genus ${genus} is; stems keep the name, count as unassigned to a species and take the genus's mean wood density (${stemCount(stems)})`,
  speciesGenusOnly: (name: string, known: { rank: 'genus' | 'family'; name: string }, stems: number) =>
    `species ${shown(name)} is identified only to the ${known.rank} ${known.name} (${stemCount(stems)})`,
  speciesNoReference: () => 'no species reference list is loaded; names were not checked (import one with stemwise species import FILE)',
  sameCoordinates: (plot: string, other: string) => `plot ${plot} has exactly the same coordinates as plot ${other}`,
  surveyDateEarly: (date: string, year: number) => `survey_date ${date} is before ${year}; please check it`,
};
