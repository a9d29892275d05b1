// The columns of each file of an inventory batch, version 1 of the format: the single source of the
// field rules. Field checks are compiled from these tables (see field-checks.ts) rather than written as
// zod schemas, because a zod schema built from them takes 13–15 times as long (scripts/bench/validate.ts)
// and a batch holds millions of rows; the tables are plain data, so RULES.md and tests read them too.

import type { FileKind } from '@stemwise/core';
import type { INVALID, Parsed } from './field-checks';

export type { FileKind };

interface Base {
  readonly name: string;
  readonly required: boolean;
}
export interface TextColumn extends Base {
  readonly kind: 'text';
  readonly maxLength: number;
  /** Allowed characters, checked after the length; `charsHint` says them in words. */
  readonly chars?: RegExp;
  readonly charsHint?: string;
}
export interface NumberColumn extends Base {
  readonly kind: 'number';
  /** Bounds; `open` ones exclude the bound itself. */
  readonly min?: number;
  readonly minOpen?: boolean;
  readonly max?: number;
  readonly maxOpen?: boolean;
  readonly unit: string;
  /** What the values are, plural, for messages ("diameters"). */
  readonly what: string;
  readonly fallback?: number;
}
export interface IntegerColumn extends Base {
  readonly kind: 'integer';
  readonly min: number;
  readonly max: number;
  readonly what: string;
  readonly fallback?: number;
}
export interface EnumColumn extends Base {
  readonly kind: 'enum';
  readonly values: readonly string[];
  readonly fallback?: string;
}
export interface DateColumn extends Base {
  readonly kind: 'date';
}
export type ColumnSpec = TextColumn | NumberColumn | IntegerColumn | EnumColumn | DateColumn;

const KEY_CHARS = /^[A-Za-z0-9_.-]+$/;
const KEY_HINT = 'letters A-Z a-z, digits 0-9 and _ . -';

export const PLOT_COLUMNS = [
  { name: 'plot_id', kind: 'text', required: true, maxLength: 64, chars: KEY_CHARS, charsHint: KEY_HINT },
  { name: 'region', kind: 'text', required: true, maxLength: 80 },
  { name: 'forest_type', kind: 'text', required: true, maxLength: 40 },
  { name: 'latitude', kind: 'number', required: true, min: -90, max: 90, unit: '°', what: 'latitudes (WGS 84 decimal degrees)' },
  { name: 'longitude', kind: 'number', required: true, min: -180, max: 180, unit: '°', what: 'longitudes (WGS 84 decimal degrees)' },
  { name: 'area_ha', kind: 'number', required: true, min: 0, minOpen: true, max: 25, unit: 'ha', what: 'plot areas' },
  { name: 'dbh_min_cm', kind: 'number', required: false, min: 0, minOpen: true, max: 500, unit: 'cm', what: 'smallest measured diameters', fallback: 10 },
  { name: 'subplot_area_ha', kind: 'number', required: false, min: 0, max: 25, maxOpen: true, unit: 'ha', what: 'subplot areas', fallback: 0 },
  { name: 'subplot_dbh_min_cm', kind: 'number', required: false, min: 0, minOpen: true, max: 500, unit: 'cm', what: 'smallest subplot diameters', fallback: 5 },
  { name: 'survey_date', kind: 'date', required: true },
  { name: 'logging_class', kind: 'integer', required: true, min: 0, max: 3, what: 'logging classes' },
  { name: 'fire_class', kind: 'integer', required: true, min: 0, max: 3, what: 'fire classes' },
  { name: 'elevation_m', kind: 'number', required: false, min: -500, max: 9000, unit: 'm', what: 'elevations' },
] as const satisfies readonly ColumnSpec[];

export const TREE_COLUMNS = [
  { name: 'plot_id', kind: 'text', required: true, maxLength: 64, chars: KEY_CHARS, charsHint: KEY_HINT },
  { name: 'tree_id', kind: 'text', required: true, maxLength: 64 },
  { name: 'species', kind: 'text', required: false, maxLength: 200 },
  { name: 'dbh_cm', kind: 'number', required: true, min: 0, minOpen: true, max: 500, unit: 'cm', what: 'diameters' },
  { name: 'height_m', kind: 'number', required: false, min: 1.3, minOpen: true, max: 100, unit: 'm', what: 'heights' },
  { name: 'status', kind: 'enum', required: true, values: ['live', 'dead', 'stump'] },
  { name: 'stump_cause', kind: 'enum', required: false, values: ['logged', 'natural', 'unknown'] },
  { name: 'fire_damage', kind: 'integer', required: false, min: 0, max: 3, what: 'fire damage classes', fallback: 0 },
  { name: 'in_subplot', kind: 'enum', required: false, values: ['0', '1'], fallback: '0' },
] as const satisfies readonly ColumnSpec[];

export const STRATA_COLUMNS = [
  { name: 'region', kind: 'text', required: true, maxLength: 80 },
  { name: 'forest_type', kind: 'text', required: true, maxLength: 40 },
  { name: 'forest_area_ha', kind: 'number', required: true, min: 0, minOpen: true, unit: 'ha', what: 'forest areas' },
] as const satisfies readonly ColumnSpec[];

export const SPECIES_COLUMNS = [
  { name: 'name', kind: 'text', required: true, maxLength: 200 },
  { name: 'family', kind: 'text', required: true, maxLength: 120 },
  { name: 'guild', kind: 'enum', required: true, values: ['pioneer', 'light_demander', 'shade_tolerant'] },
  { name: 'wood_density', kind: 'number', required: false, min: 0.1, max: 1.5, unit: 'g/cm³', what: 'wood densities' },
  { name: 'synonyms', kind: 'text', required: false, maxLength: 4000 },
] as const satisfies readonly ColumnSpec[];

export const COLUMNS_OF: Record<FileKind, readonly ColumnSpec[]> = {
  plots: PLOT_COLUMNS,
  trees: TREE_COLUMNS,
  strata: STRATA_COLUMNS,
  species: SPECIES_COLUMNS,
};

/** A parsed cell: its value (the fallback where empty), or INVALID where its check failed. */
export type Cell = Parsed | typeof INVALID;

/** The value a column's check yields: a number, one of an enum's values, or text; null where it may be empty without a fallback. */
export type ValueOf<C extends ColumnSpec> =
  | (C extends { kind: 'number' | 'integer' } ? number : C extends { kind: 'enum'; values: ReadonlyArray<infer V> } ? V : string)
  | (C extends { required: true } ? never : C extends { fallback: number | string } ? never : null);

/** Readers of one table's cells by column name, each bound once to its column's place in the table. */
export interface TableReaders<T extends readonly ColumnSpec[]> {
  /** Any row: the column's value, or INVALID where its check failed. */
  readonly cell: { readonly [C in T[number] as C['name']]: (cells: readonly Cell[]) => ValueOf<C> | typeof INVALID };
  /** A row with no field error (TableRow.ok): the column's value. */
  readonly value: { readonly [C in T[number] as C['name']]: (cells: readonly Cell[]) => ValueOf<C> };
}

/**
 * The readers of a table, built from its column table: the validators read cells by name, the rows stay
 * arrays (no object per row), and the place of each name is looked up once, here, not per row.
 */
export function tableReaders<T extends readonly ColumnSpec[]>(columns: T): TableReaders<T> {
  const readers: Record<string, (cells: readonly Cell[]) => Cell> = {};
  columns.forEach((c, i) => {
    readers[c.name] = (cells) => cells[i];
  });
  // The checks compiled from the same table put in place i exactly the values ValueOf<column i> names.
  return { cell: readers, value: readers } as unknown as TableReaders<T>;
}
