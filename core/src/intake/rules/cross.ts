import { defineRule } from './rule';

// Across rows and files: keys, references between files, and what is already stored.

export const CROSS = {
  duplicatePlot: defineRule('cross', 'cross_duplicate_plot', 'error', 'A plot_id appears twice in plots.csv (one batch holds one visit per plot).'),
  duplicateTree: defineRule('cross', 'cross_duplicate_tree', 'error', 'A tree_id appears twice within the same plot in trees.csv.'),
  unknownPlot: defineRule('cross', 'cross_unknown_plot', 'error', 'A stem names a plot that is neither in plots.csv nor stored.'),
  plotRejected: defineRule('cross', 'cross_plot_rejected', 'error', 'A stem belongs to a plot whose own row has errors, so it cannot be loaded.'),
  visitExists: defineRule('cross', 'cross_visit_exists', 'error', 'The plot was already loaded for this survey_date (upload with --replace to replace that visit).'),
  visitBeforeLatest: defineRule('cross', 'cross_visit_before_latest', 'error', 'A visit is dated before the plot\'s latest stored visit (upload with --replace to load it between the stored visits).'),
  treeRevived: defineRule('cross', 'cross_tree_revived', 'error', 'A tree recorded dead or as a stump at the plot\'s previous visit is live in this one.'),
  subplotStemTooBig: defineRule('cross', 'cross_subplot_stem_too_big', 'error', 'A subplot stem (in_subplot 1) has a diameter at or above its plot\'s dbh_min_cm.'),
  subplotMissing: defineRule('cross', 'cross_subplot_missing', 'error', 'A stem is marked in_subplot 1 but its plot has no subplot (subplot_area_ha 0).'),
  mainStemBelowMin: defineRule('cross', 'cross_main_stem_below_min', 'warning', 'A main-plot stem is thinner than its plot\'s dbh_min_cm (it is loaded; metrics may leave it out).'),
  plotWithoutStems: defineRule('cross', 'cross_plot_without_stems', 'warning', 'A plot of the batch has no stems in trees.csv.'),
  duplicateStratum: defineRule('cross', 'cross_duplicate_stratum', 'error', 'A region and forest_type pair appears twice in strata.csv.'),
  duplicateSpecies: defineRule('cross', 'cross_duplicate_species', 'error', 'An accepted name appears twice in species.csv.'),
  synonymConflict: defineRule('cross', 'cross_synonym_conflict', 'error', 'A synonym in species.csv is claimed by two species or is itself an accepted name.'),
} as const;

export const crossMessages = {
  duplicatePlot: (key: string, first: number) => `plot_id ${key} already appears on line ${first}; a batch holds one visit per plot`,
  duplicateTree: (plot: string, tree: string, first: number) => `tree_id ${tree} of plot ${plot} already appears on line ${first}`,
  unknownPlot: (plot: string) => `plot_id ${plot} is not in plots.csv and no stored plot has that id`,
  plotRejected: (plot: string, line: number) => `plot ${plot} (plots.csv line ${line}) has errors, so this stem cannot be loaded`,
  visitExists: (plot: string, date: string, batch: string) =>
    `plot ${plot} was already loaded for ${date} (batch ${batch}); upload with --replace to replace that visit`,
  visitBeforeLatest: (plot: string, date: string, latest: string) =>
    `plot ${plot} is dated ${date}, before its latest stored visit of ${latest}; a re-measurement comes later (upload with --replace to load an earlier visit between the stored ones)`,
  treeRevived: (plot: string, tree: string, before: string, date: string, batch: string) =>
    `tree ${tree} of plot ${plot} is live, but was recorded ${before} at the previous visit (${date}, batch ${batch}); check the tree_id or the status of either visit`,
  subplotStemTooBig: (dbh: number, min: number) => `dbh_cm is ${dbh} on the subplot, but its plot's dbh_min_cm is ${min}; subplot stems must be thinner than that`,
  subplotMissing: (plot: string) => `in_subplot is 1 but plot ${plot} has no subplot (subplot_area_ha is 0)`,
  mainStemBelowMin: (dbh: number, min: number) => `dbh_cm is ${dbh} on the main plot, below its dbh_min_cm of ${min}`,
  plotWithoutStems: (plot: string) => `plot ${plot} has no stems in trees.csv (fine for a plot without trees; otherwise check its plot_id)`,
  duplicateStratum: (region: string, type: string, first: number) => `${region} / ${type} already appears on line ${first}`,
  duplicateSpecies: (name: string, first: number) => `${name} already appears on line ${first}`,
  synonymConflict: (syn: string, detail: string) => `synonym ${syn} ${detail}`,
};
