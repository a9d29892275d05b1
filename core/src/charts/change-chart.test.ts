import { describe, expect, it } from 'vitest';
import type { RegionRow } from '../region-summary/types';
import { fitChartData } from '../fits/chart-data';
import { fitCurves } from '../science/verdict';
import { buildChangeChartSpec, renderChangeChartSvg } from './change-chart';
import { renderFitChartSvg } from './fit-chart';
import { renderGuildChartSvg } from './guild-chart';
import { MEANS_CHART_VARIABLES, renderMeansChartSvg } from './means-chart';
import { atReportWidth, REPORT_CHART_SIZE } from './render';

const row = (forest_type: string, variable: string, mean: number, ci_low: number, ci_high: number): RegionRow => ({
  region: 'Northvale', forest_type, variable, n_plots: 4, mean, se: 0.5, ci_low, ci_high, sampling_error_pct: 30, forest_area_ha: null, total: null,
});

// Invented figures (Mg/ha/yr) whose net change is growth + recruitment − died − removed: 3 + 0.5 − 1.2 − 0.4 = 1.9.
const ROWS: RegionRow[] = [
  row('all', 'agb_growth_mg_ha_yr', 3, 2.2, 3.8),
  row('all', 'agb_recruitment_mg_ha_yr', 0.5, 0.1, 0.9),
  row('all', 'agb_died_mg_ha_yr', 1.2, 0.4, 2),
  row('all', 'agb_removed_mg_ha_yr', 0.4, 0, 0.8),
  row('all', 'agb_net_change_mg_ha_yr', 1.9, 0.6, 3.2),
  row('wet', 'agb_growth_mg_ha_yr', 3.5, 2, 5),
  row('wet', 'agb_died_mg_ha_yr', 1, -0.1, 2.1),
  row('all', 'carbon_mg_ha', 90, 80, 100), // a stock: not a part of the chart
];

type Bars = { data: { values: Array<{ stratum: string; part: string; value: number; low: number; high: number }> } };

describe('change chart', () => {
  it('draws gains above zero and losses below, each with its 95 % interval mirrored with it', () => {
    const bars = (buildChangeChartSpec(ROWS) as unknown as Bars).data.values;
    expect(bars.map((b) => `${b.stratum} ${b.part}`)).toEqual([
      'whole region survivor growth',
      'wet survivor growth',
      'whole region recruitment',
      'whole region died',
      'wet died',
      'whole region removed',
      'whole region net change',
    ]);
    const died = bars.find((b) => b.stratum === 'whole region' && b.part === 'died')!;
    expect(died).toMatchObject({ value: -1.2, low: -2, high: -0.4 });
    const wetDied = bars.find((b) => b.stratum === 'wet' && b.part === 'died')!;
    expect(wetDied).toMatchObject({ value: -1, low: -2.1, high: 0.1 });
    expect(bars.find((b) => b.part === 'net change')).toMatchObject({ value: 1.9, low: 0.6, high: 3.2 });
  });

  it('names the whole country for the national rows, and has nothing to draw without change rows', () => {
    const bars = (buildChangeChartSpec(ROWS, { label: 'whole country' }) as unknown as Bars).data.values;
    expect(bars[0].stratum).toBe('whole country');
    expect(buildChangeChartSpec(ROWS.filter((r) => r.variable === 'carbon_mg_ha'))).toBeNull();
  });

  it('renders with a legend of the five parts and the unit on the axis', async () => {
    const svg = (await renderChangeChartSvg(ROWS))!;
    expect(svg).toMatch(/aria-label="Symbol legend for fill color with 5 values: survivor growth, recruitment, died, removed, net change"/);
    expect(svg).toContain('Biomass change (Mg/ha/yr)');
  });
});

describe('chart sizes', () => {
  it('are the same width for every report chart (fit, means, guilds, change)', async () => {
    const pts = Array.from({ length: 40 }, (_, i) => ({ x: i / 40, y: 5 + Math.sin(i), highlight: i % 4 === 0 }));
    const svgs = [
      await renderFitChartSvg({ forestType: 'wet', metric: 'fisher_alpha', axis: 'disturbance_index', points: pts, chart: fitChartData(fitCurves(pts, { bootstrapN: 0 })) }),
      (await renderMeansChartSvg(MEANS_CHART_VARIABLES.flatMap((v) => [row('all', v, 10, 8, 12), row('wet', v, 11, 7, 15)])))!,
      (await renderGuildChartSvg([{ forest_type: 'all', guild: 'pioneer', n_plots: 3, mean_share: 0.4, se: 0.1 }, { forest_type: 'all', guild: 'shade_tolerant', n_plots: 3, mean_share: 0.6, se: 0.1 }]))!,
      (await renderChangeChartSvg(ROWS))!,
    ];
    for (const svg of svgs) {
      const [, width, height, box] = /^<svg\b[^>]*?\swidth="([\d.]+)"\s+height="([\d.]+)"[^>]*?viewBox="([^"]+)"/.exec(svg)!;
      expect(Number(width)).toBe(REPORT_CHART_SIZE.width);
      // the drawing keeps its proportions: height / width as in the viewBox
      const [, , vw, vh] = box.split(' ').map(Number);
      expect(Math.abs(Number(height) - (vh * REPORT_CHART_SIZE.width) / vw)).toBeLessThanOrEqual(0.5);
    }
  });

  it('scales an SVG of another width through its viewBox, and leaves one at the width alone', () => {
    expect(atReportWidth('<svg class="marks" width="320" height="100" viewBox="0 0 320 100"></svg>')).toBe('<svg class="marks" width="640" height="200" viewBox="0 0 320 100"></svg>');
    const same = '<svg class="marks" width="640" height="300" viewBox="0 0 640 300"></svg>';
    expect(atReportWidth(same)).toBe(same);
  });
});
