// Stand tables by diameter class in the region and national summaries: each plot's stored stand table
// (plot_metrics diagnostics, `standTable`) becomes one value per class and figure, estimated like every
// other variable (docs/methods.md#stand-tables); the variables are named `stand_<lower>_<upper>_<figure>`
// (`stand_<lower>_up_<figure>` for the open top class), e.g. `stand_10_20_stems_ha`.
import { diameterClasses, type DiameterClass } from '../science/stand-table';
import type { VariableLabel } from './variables';

/** The figures of a stand table, in the order a plot's stand table stores them. */
export const STAND_FIGURES = [
  { key: 'stems_ha', name: 'Stems', short: 'Stems per ha', unit: 'stems/ha', totalUnit: 'stems' },
  { key: 'basal_area_m2_ha', name: 'Basal area', short: 'Basal area (m²/ha)', unit: 'm²/ha', totalUnit: 'm²' },
  { key: 'agb_mg_ha', name: 'Above-ground biomass', short: 'Biomass (Mg/ha)', unit: 'Mg/ha', totalUnit: 'Mg' },
] as const;
export type StandFigure = (typeof STAND_FIGURES)[number]['key'];

const bound = (cm: number): string => String(cm).replace('.', 'p');
const PATTERN = /^stand_(\d+(?:p\d+)?)_(\d+(?:p\d+)?|up)_(stems_ha|basal_area_m2_ha|agb_mg_ha)$/;

/** The variable of one figure of one class. */
export function standVariable(c: DiameterClass, figure: StandFigure): string {
  return `stand_${bound(c.lowerCm)}_${c.upperCm === null ? 'up' : bound(c.upperCm)}_${figure}`;
}

export interface StandVariable {
  readonly lowerCm: number;
  readonly upperCm: number | null;
  readonly figure: StandFigure;
}

/** The class and figure of a stand-table variable; null for any other name. */
export function parseStandVariable(variable: string): StandVariable | null {
  const m = PATTERN.exec(variable);
  if (!m) return null;
  const cm = (s: string): number => Number(s.replace('p', '.'));
  return { lowerCm: cm(m[1]), upperCm: m[2] === 'up' ? null : cm(m[2]), figure: m[3] as StandFigure };
}

export const isStandVariable = (variable: string): boolean => PATTERN.test(variable);

/** "10–20 cm" or "≥ 100 cm". */
export function classWords(lowerCm: number, upperCm: number | null): string {
  return upperCm === null ? `≥ ${lowerCm} cm` : `${lowerCm}–${upperCm} cm`;
}

/** Label of a stand-table variable; null for any other name. */
export function standLabel(variable: string): (Pick<VariableLabel, 'name' | 'short' | 'unit'> & { totalUnit: string }) | null {
  const v = parseStandVariable(variable);
  if (v === null) return null;
  const f = STAND_FIGURES.find((x) => x.key === v.figure) as (typeof STAND_FIGURES)[number];
  const cls = classWords(v.lowerCm, v.upperCm);
  return { name: `${f.name}, diameter ${cls}`, short: `${f.short} ${cls}`, unit: f.unit, totalUnit: f.totalUnit };
}

/** A plot's stand table as stored with its metrics (null classes: not measured on the plot). */
export interface StoredStandTable {
  readonly thresholdCm: number;
  readonly classes: ReadonlyArray<readonly number[] | null>;
}

function asStored(stored: unknown): StoredStandTable | null {
  if (typeof stored !== 'object' || stored === null) return null;
  const s = stored as { thresholdCm?: unknown; classes?: unknown };
  if (typeof s.thresholdCm !== 'number' || !(s.thresholdCm > 0) || !Array.isArray(s.classes)) return null;
  return s as StoredStandTable;
}

/** One value per class and figure of a plot's stored stand table (null where the class was not measured); empty when the plot has none (computed before stand tables existed). */
export function standTableValues(stored: unknown): Record<string, number | null> {
  const t = asStored(stored);
  if (t === null) return {};
  const classes = diameterClasses(t.thresholdCm);
  if (classes.length !== t.classes.length) return {};
  const out: Record<string, number | null> = {};
  classes.forEach((c, k) => {
    const row = t.classes[k];
    STAND_FIGURES.forEach((f, j) => {
      const x = row?.[j];
      out[standVariable(c, f.key)] = typeof x === 'number' && Number.isFinite(x) ? x : null;
    });
  });
  return out;
}

/** The stand-table variables some plot has a key for, by class (smallest first), then figure. */
export function standTableVariables(plots: ReadonlyArray<{ readonly values: Readonly<Record<string, unknown>> }>): string[] {
  const found = new Set<string>();
  for (const p of plots) for (const k of Object.keys(p.values)) if (isStandVariable(k)) found.add(k);
  return orderStandVariables(found);
}

/** The stand-table variables among `names`, once each, by class (smallest first), then figure. */
export function orderStandVariables(names: Iterable<string>): string[] {
  const found = new Set<string>();
  for (const k of names) if (isStandVariable(k)) found.add(k);
  const order = (v: string): [number, number] => {
    const s = parseStandVariable(v) as StandVariable;
    return [s.lowerCm, STAND_FIGURES.findIndex((f) => f.key === s.figure)];
  };
  return [...found].sort((a, b) => {
    const [la, fa] = order(a);
    const [lb, fb] = order(b);
    return la - lb || fa - fb;
  });
}
