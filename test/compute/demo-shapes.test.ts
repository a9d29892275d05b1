import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_DATA_DIR } from '@stemwise/demo-inventory';
import { forestTypeFitChartSvg } from '@stemwise/report';
import { loadDemoInventory } from './demo-loader';
import { fitsText, recomputeInProcess } from './support';
import { useServices, type TestServices } from '../support/services';

// End to end on the committed demo inventory (invented data whose diversity–disturbance curves were
// planted by the generator: truth.json): loaded with SQL, recomputed, fitted. The verdicts must find
// what was planted: a hump in `wet` near its planted vertex, a decline in `moist`, nothing in `dry`.
describe('planted shapes of the demo inventory', () => {
  let s: TestServices;
  const truth = JSON.parse(fs.readFileSync(`${DEMO_DATA_DIR}/truth.json`, 'utf8'));

  beforeAll(async () => {
    s = await useServices();
    await loadDemoInventory(s.db, DEMO_DATA_DIR);
    const [{ n }] = await s.db.query<{ n: number }>(`select count(*)::int n from stems`);
    expect(n).toBe(truth.counts.stems.rows);
    const { failures } = await recomputeInProcess(s.config, s.db);
    expect(failures).toEqual([]);
  }, 120_000);
  afterAll(async () => s?.cleanup());

  it('finds the planted verdicts and the hump near the planted vertex', async () => {
    const rows = JSON.parse(await fitsText(s.config, s.db, { format: 'json' })) as Array<Record<string, number | string | null>>;
    const quad = (t: string) => rows.find((r) => r.forest_type === t && r.model === 'quadratic')!;
    expect(quad('wet').verdict).toBe('hump');
    expect(quad('moist').verdict).toBe('decreasing');
    expect(quad('dry').verdict).toBe('none');
    const planted = truth.planted.by_forest_type.wet.vertex as number; // truth.json of the generator
    const peak = quad('wet').peak_x as number;
    // within 0.1 on the disturbance axis (150 plots; the science's own test asks ±0.05 with 800 plots)
    expect(Math.abs(peak - planted)).toBeLessThan(0.1);
    expect(quad('wet').peak_ci_low as number).toBeLessThan(planted);
    expect(quad('wet').peak_ci_high as number).toBeGreaterThan(planted);
    for (const t of ['wet', 'moist', 'dry']) expect(quad(t).n).toBe(truth.counts.plots_by_forest_type[t]);
  });

  it('stores what the chart of each forest type shows, and the chart draws from it', async () => {
    for (const t of ['wet', 'moist', 'dry']) {
      const svg = await forestTypeFitChartSvg(s, t);
      expect(svg, t).toMatch(/^<svg[\s\S]*<\/svg>\s*$/);
      expect(svg, t).toContain(`n = ${truth.counts.plots_by_forest_type[t]}`);
    }
  });
});
