import { describe, expect, it } from 'vitest';
import { biomassMethodShares } from './biomass-method';
import { summaryChanges } from './summary-changes';
import { plotSizeNote } from '../page/plot-size-note';

const shares = (measured: number, species: number) => ({
  agb_height_measured_share: measured,
  agb_height_modelled_share: 1 - measured,
  agb_no_height_share: 0,
  agb_wd_species_share: species,
  agb_wd_genus_share: 1 - species,
  agb_wd_family_share: 0,
  agb_wd_plot_share: 0,
  agb_wd_default_share: 0,
});

describe('biomassMethodShares (docs/methods.md#biomass-method-shares)', () => {
  it('weighs each plot by its AGB: Σ sₚ·AGBₚ / Σ AGBₚ (computed by hand), per forest type and for all', () => {
    const rows = biomassMethodShares([
      { plotId: 'a', forestType: 'wet', values: { agb_mg_ha: 300, ...shares(1, 0.5) } },
      { plotId: 'b', forestType: 'wet', values: { agb_mg_ha: 100, ...shares(0, 1) } },
      { plotId: 'c', forestType: 'dry', values: { agb_mg_ha: 100, ...shares(0.5, 0) } },
      { plotId: 'd', forestType: 'dry', values: { agb_mg_ha: 50, agb_height_measured_share: null } },
    ]);
    expect(rows.map((r) => r.forest_type)).toEqual(['all', 'dry', 'wet']);
    const [all, dry, wet] = rows;
    expect(wet.height_measured).toBeCloseTo(300 / 400, 15);
    expect(wet.wd_species).toBeCloseTo((150 + 100) / 400, 15);
    expect(dry.n_plots).toBe(1); // d has no shares: left out
    expect(dry.height_measured).toBeCloseTo(0.5, 15);
    expect(all.height_measured).toBeCloseTo((300 + 50) / 500, 15);
    expect(all.height_modelled! + all.height_measured! + all.no_height!).toBeCloseTo(1, 15);
    expect(all.agb_mg_ha_sum).toBe(500);
  });

  it('gives null shares where no plot has biomass', () => {
    const [all] = biomassMethodShares([{ plotId: 'a', forestType: 'wet', values: { agb_mg_ha: 0, ...shares(1, 1) } }]);
    expect(all.n_plots).toBe(0);
    expect(all.height_measured).toBeNull();
  });
});

describe('summaryChanges (docs/methods.md#what-changed-between-versions)', () => {
  const row = (forest_type: string, mean: number | null, se: number | null) => ({
    region: 'R', forest_type, variable: 'stems_ha', n_plots: 3, mean, se, ci_low: null, ci_high: null, sampling_error_pct: null, forest_area_ha: null, total: null,
  });
  it('lists a move larger than the new SE, not one equal to it or without an SE', () => {
    const c = summaryChanges(
      { version: 3, rows: [row('all', 110, 9.99), row('wet', 105, 5), row('dry', 200, null)], plotKeys: ['A', 'C'] },
      { version: 2, rows: [row('all', 100, 8), row('wet', 100, 4), row('dry', 100, 3)], plotKeys: ['A', 'B'] },
    );
    expect(c.moved).toEqual([{ forest_type: 'all', variable: 'stems_ha', old_mean: 100, new_mean: 110, se: 9.99 }]);
    expect(c.plots_added).toEqual(['C']);
    expect(c.plots_removed).toEqual(['B']);
    expect(c.previous_version).toBe(2);
  });
  it('does not know plots added or removed when a version has no plot keys', () => {
    const c = summaryChanges({ version: 2, rows: [], plotKeys: ['A'] }, { version: 1, rows: [], plotKeys: null });
    expect(c.plots_added).toBeNull();
    expect(c.plots_removed).toBeNull();
  });
});

describe('plotSizeNote', () => {
  it('says nothing when every plot has the same area, and names the sizes when they differ', () => {
    expect(plotSizeNote([{ forest_type: 'wet', area_ha: 1, n_plots: 3 }, { forest_type: 'dry', area_ha: 1, n_plots: 2 }])).toBeNull();
    expect(plotSizeNote(undefined)).toBeNull();
    const note = String(plotSizeNote([{ forest_type: 'wet', area_ha: 1, n_plots: 3 }, { forest_type: 'dry', area_ha: 0.5, n_plots: 2 }]));
    expect(note).toContain('2 of 0.5 ha, 3 of 1 ha');
  });
});
