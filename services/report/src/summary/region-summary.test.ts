import { describe, expect, it } from 'vitest';
import { REGION_COLUMNS, tMultiplier, type RegionSummary } from '@stemwise/core';
import {
  RegionSummaryInputError,
  summariseRegion,
  type PlotMetrics,
  type RegionSummaryInput,
} from './region-summary';

// Invented scenario: the region of Varenmoor in the (invented) Republic of Oskeland, with two forest
// types, 'ridge' and 'valley'. Values are chosen for hand computation, not realism.

type Values = Record<string, number | null>;
const plot = (plotId: string, forestType: string, values: Values, speciesNames?: string[]): PlotMetrics => ({ plotId, forestType, values, speciesNames });

// Guild shares of each plot sum to 1: [pioneer, light_demander, shade_tolerant, unassigned].
const shares = (p: number, l: number, s: number, u: number): Values => ({
  pioneer_ba_share: p,
  light_demander_ba_share: l,
  shade_tolerant_ba_share: s,
  unassigned_ba_share: u,
});

// The two-stratum hand case of estimators/stratified.test.ts, as plots:
//   ridge 300 ha: stems_ha 2 4 6 → mean 4, s² 4; valley 100 ha: 10 14 → mean 12, s² 8
//   W = 0.75, 0.25 → ȳ_st = 6, SE = 1, n_e = 32/11, total over 400 ha = 2400, SE 400 (computed by hand)
//   pioneer shares: ridge .2 .4 .6 → 0.4, valley .1 .3 → 0.2, region 0.75·0.4 + 0.25·0.2 = 0.35 (by hand)
//   disturbance_index: ridge 0.05 0.2 0.7, valley 0.1 0.65 → region share 'high' = 0.75/3 + 0.25/2 = 0.375
const PLOTS: readonly PlotMetrics[] = [
  plot('VM-001', 'ridge', { stems_ha: 2, fisher_alpha: 8, disturbance_index: 0.05, ...shares(0.2, 0.3, 0.4, 0.1) }, ['Quellia alta', 'Brantia ovata']),
  plot('VM-002', 'ridge', { stems_ha: 4, fisher_alpha: null, disturbance_index: 0.2, ...shares(0.4, 0.3, 0.2, 0.1) }, ['Quellia alta', ' Brantia ovata ']),
  plot('VM-003', 'ridge', { stems_ha: 6, fisher_alpha: 10, disturbance_index: 0.7, ...shares(0.6, 0.2, 0.1, 0.1) }, ['Morrowa lenta']),
  plot('VM-004', 'valley', { stems_ha: 10, fisher_alpha: 12, disturbance_index: 0.1, ...shares(0.1, 0.5, 0.3, 0.1) }, ['Quellia alta', 'Tessaria nivea']),
  plot('VM-005', 'valley', { stems_ha: 14, fisher_alpha: 15, disturbance_index: 0.65, ...shares(0.3, 0.3, 0.3, 0.1) }, ['Tessaria nivea', '']),
];
const AREAS = { ridge: 300, valley: 100 };
const base = (over: Partial<RegionSummaryInput> = {}): RegionSummaryInput => ({
  region: 'Varenmoor',
  plots: PLOTS,
  forestAreas: AREAS,
  variables: ['stems_ha', 'fisher_alpha'],
  ...over,
});

const rowOf = (s: RegionSummary, forestType: string, variable: string) => {
  const r = s.rows.find((x) => x.forest_type === forestType && x.variable === variable);
  if (r === undefined) throw new Error(`no row ${forestType}/${variable}`);
  return r;
};
const codes = (s: RegionSummary): string[] => s.notes.map((n) => n.code);

function assertPlainJson(value: unknown, path = '$'): void {
  if (value === null || typeof value === 'string' || typeof value === 'boolean') return;
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new Error(`${path} is ${value}`);
    return;
  }
  if (Array.isArray(value)) return value.forEach((v, i) => assertPlainJson(v, `${path}[${i}]`));
  if (typeof value === 'object' && Object.getPrototypeOf(value) === Object.prototype) {
    for (const [k, v] of Object.entries(value)) {
      if (v === undefined) throw new Error(`${path}.${k} is undefined`);
      assertPlainJson(v, `${path}.${k}`);
    }
    return;
  }
  throw new Error(`${path} is not plain JSON (${Object.prototype.toString.call(value)})`);
}

describe('summariseRegion rows', () => {
  it('REGION_COLUMNS is the `export regions` column list of docs/exports.md, and every row has exactly those keys in that order', () => {
    expect(REGION_COLUMNS).toEqual(['region', 'forest_type', 'variable', 'n_plots', 'mean', 'se', 'ci_low', 'ci_high', 'sampling_error_pct', 'forest_area_ha', 'total', 'caution_flag', 'whole_se', 'whole_ci_low', 'whole_ci_high', 'total_whole_ci_low', 'total_whole_ci_high']);
    const s = summariseRegion(base());
    for (const r of s.rows) expect(Object.keys(r)).toEqual([...REGION_COLUMNS]);
  });

  it('orders rows `all` first, then forest types sorted, variables in the order asked', () => {
    const s = summariseRegion(base({ plots: [...PLOTS].reverse(), variables: ['fisher_alpha', 'stems_ha'] }));
    expect(s.rows.map((r) => `${r.forest_type}/${r.variable}`)).toEqual([
      'all/fisher_alpha', 'all/stems_ha', 'ridge/fisher_alpha', 'ridge/stems_ha', 'valley/fisher_alpha', 'valley/stems_ha',
    ]);
  });

  it('gives the hand-computed stratified estimate with area weights: ȳ 6, SE 1, df 32/11, area 400, total 2400 (1e-12)', () => {
    const s = summariseRegion(base());
    expect(s.weighting).toBe('area');
    const all = rowOf(s, 'all', 'stems_ha');
    const t = tMultiplier(0.95, 32 / 11);
    expect(all.n_plots).toBe(5);
    expect(all.mean).toBeCloseTo(6, 12);
    expect(all.se).toBeCloseTo(1, 12);
    expect(all.ci_high).toBeCloseTo(6 + t, 12);
    expect(all.sampling_error_pct).toBeCloseTo((100 * t) / 6, 10);
    expect(all.forest_area_ha).toBe(400);
    expect(all.total).toBeCloseTo(2400, 9);
    expect(s.estimate_details[0]).toMatchObject({ variable: 'stems_ha', df_method: 'satterthwaite', strata_used: ['ridge', 'valley'] });
    expect(s.estimate_details[0].df).toBeCloseTo(32 / 11, 12);
    const total = s.totals.find((x) => x.forest_type === 'all' && x.variable === 'stems_ha');
    expect(total?.se).toBeCloseTo(400, 9);
    expect(total?.ci_low).toBeCloseTo(2400 - 400 * t, 8);
    const ridge = rowOf(s, 'ridge', 'stems_ha');
    expect(ridge).toMatchObject({ n_plots: 3, forest_area_ha: 300 });
    expect(ridge.mean).toBeCloseTo(4, 12);
    expect(ridge.se).toBeCloseTo(Math.sqrt(4 / 3), 12);
    expect(ridge.total).toBeCloseTo(1200, 9);
  });

  it('counts only plots with a value (fisher_alpha null on VM-002) and gives no total for a variable that is not per hectare', () => {
    const s = summariseRegion(base());
    const ridge = rowOf(s, 'ridge', 'fisher_alpha');
    expect(ridge.n_plots).toBe(2);
    expect(ridge.mean).toBe(9);
    expect(ridge.forest_area_ha).toBe(300);
    expect(ridge.total).toBeNull();
    expect(rowOf(s, 'all', 'fisher_alpha').total).toBeNull();
    expect(rowOf(s, 'all', 'fisher_alpha').n_plots).toBe(4);
    expect(s.totals.some((x) => x.variable === 'fisher_alpha')).toBe(false);
  });

  it('reproduces the constructed example of docs/methods.md#stratified-estimator through the summary, fpc from plotAreaHa: SE 2.53645191 (computed), 1e-6 relative', () => {
    const groups: [string, number, number[]][] = [
      ['s1', 400, [152, 170, 188, 141, 163, 177, 159, 166, 181, 149]],
      ['s2', 250, [98, 120, 87, 110, 105, 93, 116, 101]],
      ['s3', 350, [230, 251, 214, 262, 245, 228, 239, 256, 221, 248, 236, 242]],
    ];
    // Areas in ha with 0.5 ha plots: N_h = 2·area → areas of 200, 125, 175 ha give N_h = 400, 250, 350.
    const plots = groups.flatMap(([t, , ys]) => ys.map((y, i) => plot(`${t}-${i}`, t, { stems_ha: y })));
    const forestAreas = Object.fromEntries(groups.map(([t, n]) => [t, n / 2]));
    const s = summariseRegion({ region: 'Varenmoor', plots, forestAreas, variables: ['stems_ha'], options: { plotAreaHa: 0.5 } });
    const all = rowOf(s, 'all', 'stems_ha');
    expect(s.fpc_applied).toBe(true);
    expect(Math.abs(all.mean! - 175.544167) / 175.544167).toBeLessThan(1e-6);
    expect(Math.abs(all.se! - 2.53645191) / 2.53645191).toBeLessThan(1e-6);
    expect(Math.abs(s.estimate_details[0].df! - 22.6314)).toBeLessThan(5e-5);
    expect(codes(s)).toContain('fpc_applied');
  });

  it('passes the sampling-error convention through: 1.96 gives 100·1.96·SE/mean', () => {
    const s = summariseRegion(base({ options: { samplingErrorT: 1.96 } }));
    expect(rowOf(s, 'all', 'stems_ha').sampling_error_pct).toBeCloseTo((100 * 1.96) / 6, 10);
    expect(s.sampling_error_t).toBe(1.96);
  });
});

describe('summariseRegion weighting and notes', () => {
  it('without forest areas weights by plot counts, gives no region area or total, and says so (ȳ 7.2 by hand)', () => {
    const s = summariseRegion(base({ forestAreas: {} }));
    expect(s.weighting).toBe('plot_count');
    const all = rowOf(s, 'all', 'stems_ha');
    expect(all.mean).toBeCloseTo(7.2, 12);
    expect(all.se).toBeCloseTo(Math.sqrt(1.12), 12);
    expect(all.forest_area_ha).toBeNull();
    expect(all.total).toBeNull();
    expect(codes(s)).toContain('weights_plot_count');
  });

  it('falls back to plot counts for the whole region when a forest type lacks an area, naming it, and keeps the known type total', () => {
    const s = summariseRegion(base({ forestAreas: { ridge: 300 } }));
    expect(s.weighting).toBe('plot_count');
    const n = s.notes.find((x) => x.code === 'areas_incomplete');
    expect(n?.message).toContain("'valley'");
    expect(rowOf(s, 'all', 'stems_ha').total).toBeNull();
    expect(rowOf(s, 'ridge', 'stems_ha').total).toBeCloseTo(1200, 9);
    expect(rowOf(s, 'valley', 'stems_ha').forest_area_ha).toBeNull();
  });

  it('treats an area of 0 for a type with plots as unknown and notes it; notes area of types without plots', () => {
    const s = summariseRegion(base({ forestAreas: { ridge: 300, valley: 0, swamp: 50 } }));
    expect(s.weighting).toBe('plot_count');
    expect(codes(s)).toEqual(expect.arrayContaining(['areas_incomplete', 'area_zero_with_plots', 'unsampled_area']));
    expect(s.notes.find((x) => x.code === 'unsampled_area')?.forest_type).toBe('swamp');
  });

  it('gives a mean but no SE for the region when a forest type has a single plot with a value, and names it', () => {
    const plots = [...PLOTS, plot('VM-006', 'swamp', { stems_ha: 20, fisher_alpha: null, disturbance_index: null })];
    const s = summariseRegion(base({ plots, forestAreas: { ...AREAS, swamp: 100 } }));
    const all = rowOf(s, 'all', 'stems_ha');
    expect(all.mean).toBeCloseTo(0.6 * 4 + 0.2 * 12 + 0.2 * 20, 12);
    expect(all.se).toBeNull();
    expect(all.ci_low).toBeNull();
    expect(all.sampling_error_pct).toBeNull();
    const single = s.notes.find((x) => x.code === 'single_plot_stratum');
    expect(single).toMatchObject({ forest_type: 'swamp' });
    expect(single?.message).toContain('stems_ha');
    // swamp has no fisher_alpha: the region estimate covers ridge and valley only, over their 400 ha
    expect(s.notes.find((x) => x.code === 'stratum_without_values')?.variable).toBe('fisher_alpha');
    expect(rowOf(s, 'all', 'fisher_alpha').forest_area_ha).toBe(400);
    expect(rowOf(s, 'all', 'fisher_alpha').se).not.toBeNull();
  });

  it('states fpc, degrees of freedom, sampling-error multiplier and the usual caution', () => {
    expect(codes(summariseRegion(base()))).toEqual(expect.arrayContaining(['weights_area', 'fpc_not_applied', 'degrees_of_freedom', 'sampling_error_multiplier', 'caution']));
    expect(codes(summariseRegion(base({ forestAreas: {}, options: { plotAreaHa: 1 } })))).toContain('fpc_unavailable');
  });
});

describe('summariseRegion page sections', () => {
  it('gives guild composition per forest type and stratified, the shares summing to 1 (hand: pioneer 0.4, 0.2, region 0.35)', () => {
    const s = summariseRegion(base());
    const get = (t: string, g: string) => s.guild_composition.find((x) => x.forest_type === t && x.guild === g)?.mean_share;
    expect(get('ridge', 'pioneer')).toBeCloseTo(0.4, 12);
    expect(get('valley', 'pioneer')).toBeCloseTo(0.2, 12);
    expect(get('all', 'pioneer')).toBeCloseTo(0.35, 12);
    for (const t of ['all', 'ridge', 'valley']) {
      const sum = s.guild_composition.filter((x) => x.forest_type === t).reduce((a, x) => a + (x.mean_share ?? 0), 0);
      expect(sum).toBeCloseTo(1, 12);
    }
  });

  it('classes plots by disturbance_index with lower ≤ x < upper, and the region share is Σ W_h p_h (hand: high 0.375)', () => {
    const s = summariseRegion(base());
    const get = (t: string, c: string) => s.disturbance.rows.find((x) => x.forest_type === t && x.class === c);
    expect(get('ridge', 'very_low')?.n_plots).toBe(1); // 0.05
    expect(get('valley', 'low')?.n_plots).toBe(1); // 0.1 is on the bound: low
    expect(get('valley', 'high')?.n_plots).toBe(1); // 0.65
    expect(get('all', 'high')).toMatchObject({ n_plots: 2, lower: 0.6, upper: null });
    expect(get('all', 'high')?.share).toBeCloseTo(0.375, 12);
    expect(get('all', 'intermediate')?.share).toBe(0);
    expect(get('ridge', 'high')?.share).toBeCloseTo(1 / 3, 12);
    const allShares = s.disturbance.rows.filter((x) => x.forest_type === 'all').reduce((a, x) => a + (x.share ?? 0), 0);
    expect(allShares).toBeCloseTo(1, 12);
  });

  it('accepts configured disturbance classes and counts plots without an index', () => {
    const plots = [...PLOTS, plot('VM-006', 'valley', { stems_ha: 12, disturbance_index: null })];
    const s = summariseRegion(base({ plots, options: { disturbanceClasses: [{ name: 'calm', below: 0.5 }, { name: 'disturbed', below: null }] } }));
    expect(s.disturbance.rows.filter((x) => x.forest_type === 'all').map((x) => [x.class, x.n_plots])).toEqual([['calm', 3], ['disturbed', 2]]);
    expect(s.disturbance.plots_without_index).toEqual([{ forest_type: 'ridge', n_plots: 0 }, { forest_type: 'valley', n_plots: 1 }]);
    expect(() => summariseRegion(base({ options: { disturbanceClasses: [{ name: 'a', below: 0.5 }, { name: 'b', below: 0.2 }] } }))).toThrow(/disturbanceClasses/);
    expect(() => summariseRegion(base({ options: { disturbanceClasses: [{ name: 'a', below: 0.5 }] } }))).toThrow(/must be open/);
  });

  it('counts distinct species per forest type and region (names trimmed, empty ignored), null without names', () => {
    const s = summariseRegion(base());
    expect(s.species).toEqual([
      { forest_type: 'all', n_species: 4, n_plots_with_names: 5 },
      { forest_type: 'ridge', n_species: 3, n_plots_with_names: 3 },
      { forest_type: 'valley', n_species: 2, n_plots_with_names: 2 },
    ]);
    expect(summariseRegion(base({ plots: PLOTS.map(({ plotId, forestType, values }) => ({ plotId, forestType, values })) })).species).toBeNull();
    const partial = summariseRegion(base({ plots: [...PLOTS, plot('VM-006', 'valley', { stems_ha: 12 })] }));
    expect(codes(partial)).toContain('species_names_partial');
  });
});

describe('summariseRegion output and input', () => {
  it('is plain JSON (no Map, NaN, Infinity or undefined) even with single plots and all-null variables', () => {
    const plots = [...PLOTS, plot('VM-006', 'swamp', { stems_ha: 20, fisher_alpha: null })];
    // richness is null on one plot and absent elsewhere: a known column with no value anywhere
    const withNull = plots.map((p, i) => (i === 0 ? { ...p, values: { ...p.values, richness: null } } : p));
    const t = summariseRegion(base({ plots: withNull, forestAreas: { ridge: 300 }, variables: ['stems_ha', 'fisher_alpha', 'richness'] }));
    expect(() => assertPlainJson(t)).not.toThrow();
    expect(JSON.parse(JSON.stringify(t))).toEqual(t);
    expect(rowOf(t, 'all', 'richness')).toMatchObject({ n_plots: 0, mean: null, se: null });
    expect(codes(t)).toContain('no_values');
  });

  it('returns no rows and a note for a region without plots', () => {
    const s = summariseRegion(base({ plots: [] }));
    expect(s.rows).toEqual([]);
    expect(codes(s)).toContain('no_plots');
    expect(() => assertPlainJson(s)).not.toThrow();
  });

  it('does not mutate its input', () => {
    const input = base();
    const before = JSON.stringify(input);
    summariseRegion(Object.freeze(input));
    expect(JSON.stringify(input)).toBe(before);
  });

  it.each<[string, Partial<RegionSummaryInput>, RegExp]>([
    ['a duplicate plot', { plots: [...PLOTS, PLOTS[0]] }, /'VM-001' appears twice/],
    ['the reserved forest type all', { plots: [plot('X', 'all', { stems_ha: 1 })] }, /reserved/],
    ['a NaN value', { plots: [plot('X', 'ridge', { stems_ha: Number.NaN })] }, /'X' stems_ha is NaN/],
    ['a string value', { plots: [plot('X', 'ridge', { stems_ha: '3' as unknown as number })] }, /expected a finite number or null/],
    ['a negative area', { forestAreas: { ridge: -1 } }, /forest area of 'ridge'/],
    ['a misspelt variable', { variables: ['stem_ha'] }, /no plot has a value key for stem_ha/],
    ['a variable listed twice', { variables: ['stems_ha', 'stems_ha'] }, /listed twice/],
    ['an empty region name', { region: ' ' }, /region/],
    ['a bad plot area', { options: { plotAreaHa: 0 } }, /plotAreaHa/],
  ])('rejects %s with a clear error naming the function', (_, over, message) => {
    expect(() => summariseRegion(base(over))).toThrow(RegionSummaryInputError);
    expect(() => summariseRegion(base(over))).toThrow(message);
    expect(() => summariseRegion(base(over))).toThrow(/^summariseRegion: /);
  });

  it('rejects a bad option even for a region without plots', () => {
    expect(() => summariseRegion(base({ plots: [], options: { confidence: 1.5 } }))).toThrow(/confidence/);
    expect(() => summariseRegion(base({ options: { samplingErrorT: 2, confidence: 0.9 } }))).toThrow(/95 % convention/);
  });
});

describe('plots left out of the estimates', () => {
  it('notes per variable how many plots had no value, and why', () => {
    const plots = [
      plot('VM-101', 'ridge', { stems_ha: 2, n_identified: 0, richness: 0, fisher_alpha: null }),
      plot('VM-102', 'ridge', { stems_ha: 4, n_identified: 5, richness: 5, fisher_alpha: null }),
      plot('VM-103', 'ridge', { stems_ha: 6, n_identified: 9, richness: 3, fisher_alpha: 1.6 }),
      plot('VM-104', 'valley', { stems_ha: 8, n_identified: 0, richness: 0, fisher_alpha: null }),
    ];
    const s = summariseRegion({ region: 'Varenmoor', plots, variables: ['stems_ha', 'fisher_alpha', 'richness'] });
    const notes = s.notes.filter((n) => n.code === 'plots_left_out');
    expect(notes.map((n) => n.variable)).toEqual(['fisher_alpha']);
    expect(notes[0].message).toMatch(/^fisher_alpha: 3 of 4 plots left out of the estimates/);
    expect(notes[0].message).toContain('1 (fisher_alpha) with every identified species with a single stem');
    expect(notes[0].message).toContain('2 (fisher_alpha) with no live stem identified to species');
    expect(s.rows.find((r) => r.forest_type === 'all' && r.variable === 'fisher_alpha')?.n_plots).toBe(1);
  });
});

describe('caution flags of the rows', () => {
  it('flags every row of the hand case: 2–5 plots are fewer than 20; with a minimum of 2 only wide errors remain', () => {
    const s = summariseRegion(base());
    expect(s.caution).toEqual({ min_plots: 20, max_sampling_error_pct: 20 });
    for (const r of s.rows) expect(r.caution_flag, `${r.forest_type} ${r.variable}`).toMatch(/^few_plots/);
    const loose = summariseRegion(base({ options: { caution: { min_plots: 2, max_sampling_error_pct: 20 } } }));
    // ridge stems_ha 2 4 6: mean 4, SE 2/√3 = 1.1547, t(2) = 4.3027 → sampling error 124 % (by hand) → wide
    expect(loose.rows.find((r) => r.forest_type === 'ridge' && r.variable === 'stems_ha')?.caution_flag).toBe('wide_error');
  });
});
