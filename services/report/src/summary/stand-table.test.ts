import { describe, expect, it } from 'vitest';
import { diameterClasses, standTableValues, tMultiplier, type RegionRow } from '@stemwise/core';
import { summariseNation } from './national-summary';
import { summariseRegion, summaryVariables, type PlotMetrics } from './region-summary';

// Invented scenario (Tavolira demo world): region Serrowin with forest types 'ridge' (300 ha) and
// 'valley' (100 ha). Stored stand tables hold [stems/ha, m²/ha, Mg/ha] per 10 cm class from 10 cm;
// only the first two classes carry stems, the others 0. Plot R3 was measured from 20 cm only.
const CLASSES = diameterClasses(10).length;
function stored(c1020: number | null, c2030: number): unknown {
  const classes = Array.from({ length: CLASSES }, (_, k) => (k === 0 ? (c1020 === null ? null : [c1020, c1020 / 100, c1020 / 10]) : k === 1 ? [c2030, c2030 / 50, c2030 / 5] : [0, 0, 0]));
  return { thresholdCm: 10, classes };
}
const plot = (plotId: string, forestType: string, c1020: number | null, c2030: number): PlotMetrics => ({
  plotId,
  forestType,
  values: { reporting_stems_ha: c1020 === null ? null : c1020 + c2030, ...standTableValues(stored(c1020, c2030)) },
});
const PLOTS = [plot('R1', 'ridge', 20, 8), plot('R2', 'ridge', 30, 6), plot('R3', 'ridge', null, 10), plot('V1', 'valley', 40, 4), plot('V2', 'valley', 60, 2)];
const AREAS = { ridge: 300, valley: 100 };
const rowOf = (rows: readonly RegionRow[], forestType: string, variable: string): RegionRow => {
  const r = rows.find((x) => x.forest_type === forestType && x.variable === variable);
  if (!r) throw new Error(`no row ${forestType}/${variable}`);
  return r;
};

describe('stand tables in the region summary (docs/methods.md#stand-tables)', () => {
  // The catalogue variables these plots have, and the stand-table variables summaryVariables adds.
  const variables = summaryVariables(PLOTS).filter((v) => v in PLOTS[0].values);
  const s = summariseRegion({ region: 'Serrowin', plots: PLOTS, forestAreas: AREAS, variables });

  it('adds one variable per class and figure, classes in order, after the catalogue variables', () => {
    const all = summaryVariables(PLOTS);
    const stand = all.filter((v) => v.startsWith('stand_'));
    expect(all.indexOf('stand_10_20_stems_ha')).toBe(all.length - 3 * CLASSES);
    expect(stand.slice(0, 4)).toEqual(['stand_10_20_stems_ha', 'stand_10_20_basal_area_m2_ha', 'stand_10_20_agb_mg_ha', 'stand_20_30_stems_ha']);
    expect(stand.at(-1)).toBe('stand_100_up_agb_mg_ha');
    expect(stand).toHaveLength(3 * CLASSES);
  });

  it('estimates the 10–20 cm class from the plots that measured it only (hand computation, Cochran 1977 ch. 5)', () => {
    // ridge 20, 30: ȳ = 25, s² = 50, n = 2; valley 40, 60: ȳ = 50, s² = 200, n = 2; W = 3/4, 1/4.
    // ȳ_st = 0.75·25 + 0.25·50 = 31.25; v = 0.75²·50/2 + 0.25²·200/2 = 14.0625 + 6.25 = 20.3125.
    const all = rowOf(s.rows, 'all', 'stand_10_20_stems_ha');
    expect(all.n_plots).toBe(4);
    expect(all.mean).toBeCloseTo(31.25, 12);
    expect(all.se).toBeCloseTo(Math.sqrt(20.3125), 12);
    // Satterthwaite: a = (14.0625, 6.25), n_e = (Σa)² / Σ a²/(n−1) = 20.3125² / (14.0625² + 6.25²)
    const df = 20.3125 ** 2 / (14.0625 ** 2 + 6.25 ** 2);
    expect(all.ci_high).toBeCloseTo(31.25 + tMultiplier(0.95, df) * Math.sqrt(20.3125), 9);
    expect(all.total).toBeCloseTo(31.25 * 400, 9); // stems in the class over 400 ha
    expect(rowOf(s.rows, 'ridge', 'stand_10_20_stems_ha').n_plots).toBe(2);
    // Basal area and biomass follow from the same plots: stored as stems/100 and stems/10.
    expect(rowOf(s.rows, 'all', 'stand_10_20_basal_area_m2_ha').mean).toBeCloseTo(0.3125, 12);
    expect(rowOf(s.rows, 'all', 'stand_10_20_agb_mg_ha').mean).toBeCloseTo(3.125, 12);
  });

  it('estimates the 20–30 cm class from every plot (hand computation)', () => {
    // ridge 8, 6, 10: ȳ = 8, s² = 4, n = 3; valley 4, 2: ȳ = 3, s² = 2, n = 2.
    // ȳ_st = 6 + 0.75 = 6.75; v = 0.5625·4/3 + 0.0625·2/2 = 0.8125.
    const all = rowOf(s.rows, 'all', 'stand_20_30_stems_ha');
    expect(all.n_plots).toBe(5);
    expect(all.mean).toBeCloseTo(6.75, 12);
    expect(all.se).toBeCloseTo(Math.sqrt(0.8125), 12);
    expect(rowOf(s.rows, 'all', 'stand_20_30_basal_area_m2_ha').mean).toBeCloseTo(6.75 / 50, 12);
  });

  it('says how many plots the reporting-threshold figures and the first class leave out, and why', () => {
    const notes = s.notes.filter((n) => n.code === 'plots_left_out').map((n) => n.message);
    expect(notes.find((m) => m.startsWith('reporting_stems_ha:'))).toMatch(/1 of 5 plots left out.*measured only from a larger diameter/);
    expect(notes.find((m) => m.startsWith('stand_10_20_stems_ha:'))).toMatch(/1 of 5 plots/);
    expect(notes.some((m) => m.startsWith('stand_20_30_'))).toBe(false);
  });

  it('gives the national stand table over region × forest type strata', () => {
    const other = [plot('K1', 'ridge', 10, 2), plot('K2', 'ridge', 14, 4)];
    const n = summariseNation({ regions: [{ region: 'Serrowin', plots: PLOTS, forestAreas: AREAS }, { region: 'Kallenby', plots: other, forestAreas: { ridge: 100 } }], variables });
    // 10–20: strata Kallenby/ridge 100 ha (10, 14: ȳ 12), Serrowin/ridge 300 ha (25), Serrowin/valley 100 ha (50).
    // ȳ_st = (100·12 + 300·25 + 100·50) / 500 = 13700 / 500 = 27.4 (computed by hand).
    const all = rowOf(n.rows, 'all', 'stand_10_20_stems_ha');
    expect(all.mean).toBeCloseTo(27.4, 12);
    expect(all.n_plots).toBe(6);
    // v = 0.2²·8/2 + 0.6²·50/2 + 0.2²·200/2 = 0.16 + 9 + 4 = 13.16
    expect(all.se).toBeCloseTo(Math.sqrt(13.16), 12);
  });
});
