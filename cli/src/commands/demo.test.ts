import { describe, expect, it } from 'vitest';
import type { DemoResult } from '../demo-pipeline';
import { demoChangeTable } from './demo';

const result = (change: DemoResult['change']): DemoResult => ({
  batchId: 'b', state: 'computed', plots: 3, stems: 10, regions: 1, fits: [], change, carbon: null, treeCarbon: null, carbonChange: null, treeCarbonChange: null, batches: 2, outDir: 'o', index: 'i', seconds: 1,
});

describe('demoChangeTable', () => {
  it('prints per forest type the planted value against the recovered estimate and its interval, rates in %/yr', () => {
    const text = demoChangeTable(
      result([
        { forestType: 'wet', variable: 'mortality_annual', n: 12, mean: 0.0165, ciLow: 0.0157, ciHigh: 0.0172 },
        { forestType: 'wet', variable: 'carbon_net_change_mg_ha_yr', n: 12, mean: 1.3, ciLow: 1.03, ciHigh: 1.58 },
      ]),
      { wet: { mortality_annual: { mean: 0.0168, se: 0.0002 }, carbon_net_change_mg_ha_yr: { mean: 0.913, se: 0.07 } } },
    );
    const lines = text.split('\n');
    expect(lines[1]).toMatch(/^wet\s+mortality %\/yr\s+12\s+1\.68\s+1\.65 \(1\.57 to 1\.72\)$/);
    expect(lines[2]).toMatch(/^wet\s+net carbon Mg C\/ha\/yr\s+12\s+0\.91\s+1\.30 \(1\.03 to 1\.58\)$/);
  });

  it('shows a dash without a planted value, and says so when no plot was measured twice', () => {
    expect(demoChangeTable(result([{ forestType: 'dry', variable: 'recruitment_annual', n: 4, mean: 0.02, ciLow: 0.01, ciHigh: 0.03 }]), null)).toMatch(/dry\s+recruitment %\/yr\s+4\s+—\s+2\.00 \(1\.00 to 3\.00\)/);
    expect(demoChangeTable(result([]), null)).toMatch(/No plot was measured twice/);
  });
});
