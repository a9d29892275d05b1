import { describe, expect, it } from 'vitest';
import type { RegionPlotRow } from '@stemwise/db';
import { columnDecimals, plotTable, sortPlots } from './plot-table';

const plot = (plotKey: string, agb: number | null, forestType = 'wet'): RegionPlotRow =>
  ({ plotKey, forestType, latitude: 0, longitude: 0, elevationM: null, surveyDate: '2026-01-01', metrics: { agb_mg_ha: agb }, change: {} }) as unknown as RegionPlotRow;
const plots = [plot('B', 120), plot('A', null), plot('C', 80, 'dry'), plot('D', 120)];

describe('plot table', () => {
  it('sorts by a figure either way, plots without a value last, ties by plot id', () => {
    expect(sortPlots(plots, { key: 'agb_mg_ha', dir: 'desc' }).map((p) => p.plotKey)).toEqual(['B', 'D', 'C', 'A']);
    expect(sortPlots(plots, { key: 'agb_mg_ha', dir: 'asc' }).map((p) => p.plotKey)).toEqual(['C', 'B', 'D', 'A']);
    expect(sortPlots(plots, { key: 'forest_type', dir: 'asc' }).map((p) => p.plotKey)).toEqual(['C', 'A', 'B', 'D']);
  });

  it('gives a column one number of decimals: three significant figures of its median', () => {
    expect(columnDecimals([37.2, 16, 50.9])).toBe(1);
    expect(columnDecimals([0.385, 0.00714, 0.672])).toBe(3);
    expect(columnDecimals([1482, 578, null])).toBe(0);
    expect(columnDecimals([null])).toBe(0);
  });

  it('links each heading to the other order of its column, and marks the current one', () => {
    const out = plotTable({ plots, variables: ['agb_mg_ha'], sort: { key: 'agb_mg_ha', dir: 'desc' }, sortHref: (s) => `?sort=${s.key}&dir=${s.dir}`, plotHref: (k) => `/p/${k}` }).value;
    expect(out).toContain('aria-sort="descending"');
    expect(out).toContain('href="?sort=agb_mg_ha&amp;dir=asc"'); // a second click turns the order round
    expect(out).toContain('href="?sort=plot&amp;dir=asc"');
    expect(out).toContain('<a href="/p/A">A</a>');
    const still = plotTable({ plots, variables: ['agb_mg_ha'], sort: { key: 'plot', dir: 'asc' }, sortHref: null, plotHref: null }).value;
    expect(still).not.toContain('<a ');
  });
});
