// Deliberately bad rows for ingest tests. Each is an extra row (the good rows stay exactly as they
// would be without them), and truth.json lists its file, line and the rule it breaks in plain words.

import { csvLine, plotCells, PLOT_COLUMNS, treeCells, TREE_COLUMNS, type PlotColumn, type TreeColumn } from './csv-lines';
import type { PlotRow, TreeStem } from './plot-generator';
import type { Rng } from './random';

export type BadRowFile = 'plots.csv' | 'trees.csv';

interface BadRowKind<C extends string> {
  readonly kind: string;
  readonly file: BadRowFile;
  readonly rule: string;
  /** Changes to the cells of a copied good row. */
  readonly edit: (cells: Record<C, string>, rng: Rng) => void;
}

const PLOT_KINDS: readonly BadRowKind<PlotColumn>[] = [
  { kind: 'plot_id_duplicate', file: 'plots.csv', rule: 'plot_id must be unique within the inventory', edit: () => {} },
  { kind: 'plot_id_bad_characters', file: 'plots.csv', rule: 'plot_id holds only A-Z a-z 0-9 _ . - (1 to 64 characters)', edit: (c) => { c.plot_id = `${c.plot_id} #2`; } },
  { kind: 'latitude_out_of_range', file: 'plots.csv', rule: 'latitude must lie between -90 and 90', edit: (c) => { c.latitude = '95.5'; } },
  { kind: 'forest_type_unknown', file: 'plots.csv', rule: 'forest_type must be one of the configured forest types', edit: (c) => { c.forest_type = 'swamp'; } },
  { kind: 'area_out_of_range', file: 'plots.csv', rule: 'area_ha must be greater than 0 and at most 25', edit: (c) => { c.area_ha = '30'; } },
  { kind: 'subplot_not_smaller', file: 'plots.csv', rule: 'subplot_area_ha must be at least 0 and below area_ha', edit: (c) => { c.subplot_area_ha = c.area_ha; } },
  { kind: 'survey_date_in_future', file: 'plots.csv', rule: 'survey_date must not be in the future', edit: (c) => { c.survey_date = '2099-05-14'; } },
  { kind: 'survey_date_malformed', file: 'plots.csv', rule: 'survey_date must be written YYYY-MM-DD', edit: (c) => { c.survey_date = '14/05/2021'; } },
  { kind: 'logging_class_out_of_range', file: 'plots.csv', rule: 'logging_class must be an integer from 0 to 3', edit: (c) => { c.logging_class = '4'; } },
  { kind: 'required_plot_field_missing', file: 'plots.csv', rule: 'longitude is required', edit: (c) => { c.longitude = ''; } },
];

const TREE_KINDS: readonly BadRowKind<TreeColumn>[] = [
  { kind: 'dbh_not_positive', file: 'trees.csv', rule: 'dbh_cm must be greater than 0', edit: (c, rng) => { c.dbh_cm = rng.chance(0.5) ? '0' : '-12.4'; } },
  { kind: 'dbh_above_limit', file: 'trees.csv', rule: 'dbh_cm must be at most 500', edit: (c) => { c.dbh_cm = '612.0'; } },
  { kind: 'dbh_not_a_number', file: 'trees.csv', rule: 'dbh_cm must be a number', edit: (c) => { c.dbh_cm = '23.4cm'; } },
  { kind: 'dbh_missing', file: 'trees.csv', rule: 'dbh_cm is required', edit: (c) => { c.dbh_cm = ''; } },
  { kind: 'status_unknown', file: 'trees.csv', rule: 'status must be live, dead or stump', edit: (c) => { c.status = 'alive'; c.stump_cause = ''; } },
  { kind: 'stump_without_cause', file: 'trees.csv', rule: 'stump_cause is required when status is stump', edit: (c) => { c.status = 'stump'; c.stump_cause = ''; c.height_m = ''; } },
  { kind: 'stump_cause_on_standing_stem', file: 'trees.csv', rule: 'stump_cause must be empty unless status is stump', edit: (c) => { c.status = 'live'; c.stump_cause = 'logged'; } },
  { kind: 'stump_cause_unknown_value', file: 'trees.csv', rule: 'stump_cause must be logged, natural or unknown', edit: (c) => { c.status = 'stump'; c.stump_cause = 'windthrow'; c.height_m = ''; } },
  { kind: 'tree_plot_unknown', file: 'trees.csv', rule: 'plot_id must name a plot of the same batch or an already stored plot', edit: (c) => { c.plot_id = 'ZZZ-99999'; } },
  { kind: 'tree_id_duplicate', file: 'trees.csv', rule: 'tree_id must be unique within its plot', edit: () => {} },
  { kind: 'height_out_of_range', file: 'trees.csv', rule: 'height_m must be greater than 1.3 and at most 100', edit: (c, rng) => { c.height_m = rng.chance(0.5) ? '1.1' : '134.0'; } },
  { kind: 'fire_damage_out_of_range', file: 'trees.csv', rule: 'fire_damage must be an integer from 0 to 3', edit: (c) => { c.fire_damage = '5'; } },
  { kind: 'subplot_stem_too_large', file: 'trees.csv', rule: "a stem with in_subplot 1 must have dbh_cm below the plot's dbh_min_cm", edit: (c) => { c.in_subplot = '1'; c.dbh_cm = '14.2'; } },
  { kind: 'in_subplot_not_a_flag', file: 'trees.csv', rule: 'in_subplot must be 0 or 1', edit: (c) => { c.in_subplot = 'yes'; } },
];

/** Every kind of bad row the generator can write. */
export const BAD_ROW_KINDS: readonly { kind: string; file: BadRowFile; rule: string }[] = [...PLOT_KINDS, ...TREE_KINDS].map(
  ({ kind, file, rule }) => ({ kind, file, rule }),
);

export interface BadRowRecord {
  readonly file: BadRowFile;
  /** 1-based line number in the (decompressed) file; line 1 is the header. */
  readonly line: number;
  readonly kind: string;
  readonly rule: string;
  readonly plot_id: string;
  readonly tree_id?: string;
}

/** Which kinds go with which plot: `count` rows spread over the run, every kind before any repeats. */
export function planBadRows(count: number, plotCount: number, rng: Rng): Map<number, string[]> {
  if (!(Number.isInteger(count) && count >= 0)) throw new RangeError(`planBadRows: count must be an integer >= 0, got ${count}`);
  const plan = new Map<number, string[]>();
  if (count === 0 || plotCount === 0) return plan;
  const kinds = rng.shuffleInPlace(BAD_ROW_KINDS.map((k) => k.kind));
  for (let j = 0; j < count; j++) {
    const plot = Math.min(plotCount - 1, Math.floor(((j + rng.next()) * plotCount) / count));
    const list = plan.get(plot) ?? [];
    list.push(kinds[j % kinds.length]);
    plan.set(plot, list);
  }
  return plan;
}

export function isPlotKind(kind: string): boolean {
  return PLOT_KINDS.some((k) => k.kind === kind);
}

/** A bad plots.csv line: a copy of the plot's row under a new id (same id for a duplicate), edited. */
export function badPlotLine(kind: string, row: PlotRow, serial: number, rng: Rng): { text: string; plotId: string; rule: string } {
  const spec = PLOT_KINDS.find((k) => k.kind === kind);
  if (spec === undefined) throw new RangeError(`badPlotLine: not a plot kind: ${kind}`);
  const cells = plotCells(row);
  if (kind !== 'plot_id_duplicate') cells.plot_id = `${row.plotId}.x${serial}`;
  spec.edit(cells, rng);
  return { text: csvLine(PLOT_COLUMNS, cells), plotId: cells.plot_id, rule: spec.rule };
}

/** A bad trees.csv line: a copy of one of the plot's live stems under a new tag (same tag for a duplicate), unidentified, edited. */
export function badTreeLine(kind: string, row: PlotRow, stems: readonly TreeStem[], serial: number, rng: Rng): { text: string; plotId: string; treeId: string; rule: string } {
  const spec = TREE_KINDS.find((k) => k.kind === kind);
  if (spec === undefined) throw new RangeError(`badTreeLine: not a tree kind: ${kind}`);
  if (stems.length === 0) throw new RangeError(`badTreeLine: plot ${row.plotId} has no stem to copy`);
  // A live main-plot stem as the base, so that the row breaks the one rule its kind names.
  const liveMain = stems.filter((s) => s.status === 'live' && !s.inSubplot);
  const cells = treeCells(row.plotId, rng.choice(liveMain.length > 0 ? liveMain : stems));
  if (kind !== 'tree_id_duplicate') cells.tree_id = `x${serial}`;
  cells.species = 'indet';
  spec.edit(cells, rng);
  return { text: csvLine(TREE_COLUMNS, cells), plotId: cells.plot_id, treeId: cells.tree_id, rule: spec.rule };
}
