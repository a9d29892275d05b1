import { describe, expect, it } from 'vitest';
import type { RegionRow } from '@stemwise/core';
import { reportingThresholdNote, standTableSection } from './stand-table-section';

const row = (forest_type: string, variable: string, n: number, mean: number | null, se: number | null): RegionRow => ({
  region: 'Serrowin', forest_type, variable, n_plots: n, mean, se, ci_low: mean === null || se === null ? null : mean - 2 * se, ci_high: mean === null || se === null ? null : mean + 2 * se, sampling_error_pct: 10, forest_area_ha: null, total: null, caution_flag: 'none',
});

describe('the stand table on the pages', () => {
  const rows = [
    row('all', 'stems_ha', 5, 500, 20),
    row('all', 'stand_20_30_stems_ha', 5, 6.75, 0.9),
    row('all', 'stand_10_20_stems_ha', 4, 31.25, 4.5),
    row('all', 'stand_10_20_basal_area_m2_ha', 4, 0.3125, 0.045),
    row('all', 'stand_10_20_agb_mg_ha', 4, 3.125, 0.45),
    row('all', 'stand_100_up_stems_ha', 5, 2, null),
    row('ridge', 'stand_10_20_stems_ha', 2, 25, 5),
  ];

  it('lists the classes in order with their plots, figures and intervals, and a folded table per forest type', () => {
    const html = String(standTableSection(rows, 'Whole region (stratified)'));
    const classes = [...html.matchAll(/<tr><td>([^<]+)<\/td><td class="num">(\d+)<\/td>/g)].map((m) => [m[1], m[2]]);
    expect(classes.slice(0, 3)).toEqual([['10–20 cm', '4'], ['20–30 cm', '5'], ['≥ 100 cm', '5']]);
    expect(html).toContain('31.3'); // 31.25 at the SE's second digit (SE 4.5)
    expect(html).toContain('reporting threshold (10 cm)');
    expect(html).toMatch(/<details class="stand-table-type"><summary>Forest type ridge<\/summary>/);
  });

  it('shows nothing for a summary without stand-table rows', () => {
    expect(standTableSection([row('all', 'stems_ha', 5, 500, 20)], 'x')).toBeNull();
    expect(reportingThresholdNote([row('all', 'stems_ha', 5, 500, 20)])).toBeNull();
    expect(String(reportingThresholdNote(rows))).toContain('from 10 cm diameter up');
  });
});
