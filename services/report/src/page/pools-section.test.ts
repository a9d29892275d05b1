import type { RegionRow, TotalRow } from '@stemwise/core';
import { describe, expect, it } from 'vitest';
import { poolsSection, POOLS_NOT_COVERED } from './pools-section';

// Rows of an invented region of the demo scenario; the figures are made up for the page, not science.
const row = (variable: string, mean: number, se: number, forest_type = 'all'): RegionRow => ({
  region: 'Orvena', forest_type, variable, n_plots: 30, mean, se, ci_low: mean - 2 * se, ci_high: mean + 2 * se,
  sampling_error_pct: (200 * se) / mean, forest_area_ha: 1000, total: mean * 1000,
});
const STOCKS: RegionRow[] = [
  row('carbon_mg_ha', 110, 2),
  row('bgb_carbon_mg_ha', 34, 0.6),
  row('standing_dead_carbon_mg_ha', 7.5, 0.15),
  row('tree_carbon_mg_ha', 151.5, 2.4),
  row('tree_carbon_mg_ha', 90, 5, 'dry'), // a forest type's row is not the whole area's
];
const TOTALS: TotalRow[] = [{ forest_type: 'all', variable: 'tree_carbon_mg_ha', forest_area_ha: 1000, total: 151500, se: 2400, ci_low: 146700, ci_high: 156300 }];

const cells = (markup: string, pool: string): string[] =>
  [...(new RegExp(`<tr[^>]*data-pool="${pool}"[^>]*>([\\s\\S]*?)</tr>`).exec(markup)?.[1] ?? '').matchAll(/<td[^>]*>([\s\S]*?)<\/td>/g)].map((m) => m[1].replace(/<[^>]+>/g, '').trim());

describe('poolsSection', () => {
  it('shows the three covered pools and their sum with the whole-area estimates, and names lying dead wood, litter and soil as not covered', () => {
    const page = String(poolsSection(STOCKS, TOTALS, 0.47));
    expect(cells(page, 'carbon_mg_ha')[2]).toBe('110.0 (106.0 – 114.0)');
    expect(cells(page, 'bgb_carbon_mg_ha')[2]).toBe('34.00 (32.80 – 35.20)');
    expect(cells(page, 'tree_carbon_mg_ha')[2]).toBe('151.5 (146.7 – 156.3)');
    expect(cells(page, 'tree_carbon_mg_ha')[3]).toBe('151,500 (146,700 – 156,300)');
    for (const name of POOLS_NOT_COVERED) expect(page).toMatch(new RegExp(`<td>${name}</td><td><strong>not covered</strong>`));
    expect(POOLS_NOT_COVERED).toEqual(['Lying dead wood', 'Litter', 'Soil organic carbon']);
    expect(page).toContain('defer to them');
    expect(page).not.toContain('Net change');
  });
  it('with change rows, adds the net change in carbon: biomass changes of roots and dead wood × the carbon fraction', () => {
    const page = String(poolsSection([...STOCKS, row('carbon_net_change_mg_ha_yr', -0.5, 0.1), row('bgb_net_change_mg_ha_yr', -0.2, 0.05), row('tree_carbon_net_change_mg_ha_yr', -0.6, 0.12)], TOTALS, 0.5));
    expect(page).toContain('Net change, Mg C/ha/yr');
    expect(cells(page, 'carbon_mg_ha')[4]).toBe('-0.50 (-0.70 – -0.30)');
    // −0.2 Mg/ha/yr of roots is −0.1 Mg C/ha/yr at a carbon fraction of 0.5 (SE 0.025).
    expect(cells(page, 'bgb_carbon_mg_ha')[4]).toBe('-0.100 (-0.150 – -0.050)');
    expect(cells(page, 'standing_dead_carbon_mg_ha')[4]).toBe('–');
  });
  it('is null for a summary made before the pools existed', () => {
    expect(poolsSection([row('carbon_mg_ha', 110, 2)], [], 0.47)).toBeNull();
  });
});
