import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import { describe, expect, it } from 'vitest';
import { summariseNation, type NationalRegionInput } from './national-summary';
import { RegionSummaryInputError, type PlotMetrics } from './input';
import { summariseRegion } from './region-summary';
import { REGION_COLUMNS, type NationalSummary } from '@stemwise/core';

// Invented scenario: the (invented) Republic of Oskeland with the regions Ardel, Brisk and Corvan and
// the forest types ridge and valley. Values are chosen for hand computation or drawn from a seeded
// generator, never real data.

const plot = (plotId: string, forestType: string, stems_ha: number | null, carbon_mg_ha: number | null = null): PlotMetrics => ({
  plotId,
  forestType,
  values: { stems_ha, carbon_mg_ha },
});
const rowOf = (s: NationalSummary, forestType: string, variable = 'stems_ha') => {
  const r = s.rows.find((x) => x.forest_type === forestType && x.variable === variable);
  if (!r) throw new Error(`no row ${forestType}/${variable}`);
  return r;
};
const t975 = (df: number) => tQuantile(0.975, df);

// Worked by hand (Cochran 1977, Sampling Techniques 3rd ed., ch. 5: ȳ_st = Σ W_h ȳ_h, v = Σ W_h² s_h²/n_h;
// Satterthwaite 1946 / Cochran eq. 5.16: n_e = (Σ a_h)² / Σ a_h²/(n_h − 1), a_h = W_h² s_h²/n_h):
//   Ardel/ridge 200 ha: 4, 8      → ȳ 6,  s² 8    W 1/2   a = (1/4)·8/2    = 1
//   Ardel/valley 100 ha: 1, 3     → ȳ 2,  s² 2    W 1/4   a = (1/16)·2/2   = 1/16
//   Brisk/ridge 100 ha: 9, 10, 11 → ȳ 10, s² 1    W 1/4   a = (1/16)·1/3   = 1/48
//   national: ȳ = 3 + 0.5 + 2.5 = 6; v = 1 + 3/48 + 1/48 = 13/12, SE = √(13/12);
//     n_e = (13/12)² / (1 + (1/16)² + (1/48)²/2) = (169/144)·(4608/4627) = 5408/4627; total 6 · 400 = 2400
//   ridge nationally (regions as strata, 200 and 100 ha, W 2/3 1/3): ȳ = 4 + 10/3 = 22/3;
//     v = (4/9)·8/2 + (1/9)·1/3 = 49/27; n_e = (49/27)² / ((16/9)² + (1/27)²/2) = 4802/4609; total 2200
//   valley nationally: Ardel alone, ȳ 2, SE 1, df 1, total 200
const HAND: NationalRegionInput[] = [
  { region: 'Brisk', plots: [plot('B1', 'ridge', 9), plot('B2', 'ridge', 10), plot('B3', 'ridge', 11)], forestAreas: { ridge: 100 } },
  { region: 'Ardel', plots: [plot('A1', 'ridge', 4), plot('A2', 'ridge', 8), plot('A3', 'valley', 1), plot('A4', 'valley', 3)], forestAreas: { ridge: 200, valley: 100 } },
];

describe('summariseNation, a hand-computed example', () => {
  const s = summariseNation({ regions: HAND, variables: ['stems_ha'] });

  it('stratifies all regions by region × forest type with area weights', () => {
    expect(s.weighting).toBe('area');
    expect(s.regions).toEqual(['Ardel', 'Brisk']);
    expect(s.strata).toEqual([
      { region: 'Ardel', forest_type: 'ridge', n_plots: 2, forest_area_ha: 200 },
      { region: 'Ardel', forest_type: 'valley', n_plots: 2, forest_area_ha: 100 },
      { region: 'Brisk', forest_type: 'ridge', n_plots: 3, forest_area_ha: 100 },
    ]);
    const all = rowOf(s, 'all');
    expect(all).toMatchObject({ region: 'national', n_plots: 7, forest_area_ha: 400 });
    expect(all.mean).toBeCloseTo(6, 12);
    expect(all.se).toBeCloseTo(Math.sqrt(13 / 12), 12);
    expect(all.total).toBeCloseTo(2400, 9);
    const detail = s.estimate_details.find((d) => d.forest_type === 'all' && d.variable === 'stems_ha');
    expect(detail?.df).toBeCloseTo(5408 / 4627, 12);
    expect(detail?.df_method).toBe('satterthwaite');
    expect(all.ci_high! - all.mean!).toBeCloseTo(t975(5408 / 4627) * Math.sqrt(13 / 12), 9);
  });

  it('gives each forest type nationally with the regions as strata', () => {
    const ridge = rowOf(s, 'ridge');
    expect(ridge).toMatchObject({ n_plots: 5, forest_area_ha: 300 });
    expect(ridge.mean).toBeCloseTo(22 / 3, 12);
    expect(ridge.se).toBeCloseTo(Math.sqrt(49 / 27), 12);
    expect(ridge.total).toBeCloseTo(2200, 9);
    expect(s.estimate_details.find((d) => d.forest_type === 'ridge')?.df).toBeCloseTo(4802 / 4609, 12);
    const valley = rowOf(s, 'valley');
    expect(valley).toMatchObject({ n_plots: 2, mean: 2, se: 1, forest_area_ha: 100, total: 200 });
    expect(valley.ci_high! - 2).toBeCloseTo(t975(1), 9);
  });

  it('writes `export regions` rows: region national, REGION_COLUMNS in order, `all` first then forest types', () => {
    for (const r of s.rows) expect(Object.keys(r)).toEqual([...REGION_COLUMNS]);
    expect(s.rows.map((r) => `${r.region}/${r.forest_type}`)).toEqual(['national/all', 'national/ridge', 'national/valley']);
  });

  it('agrees with the region summary where a forest type lies in one region only', () => {
    const ardel = summariseRegion({ region: 'Ardel', plots: HAND[1].plots, forestAreas: HAND[1].forestAreas, variables: ['stems_ha'] });
    const own = ardel.rows.find((r) => r.forest_type === 'valley')!;
    expect({ ...rowOf(s, 'valley'), region: 'Ardel' }).toEqual(own);
  });
});

// A seeded generator (Park & Miller 1988 minimal standard LCG), for data nobody chose by hand.
function lcg(seed: number): () => number {
  let x = seed;
  return () => (x = (x * 48271) % 2147483647) / 2147483647;
}

// Independent computation, written directly from Cochran (1977) ch. 5 and Satterthwaite (1946):
// strata = region × forest type; W_h = A_h/A (or n_h/n); mean = Σ W_h ȳ_h; var = Σ W_h² s_h²/n_h.
function independent(strata: Array<{ values: number[]; area: number | null }>, byArea: boolean) {
  const n = strata.reduce((a, s) => a + s.values.length, 0);
  const A = strata.reduce((a, s) => a + (s.area ?? 0), 0);
  let mean = 0;
  let v = 0;
  let den = 0;
  const terms: number[] = [];
  for (const s of strata) {
    const nh = s.values.length;
    const w = byArea ? (s.area as number) / A : nh / n;
    const m = s.values.reduce((a, b) => a + b, 0) / nh;
    const s2 = s.values.reduce((a, y) => a + (y - m) ** 2, 0) / (nh - 1);
    mean += w * m;
    const a = (w * w * s2) / nh;
    terms.push(a);
    v += a;
    den += (a * a) / (nh - 1);
  }
  return { mean, se: Math.sqrt(v), df: (v * v) / den, total: byArea ? mean * A : null };
}

describe('summariseNation against an independent computation over region × forest type strata', () => {
  const rand = lcg(20261202);
  const regions: NationalRegionInput[] = ['Ardel', 'Brisk', 'Corvan'].map((region, i) => {
    const plots: PlotMetrics[] = [];
    for (const [k, type] of ['ridge', 'valley'].entries()) {
      const n = 3 + Math.floor(rand() * 6);
      for (let j = 0; j < n; j++) plots.push(plot(`${region}-${type}-${j}`, type, 200 + 400 * rand() + 100 * k, 50 + 150 * rand()));
    }
    return { region, plots, forestAreas: { ridge: 1000 * (i + 1) + 500 * rand(), valley: 700 + 900 * rand() } };
  });
  const strataOf = (type: string | null, variable: 'stems_ha' | 'carbon_mg_ha', withArea = true) =>
    regions.flatMap((r) =>
      ['ridge', 'valley']
        .filter((t) => type === null || t === type)
        .map((t) => ({
          values: r.plots.filter((p) => p.forestType === t).map((p) => p.values[variable] as number),
          area: withArea ? (r.forestAreas as Record<string, number>)[t] : null,
        })),
    );

  it('matches with area weights: mean, SE, Satterthwaite df, interval and total, nationally and per forest type', () => {
    const s = summariseNation({ regions, variables: ['stems_ha', 'carbon_mg_ha'] });
    expect(s.weighting).toBe('area');
    for (const variable of ['stems_ha', 'carbon_mg_ha'] as const) {
      for (const type of [null, 'ridge', 'valley']) {
        const want = independent(strataOf(type, variable), true);
        const got = rowOf(s, type ?? 'all', variable);
        expect(got.mean).toBeCloseTo(want.mean, 9);
        expect(got.se).toBeCloseTo(want.se, 9);
        expect(got.total! / want.total!).toBeCloseTo(1, 12);
        expect(s.estimate_details.find((d) => d.forest_type === (type ?? 'all') && d.variable === variable)?.df).toBeCloseTo(want.df, 9);
        expect((got.ci_high! - got.ci_low!) / 2).toBeCloseTo(t975(want.df) * want.se, 9);
      }
    }
  });

  it('falls back to plot-count weights for every national figure when one stratum has no area, and gives no totals', () => {
    const partial = regions.map((r) => (r.region === 'Corvan' ? { ...r, forestAreas: { ridge: 1200 } } : r));
    const s = summariseNation({ regions: partial, variables: ['stems_ha'] });
    expect(s.weighting).toBe('plot_count');
    expect(s.notes.find((n) => n.code === 'areas_incomplete')?.message).toContain("'Corvan / valley'");
    const want = independent(strataOf(null, 'stems_ha', false), false);
    const got = rowOf(s, 'all');
    expect(got.mean).toBeCloseTo(want.mean, 9);
    expect(got.se).toBeCloseTo(want.se, 9);
    expect(got.total).toBeNull();
  });
});

describe('summariseNation input', () => {
  it('refuses a region named national (the name of its own rows)', () => {
    expect(() => summariseNation({ regions: [{ region: 'national', plots: [plot('N1', 'ridge', 1)] }] })).toThrow(RegionSummaryInputError);
  });

  it('gives no rows and says so when no region has plots', () => {
    const s = summariseNation({ regions: [{ region: 'Ardel', plots: [] }] });
    expect(s.rows).toEqual([]);
    expect(s.notes.map((n) => n.code)).toContain('no_plots');
  });
});
