// Public API of @stemwise/demo-inventory: the invented national inventory generator and the
// committed demo set.

import { fileURLToPath } from 'node:url';

export { generateInventory, GENERATE_DEFAULTS, MAX_PLOTS, SECOND_VISIT_DIR, EXPECTATION_SEED_OFFSET } from './generate';
export { PLANTED_CHANGE, REVISIT, plotRates } from './planted-change';
export type { PlantedChange } from './planted-change';
export { expectedChange } from './change-expectation';
export type { ExpectedChange, ExpectedValue } from './change-expectation';
export type { GenerateOptions, GenerateProgress, GenerateResult, InventoryFiles } from './generate';
export { buildFlora, speciesCsvLines, FLORA_DEFAULTS, GUILDS } from './species';
export type { Flora, FloraOptions, Guild, Species } from './species';
export { PLANTED_CURVES, plantedAlpha, GUILD_RESPONSE } from './planted-curves';
export type { PlantedCurve, PlantedShape } from './planted-curves';
export { COUNTRY, REGIONS, FOREST_TYPES } from './scenario';
export type { ForestType, Region } from './scenario';
export { BAD_ROW_KINDS } from './bad-rows';
export type { BadRowRecord } from './bad-rows';
export { TRUTH_FORMAT } from './truth';
export type { Truth } from './truth';
export { main as demoInventoryCli } from './cli';

/** Folder of the committed demo set (450 plots, 150 per forest type, gzip-compressed CSV; the second visits in second-visit/). */
export const DEMO_DATA_DIR = fileURLToPath(new URL('../data/', import.meta.url));

/** Files of the committed demo set; upload the folder, or these files one by one. */
export const DEMO_DATA_FILES = {
  plots: fileURLToPath(new URL('../data/plots.csv.gz', import.meta.url)),
  trees: fileURLToPath(new URL('../data/trees.csv.gz', import.meta.url)),
  strata: fileURLToPath(new URL('../data/strata.csv.gz', import.meta.url)),
  species: fileURLToPath(new URL('../data/species.csv.gz', import.meta.url)),
  truth: fileURLToPath(new URL('../data/truth.json', import.meta.url)),
  secondVisitPlots: fileURLToPath(new URL('../data/second-visit/plots.csv.gz', import.meta.url)),
  secondVisitTrees: fileURLToPath(new URL('../data/second-visit/trees.csv.gz', import.meta.url)),
} as const;

/** The exact command that made the committed demo set (run from the repository root). */
export const DEMO_DATA_COMMAND = 'npx tsx demo-inventory/src/cli.ts --plots 450 --seed 7 --out demo-inventory/data --gzip --heights 0.2 --expectation 600';
/** The same settings as `generateInventory` options (without the output folder). */
export const DEMO_DATA_OPTIONS = { plots: 450, seed: 7, gzip: true, heightsFraction: 0.2, badRows: 0, expectationPlots: 600 } as const;
export { crpPartition } from './community';
export { Rng } from './random';
