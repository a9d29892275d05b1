import { describe, expect, it } from 'vitest';
import { computePlotMetrics, type PlotVisitInput, type StemInput } from './plot-metrics';
import { SpeciesIndex } from './species-names';

// The same invented stand (Tavolira demo scenario) measured two ways: per hectare 10 stems of 12 cm,
// 4 of 25 cm, 2 of 55 cm and 10 of 7 cm, all of one species of wood density 0.6, no heights.
// Plot A: 1 ha, every stem from 10 cm, no subplot. Plot B: 0.5 ha from 20 cm (w = 2) with a 0.1 ha
// subplot from 5 cm (w = 10) that holds the stems under 20 cm.
const index = new SpeciesIndex([{ name: 'Ostra lenta', family: 'Orvaceae', guild: 'shade_tolerant', woodDensity: 0.6, synonyms: [] }]);
const stem = (dbhCm: number, inSubplot = false): StemInput => ({ species: 'Ostra lenta', dbhCm, heightM: null, status: 'live', stumpCause: null, fireDamage: 0, inSubplot });
const times = (n: number, s: StemInput): StemInput[] => Array.from({ length: n }, () => s);
const visit = (v: Partial<PlotVisitInput>): PlotVisitInput => ({ areaHa: 1, dbhMinCm: 10, subplotAreaHa: 0, subplotDbhMinCm: 5, loggingClass: 0, fireClass: 0, climate: 'moist', ...v });

const PLOT_A = { visit: visit({}), stems: [...times(10, stem(12)), ...times(4, stem(25)), ...times(2, stem(55))] };
const PLOT_B = {
  visit: visit({ areaHa: 0.5, dbhMinCm: 20, subplotAreaHa: 0.1, subplotDbhMinCm: 5 }),
  stems: [stem(12, true), stem(7, true), ...times(2, stem(25)), stem(55)],
};

// Independent computation, written out here: g = π (D/200)² m²; Chave et al. 2005 moist forest model
// without height, AGB = ρ exp(−1.499 + 2.148 ln D + 0.207 (ln D)² − 0.0281 (ln D)³) kg; carbon 0.47 × AGB
// (IPCC 2006 Vol. 4 Table 4.3).
const g = (d: number): number => Math.PI * (d / 200) ** 2;
const agb = (d: number): number => {
  const l = Math.log(d);
  return 0.6 * Math.exp(-1.499 + 2.148 * l + 0.207 * l * l - 0.0281 * l ** 3);
};
const PER_HA: ReadonlyArray<[number, number]> = [[12, 10], [25, 4], [55, 2]]; // [D, stems/ha] from 10 cm up
const EXPECTED = {
  stems: 16,
  ba: PER_HA.reduce((a, [d, n]) => a + n * g(d), 0),
  agb: PER_HA.reduce((a, [d, n]) => a + n * agb(d), 0) / 1000,
};

describe('figures at the reporting threshold (docs/methods.md#reporting-threshold)', () => {
  const a = computePlotMetrics(PLOT_A.visit, PLOT_A.stems, index).metrics;
  const b = computePlotMetrics(PLOT_B.visit, PLOT_B.stems, index).metrics;

  it('a plot without subplot and one with give the same ≥ 10 cm figures, equal to the independent computation', () => {
    for (const m of [a, b]) {
      expect(m.reportingDbhMinCm).toBe(10);
      expect(m.reportingStemsHa).toBeCloseTo(EXPECTED.stems, 10);
      expect(m.reportingBasalAreaM2Ha).toBeCloseTo(EXPECTED.ba, 12);
      expect(m.reportingAgbMgHa).toBeCloseTo(EXPECTED.agb, 10);
      expect(m.reportingCarbonMgHa).toBeCloseTo(0.47 * EXPECTED.agb, 10);
    }
  });

  it('keeps the all-stems columns as they were: the subplot plot counts its 7 cm stems there', () => {
    expect(a.stemsHa).toBeCloseTo(16, 10);
    expect(b.stemsHa).toBeCloseTo(26, 10); // + 10/ha of 7 cm from the subplot
    expect(b.basalAreaM2Ha).toBeCloseTo(EXPECTED.ba + 10 * g(7), 12);
  });

  it('gives no figure for a plot that did not measure down to the threshold', () => {
    const c = computePlotMetrics(visit({ dbhMinCm: 20 }), [...times(4, stem(25)), ...times(2, stem(55))], index).metrics;
    expect(c.reportingStemsHa).toBeNull();
    expect(c.reportingAgbMgHa).toBeNull();
    expect(c.reportingCarbonMgHa).toBeNull();
    expect(c.stemsHa).toBe(6);
  });

  it('follows a set threshold: at 20 cm both plots give 4 + 2 stems/ha', () => {
    for (const p of [PLOT_A, PLOT_B]) {
      const m = computePlotMetrics(p.visit, p.stems, index, { reportingDbhMinCm: 20 }).metrics;
      expect(m.reportingDbhMinCm).toBe(20);
      expect(m.reportingStemsHa).toBeCloseTo(6, 10);
      expect(m.reportingAgbMgHa).toBeCloseTo((4 * agb(25) + 2 * agb(55)) / 1000, 10);
    }
  });

  it('stores the same stand table for both plots: classes 10–20, 20–30, 50–60 (hand computation)', () => {
    const ta = computePlotMetrics(PLOT_A.visit, PLOT_A.stems, index).diagnostics.standTable;
    const tb = computePlotMetrics(PLOT_B.visit, PLOT_B.stems, index).diagnostics.standTable;
    expect(ta.thresholdCm).toBe(10);
    for (const t of [ta, tb]) {
      expect(t.classes.map((c) => c?.[0])).toEqual([10, 4, 0, 0, 2, 0, 0, 0, 0, 0].map((n) => expect.closeTo(n, 10)));
      expect(t.classes[0]?.[1]).toBeCloseTo(10 * g(12), 12);
      expect(t.classes[4]?.[2]).toBeCloseTo((2 * agb(55)) / 1000, 10);
    }
  });
});

describe('logged stumps enter the removed basal area at their DBH (docs/methods.md#stump-diameter-to-dbh)', () => {
  // Main plot: live 30 and 20 cm, a logged stump of 50 cm cut surface → DBH 0.8 · 50 = 40 cm (default).
  // f = 40² / (30² + 20² + 40²) = 1600 / 2900 (computed by hand); read as DBH it would be 2500 / 3800.
  const stems: StemInput[] = [stem(30), stem(20), { ...stem(50), status: 'stump', stumpCause: 'logged' }];

  it('converts the cut-surface diameter with the default relation', () => {
    const m = computePlotMetrics(visit({}), stems, index).metrics;
    expect(m.loggingRemovedBaFrac).toBeCloseTo(1600 / 2900, 12);
    expect(m.loggingScore).toBeCloseTo(0.5 * Math.min(1, 1600 / 2900 / 0.5), 12); // class 0
  });

  it('converts with a set relation: D = 5 + 0.7 · 50 = 40 cm as well, and slope 1 keeps the stump diameter', () => {
    expect(computePlotMetrics(visit({}), stems, index, { stumpToDbh: { interceptCm: 5, slope: 0.7 } }).metrics.loggingRemovedBaFrac).toBeCloseTo(1600 / 2900, 12);
    expect(computePlotMetrics(visit({}), stems, index, { stumpToDbh: { interceptCm: 0, slope: 1 } }).metrics.loggingRemovedBaFrac).toBeCloseTo(2500 / 3800, 12);
  });
});
