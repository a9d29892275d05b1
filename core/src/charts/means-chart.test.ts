import { describe, expect, it } from 'vitest';
import type { RegionRow } from '../region-summary/types';
import { buildMeansChartSpec } from './means-chart';

const row = (forest_type: string, variable: string, mean: number, ci_low: number, ci_high: number): RegionRow => ({
  region: 'Northvale', forest_type, variable, n_plots: 3, mean, se: 1, ci_low, ci_high, sampling_error_pct: 10, forest_area_ha: null, total: null,
});

describe('means chart', () => {
  it('draws one panel per variable whose y axis spans every interval (whiskers are never clipped)', () => {
    const spec = buildMeansChartSpec([
      row('all', 'reporting_carbon_mg_ha', 94.5, 59.5, 130),
      row('wet', 'reporting_carbon_mg_ha', 110, 60.3, 159.7),
      row('dry', 'reporting_carbon_mg_ha', 48, -53.6, 149.6),
      row('all', 'reporting_basal_area_m2_ha', 21, 14.2, 27.8),
      row('all', 'fisher_alpha', 8, 5, 11), // not a panel of this chart
      row('all', 'carbon_mg_ha', 90, 50, 130), // all stems whatever the plot's diameter minimum: the chart shows the reporting-threshold figures
    ]) as unknown as { concat: Array<{ title: { text: string }; layer: Array<{ encoding: { y: { scale: { domain: [number, number] } } } }> }> };
    expect(spec.concat.map((p) => p.title.text)).toEqual(['Basal area ≥ threshold (m²/ha)', 'Carbon ≥ threshold (Mg C/ha)']);
    const [lo, hi] = spec.concat[1].layer[0].encoding.y.scale.domain;
    expect(lo).toBeLessThan(-53.6);
    expect(hi).toBeGreaterThan(159.7);
    expect(spec.concat[0].layer[0].encoding.y.scale.domain[0]).toBe(0); // bars start at zero when every interval is positive
  });

  it('has nothing to draw without means', () => {
    expect(buildMeansChartSpec([])).toBeNull();
  });
});
