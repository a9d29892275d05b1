import { describe, expect, it } from 'vitest';
import { EstimatorInputError } from './estimator-errors';
import {
  samplingErrorPercent,
  satterthwaiteDf,
  stratifiedEstimate,
  stratifiedMean,
  stratifiedVariance,
  stratumMoments,
  type StratumInput,
  type StratumValues,
} from './stratified';
import { tMultiplier } from './student-t';

const rel = (a: number | null, b: number): number => Math.abs((a as number) - b) / Math.abs(b);

// Constructed example of docs/methods.md#stratified-estimator (computed): sizes are
// numbers of sampling units, so fpcUnitSize = 1 gives f_h = n_h / N_h.
const CONSTRUCTED: readonly StratumValues[] = [
  { name: 's1', size: 400, values: [152, 170, 188, 141, 163, 177, 159, 166, 181, 149] },
  { name: 's2', size: 250, values: [98, 120, 87, 110, 105, 93, 116, 101] },
  { name: 's3', size: 350, values: [230, 251, 214, 262, 245, 228, 239, 256, 221, 248, 236, 242] },
];

describe('stratifiedEstimate on the constructed example of docs/methods.md (computed)', () => {
  it('gives ȳ_st = 175.544167 and SE 2.57401485 without fpc, 1e-6 relative', () => {
    const e = stratifiedEstimate(CONSTRUCTED);
    expect(e.weighting).toBe('area');
    expect(e.fpcApplied).toBe(false);
    expect(rel(e.mean, 175.544167)).toBeLessThan(1e-6);
    expect(rel(e.se, 2.57401485)).toBeLessThan(1e-6);
  });

  it('gives SE 2.53645191 and n_e = 22.6314 with fpc (Cochran eq. 5.16 with g_h = N_h(N_h − n_h)/n_h); n_e to the 4 decimals given (±5e-5)', () => {
    const e = stratifiedEstimate(CONSTRUCTED, { fpcUnitSize: 1 });
    expect(e.fpcApplied).toBe(true);
    expect(rel(e.mean, 175.544167)).toBeLessThan(1e-6);
    expect(rel(e.se, 2.53645191)).toBeLessThan(1e-6);
    expect(e.dfMethod).toBe('satterthwaite');
    expect(Math.abs((e.df as number) - 22.6314)).toBeLessThan(5e-5);
  });

  it('without fpc the Satterthwaite df is 22.704730 (computed: same formula, g_h = N_h²/n_h, separate script), 1e-6 relative', () => {
    expect(rel(stratifiedEstimate(CONSTRUCTED).df, 22.70473)).toBeLessThan(1e-6);
  });

  it('puts the interval at ȳ_st ± t(0.975, n_e)·SE and totals at N·ȳ_st with N·SE', () => {
    const e = stratifiedEstimate(CONSTRUCTED);
    const t = tMultiplier(0.95, e.df as number);
    expect(e.ciLow).toBeCloseTo(175.544167 - t * 2.57401485, 5);
    expect(e.ciHigh).toBeCloseTo(175.544167 + t * 2.57401485, 5);
    expect(e.size).toBe(1000);
    expect(rel(e.total, 175544.167)).toBeLessThan(1e-6);
    expect(rel(e.totalSe, 2574.01485)).toBeLessThan(1e-6);
    expect(e.totalCiHigh! - e.total!).toBeCloseTo(t * e.totalSe!, 6);
  });

  it('reports each stratum: s1 mean 164.6, s² 221.6, SE √(221.6/10), df 9 (computed by hand)', () => {
    const s1 = stratifiedEstimate(CONSTRUCTED).strata[0];
    expect(s1.n).toBe(10);
    expect(s1.mean).toBeCloseTo(164.6, 10);
    expect(s1.variance).toBeCloseTo(221.6, 10);
    expect(s1.se).toBeCloseTo(Math.sqrt(22.16), 10);
    expect(s1.df).toBe(9);
    expect(s1.weight).toBeCloseTo(0.4, 12);
    expect(s1.total).toBeCloseTo(400 * 164.6, 8);
    // t(0.975, 9) = 2.262 (printed t table, memory)
    expect(Math.abs(s1.ciHigh! - s1.mean! - 2.262 * Math.sqrt(22.16))).toBeLessThan(5e-4 * Math.sqrt(22.16));
  });
});

// Two strata, computed by hand:
//   A: area 300 ha, values 2 4 6   → ȳ_A = 4,  s²_A = (4 + 0 + 4)/2 = 4
//   B: area 100 ha, values 10 14   → ȳ_B = 12, s²_B = (4 + 4)/1 = 8
//   W = 0.75, 0.25; ȳ_st = 0.75·4 + 0.25·12 = 6
//   v = 0.75²·4/3 + 0.25²·8/2 = 0.75 + 0.25 = 1 → SE = 1
//   a_h = 0.75, 0.25; n_e = 1² / (0.75²/2 + 0.25²/1) = 1 / 0.34375 = 32/11
//   totals over 400 ha: 2400 ± t·400; sampling error % = 100·t·1/6
//   plot-count weights 3/5, 2/5: ȳ = 36/5 = 7.2 (the plain mean), v = 0.36·4/3 + 0.16·8/2 = 1.12
const HAND: readonly StratumValues[] = [
  { name: 'A', size: 300, values: [2, 4, 6] },
  { name: 'B', size: 100, values: [10, 14] },
];

describe('stratifiedEstimate on a two-stratum case computed by hand', () => {
  it('gives ȳ_st 6, SE 1, n_e 32/11, total 2400 ± t·400, sampling error 100·t/6 (1e-12)', () => {
    const e = stratifiedEstimate(HAND);
    expect(e.mean).toBeCloseTo(6, 12);
    expect(e.se).toBeCloseTo(1, 12);
    expect(e.df).toBeCloseTo(32 / 11, 12);
    const t = tMultiplier(0.95, 32 / 11);
    expect(e.tMultiplier).toBeCloseTo(t, 12);
    expect(e.ciLow).toBeCloseTo(6 - t, 12);
    expect(e.total).toBeCloseTo(2400, 9);
    expect(e.totalSe).toBeCloseTo(400, 9);
    expect(e.samplingErrorPct).toBeCloseTo((100 * t) / 6, 10);
  });

  it('weights by plot counts without sizes and says so: ȳ 7.2, v 1.12, no totals (computed by hand)', () => {
    const e = stratifiedEstimate(HAND.map(({ name, values }) => ({ name, values })));
    expect(e.weighting).toBe('plot_count');
    expect(e.mean).toBeCloseTo(7.2, 12);
    expect(e.variance).toBeCloseTo(1.12, 12);
    expect(e.size).toBeNull();
    expect(e.total).toBeNull();
  });

  it('with mixed sizes requires an explicit plot_count weighting and keeps the known stratum totals', () => {
    const mixed: StratumInput[] = [HAND[0], { name: 'B', values: [10, 14] }];
    expect(() => stratifiedEstimate(mixed)).toThrow(/1 of 2 strata have a size/);
    expect(() => stratifiedEstimate(mixed, { weighting: 'area' })).toThrow(EstimatorInputError);
    const e = stratifiedEstimate(mixed, { weighting: 'plot_count' });
    expect(e.mean).toBeCloseTo(7.2, 12);
    expect(e.strata[0].total).toBeCloseTo(1200, 9);
    expect(e.strata[1].total).toBeNull();
  });

  it('uses the fixed 1.96 or 2 multiplier for sampling error when asked, and the t for the interval still', () => {
    const e196 = stratifiedEstimate(HAND, { samplingErrorT: 1.96 });
    expect(e196.samplingErrorPct).toBeCloseTo((100 * 1.96) / 6, 12);
    expect(e196.ciHigh).toBeCloseTo(6 + tMultiplier(0.95, 32 / 11), 12);
    expect(stratifiedEstimate(HAND, { samplingErrorT: 2 }).samplingErrorPct).toBeCloseTo(100 / 3, 12);
    expect(() => stratifiedEstimate(HAND, { samplingErrorT: 2, confidence: 0.9 })).toThrow(/95 % convention/);
  });

  it('uses a fixed df when given one', () => {
    const e = stratifiedEstimate(HAND, { df: 3 });
    expect(e.dfMethod).toBe('fixed');
    // t(0.975, 3) = 3.182 (printed t table, memory), 5e-4
    expect(Math.abs(e.ciHigh! - 6 - 3.182)).toBeLessThan(5e-4);
  });
});

describe('stratifiedEstimate edge cases', () => {
  it('leaves out null values: n_h counts only the values present', () => {
    const e = stratifiedEstimate([
      { name: 'A', size: 300, values: [2, null, 4, 6, null] },
      { name: 'B', size: 100, values: [10, 14, null] },
    ]);
    expect(e.strata.map((s) => s.n)).toEqual([3, 2]);
    expect(e.n).toBe(5);
    expect(e.mean).toBeCloseTo(6, 12);
    expect(e.se).toBeCloseTo(1, 12);
  });

  it('gives a mean but no SE, CI or sampling error when a stratum has a single value, and names it', () => {
    const e = stratifiedEstimate([HAND[0], { name: 'B', size: 100, values: [12, null] }]);
    expect(e.mean).toBeCloseTo(6, 12);
    expect(e.total).toBeCloseTo(2400, 9);
    expect(e.se).toBeNull();
    expect(e.ciLow).toBeNull();
    expect(e.samplingErrorPct).toBeNull();
    expect(e.df).toBeNull();
    expect(e.singleValueStrata).toEqual(['B']);
    expect(e.strata[1].se).toBeNull();
    expect(e.strata[1].mean).toBe(12);
  });

  it('leaves out a stratum with no value, renormalises the weights and shrinks the size covered', () => {
    const e = stratifiedEstimate([HAND[0], { name: 'B', size: 100, values: [null, null] }]);
    expect(e.strataWithoutValues).toEqual(['B']);
    expect(e.strataUsed).toEqual(['A']);
    expect(e.strata[0].weight).toBe(1);
    expect(e.strata[1].weight).toBeNull();
    expect(e.size).toBe(300);
    expect(e.mean).toBeCloseTo(4, 12);
    // one stratum: Satterthwaite reduces to n − 1
    expect(e.df).toBeCloseTo(2, 12);
  });

  it('returns nulls, not NaN, when no stratum has a value', () => {
    const e = stratifiedEstimate([{ name: 'A', values: [null] }]);
    expect(e.n).toBe(0);
    expect(e.mean).toBeNull();
    expect(e.se).toBeNull();
    expect(JSON.stringify(e)).not.toMatch(/NaN|Infinity/);
  });

  it('uses n − H when every stratum variance is 0 (Satterthwaite is 0/0) and the interval has zero width', () => {
    const e = stratifiedEstimate([
      { name: 'A', values: [5, 5, 5] },
      { name: 'B', values: [5, 5] },
    ]);
    expect(e.se).toBe(0);
    expect(e.dfMethod).toBe('n_minus_strata');
    expect(e.df).toBe(3);
    expect(e.ciLow).toBe(5);
    expect(e.samplingErrorPct).toBe(0);
  });

  it('rejects bad input with the function named: no strata, duplicate names, bad sizes, non-finite values, more plots than units', () => {
    expect(() => stratifiedEstimate([])).toThrow(/^stratifiedEstimate: needs at least one stratum/);
    expect(() => stratifiedEstimate([HAND[0], HAND[0]])).toThrow(/given twice/);
    expect(() => stratifiedEstimate([{ name: 'A', size: 0, values: [1, 2] }])).toThrow(/size 0/);
    expect(() => stratifiedEstimate([{ name: 'A', values: [1, Number.NaN] }])).toThrow(/not a finite number or null/);
    expect(() => stratifiedEstimate(HAND, { fpcUnitSize: 200 })).toThrow(/room for only 1.5 units/);
    expect(() => stratifiedEstimate(HAND, { confidence: 95 })).toThrow(/confidence/);
  });
});

describe('strata given by their moments (n_h, ȳ_h, s_h²) instead of their values', () => {
  // The same strata as values and as stratumMoments of those values: every figure equal to the last bit,
  // with nulls, a single-value stratum, a stratum without values, area and plot-count weights and the fpc.
  const withNulls: StratumValues[] = [
    { name: 'a', size: 120, values: [3.1, null, 4.7, 2.2, null, 5.9] },
    { name: 'b', size: 80, values: [10.3, 11.9, null, 9.4] },
    { name: 'c', size: 40, values: [null, null] },
  ];
  const single: StratumValues[] = [...withNulls.slice(0, 2), { name: 'd', size: 15, values: [null, 7.7] }];
  const asMoments = (strata: readonly StratumValues[]): StratumInput[] => strata.map(({ name, size, values }) => ({ name, size, ...stratumMoments(values, name) }));

  it.each([
    ['area weights', withNulls, {}],
    ['plot-count weights', withNulls.map(({ name, values }) => ({ name, values })), {}],
    ['a single-value stratum', single, {}],
    ['the fpc', withNulls, { fpcUnitSize: 0.5 }],
    ['the constructed example', CONSTRUCTED, { fpcUnitSize: 1 }],
  ] as const)('gives the same estimate with %s', (_, strata, options) => {
    expect(stratifiedEstimate(asMoments(strata), options)).toStrictEqual(stratifiedEstimate(strata, options));
  });

  it('stratumMoments: n of the values present, their mean, their sample variance (null below 1 and 2 values)', () => {
    expect(stratumMoments([2, null, 4, 6])).toEqual({ n: 3, mean: 4, variance: 4 });
    expect(stratumMoments([null, 5])).toEqual({ n: 1, mean: 5, variance: null });
    expect(stratumMoments([null])).toEqual({ n: 0, mean: null, variance: null });
  });

  it('rejects moments stratumMoments could not give', () => {
    for (const bad of [
      { n: 1.5, mean: 1, variance: null },
      { n: -1, mean: null, variance: null },
      { n: 0, mean: 1, variance: null },
      { n: 2, mean: null, variance: 1 },
      { n: 1, mean: 1, variance: 0 },
      { n: 3, mean: 1, variance: -0.5 },
      { n: 3, mean: Number.NaN, variance: 1 },
    ]) {
      expect(() => stratifiedEstimate([{ name: 'x', ...bad }]), JSON.stringify(bad)).toThrow(EstimatorInputError);
    }
  });
});

describe('the one-statistic functions', () => {
  it('stratifiedMean, stratifiedVariance and satterthwaiteDf reproduce the hand case', () => {
    expect(stratifiedMean([0.75, 0.25], [4, 12])).toBe(6);
    expect(stratifiedVariance([0.75, 0.25], [4, 8], [3, 2], [0, 0])).toBeCloseTo(1, 14);
    expect(satterthwaiteDf([0.75, 0.25], [4, 8], [3, 2], [0, 0])).toBeCloseTo(32 / 11, 12);
  });

  it('reject weights that do not sum to 1, length mismatches, and n < 2 for a variance', () => {
    expect(() => stratifiedMean([0.5, 0.4], [1, 2])).toThrow(/^stratifiedMean: weights sum to 0.9/);
    expect(() => stratifiedMean([1], [1, 2])).toThrow(/differ in length/);
    expect(() => stratifiedVariance([1], [4], [1], [0])).toThrow(/^stratifiedVariance: stratum 0 has n = 1/);
    expect(() => satterthwaiteDf([1], [0], [3], [0])).toThrow(/^satterthwaiteDf: every stratum variance term is 0/);
  });

  it('samplingErrorPercent is 100·m·SE/|ȳ| and null for a zero mean (computed by hand)', () => {
    expect(samplingErrorPercent(2, 3, 60)).toBe(10);
    expect(samplingErrorPercent(2, 3, -60)).toBe(10);
    expect(samplingErrorPercent(2, 3, 0)).toBeNull();
  });
});
