import type { RegionPlotRow } from '@stemwise/db';
import { variableLabel } from '@stemwise/core';
import { html, type Markup } from './html';

// The plot table of a region page: one row per plot (its latest computed visit), sortable by any column
// through plain links (sorted by the server: nothing to run in the browser, and a printed page shows
// the order it was sorted in).

/** Figures of the table, after plot, forest type and survey date. */
export const PLOT_TABLE_VARIABLES = ['stems_ha', 'basal_area_m2_ha', 'agb_mg_ha', 'carbon_mg_ha', 'richness', 'fisher_alpha', 'disturbance_index'] as const;

const TEXT_KEYS = ['plot', 'forest_type', 'survey_date'] as const;
export type PlotSortKey = (typeof TEXT_KEYS)[number] | string;
export type SortDirection = 'asc' | 'desc';
export interface PlotSort {
  readonly key: PlotSortKey;
  readonly dir: SortDirection;
}
export const DEFAULT_PLOT_SORT: PlotSort = { key: 'plot', dir: 'asc' };

/** The columns a table with this extra variable (the map's) can be sorted by. */
export function plotTableVariables(extra: string | null): string[] {
  return extra && !(PLOT_TABLE_VARIABLES as readonly string[]).includes(extra) ? [...PLOT_TABLE_VARIABLES, extra] : [...PLOT_TABLE_VARIABLES];
}

const byteOrder = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

function textOf(p: RegionPlotRow, key: string): string {
  return key === 'plot' ? p.plotKey : key === 'forest_type' ? p.forestType : p.surveyDate;
}

/** The plots sorted by a column; plots without a value last in either direction, ties by plot id. */
export function sortPlots(plots: readonly RegionPlotRow[], sort: PlotSort): RegionPlotRow[] {
  const sign = sort.dir === 'asc' ? 1 : -1;
  const text = (TEXT_KEYS as readonly string[]).includes(sort.key);
  return [...plots].sort((a, b) => {
    if (text) return sign * byteOrder(textOf(a, sort.key), textOf(b, sort.key)) || byteOrder(a.plotKey, b.plotKey);
    const x = a.metrics[sort.key as keyof RegionPlotRow['metrics']];
    const y = b.metrics[sort.key as keyof RegionPlotRow['metrics']];
    if (x === null || x === undefined || y === null || y === undefined) return (x == null ? 1 : 0) - (y == null ? 1 : 0) || byteOrder(a.plotKey, b.plotKey);
    return sign * (x - y) || byteOrder(a.plotKey, b.plotKey);
  });
}

/** Decimals of a column: three significant figures at its median magnitude (at most 3), the same for every row so the column reads down evenly. */
export function columnDecimals(values: ReadonlyArray<number | null | undefined>): number {
  const a = values.filter((v): v is number => v !== null && v !== undefined && Number.isFinite(v) && v !== 0).map(Math.abs).sort((x, y) => x - y);
  if (!a.length) return 0;
  const median = a[Math.floor(a.length / 2)];
  return Math.min(3, Math.max(0, 2 - Math.floor(Math.log10(median))));
}

const fixed = (x: number | null | undefined, decimals: number): string =>
  x === null || x === undefined || !Number.isFinite(x) ? '–' : new Intl.NumberFormat('en-GB', { minimumFractionDigits: decimals, maximumFractionDigits: decimals }).format(x);

export interface PlotTableInput {
  readonly plots: readonly RegionPlotRow[];
  readonly variables: readonly string[];
  readonly sort: PlotSort;
  /** Address of the page sorted another way; null: no sort links (the static report). */
  readonly sortHref: ((sort: PlotSort) => string) | null;
  /** Address of a plot's page; null: plots are not links. */
  readonly plotHref: ((plotKey: string) => string) | null;
}

export function plotTable(input: PlotTableInput): Markup {
  const { sort, sortHref, plotHref } = input;
  const header = (key: string, name: Markup | string, numeric: boolean) => {
    const current = sort.key === key;
    // a first click sorts numbers largest first, names A to Z; a second click turns the order round
    const next: SortDirection = current ? (sort.dir === 'asc' ? 'desc' : 'asc') : numeric ? 'desc' : 'asc';
    const mark = current ? (sort.dir === 'asc' ? ' ▲' : ' ▼') : '';
    const aria = current ? (sort.dir === 'asc' ? 'ascending' : 'descending') : null;
    const inner = sortHref ? html`<a href="${sortHref({ key, dir: next })}">${name}</a>${mark}` : html`${name}${mark}`;
    return html`<th${numeric ? html` class="num"` : null}${aria ? html` aria-sort="${aria}"` : null} data-key="${key}">${inner}</th>`;
  };
  const value = (p: RegionPlotRow, v: string) => p.metrics[v as keyof RegionPlotRow['metrics']];
  const decimals = new Map(input.variables.map((v) => [v, columnDecimals(input.plots.map((p) => value(p, v)))]));
  const rows = sortPlots(input.plots, sort).map(
    (p) => html`<tr data-plot="${p.plotKey}"><td>${plotHref ? html`<a href="${plotHref(p.plotKey)}">${p.plotKey}</a>` : p.plotKey}</td><td>${p.forestType}</td><td>${p.surveyDate}</td>${input.variables.map(
      (v) => html`<td class="num">${fixed(value(p, v), decimals.get(v) ?? 0)}</td>`,
    )}</tr>`,
  );
  return html`<div class="table-scroll"><table id="plot-table"><thead><tr>${header('plot', 'Plot', false)}${header('forest_type', 'Forest type', false)}${header('survey_date', 'Latest visit', false)}${input.variables.map((v) => {
    const l = variableLabel(v);
    // the short label where it carries its unit (or needs none), else the full name with the unit
    const plain = l.short.includes('(') || !l.unit || l.short.toLowerCase().includes(l.unit.toLowerCase());
    return header(v, plain ? l.short : html`${l.name} <span class="muted">(${l.unit})</span>`, true);
  })}</tr></thead><tbody>${rows}</tbody></table></div>
<p class="muted">One row per plot: its latest computed visit, each column to three significant figures of its typical value. ${sortHref ? 'Select a column heading to sort by it; select it again to turn the order round.' : ''} Plots without a value are listed last.</p>`;
}
