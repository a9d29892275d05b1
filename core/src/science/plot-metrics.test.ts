import { PLOT_METRICS } from '@stemwise/db/catalogue';
import { describe, expect, it } from 'vitest';
import { agbChave2005, agbChave2014 } from './allometry';
import { fisherAlphaFromTotals, rarefiedRichness } from './diversity';
import { fitHeightDiameter, predictHeight } from './height-diameter';
import {
  computePlotMetrics,
  type PlotVisitInput,
  type StemInput,
} from './plot-metrics';
import { SpeciesIndex, type SpeciesReference } from './species-names';

// Invented reference list and plots (demo scenario of our own).
const ROWS: SpeciesReference[] = [
  { name: 'Veltria magna', family: 'Orvaceae', guild: 'pioneer', woodDensity: 0.4, synonyms: ['Veltria grandis'] },
  { name: 'Ostra lenta', family: 'Orvaceae', guild: 'shade_tolerant', woodDensity: 0.8, synonyms: [] },
  { name: 'Quenna alta', family: 'Dravaceae', guild: 'light_demander', woodDensity: null, synonyms: [] },
  { name: 'Pellamo rubra', family: 'Dravaceae', guild: 'shade_tolerant', woodDensity: 0.6, synonyms: [] },
];
const index = new SpeciesIndex(ROWS);

const VISIT: PlotVisitInput = {
  areaHa: 0.5, // w = 2
  dbhMinCm: 10,
  subplotAreaHa: 0.1, // w = 10
  subplotDbhMinCm: 5,
  loggingClass: 1,
  fireClass: 0,
  climate: 'moist',
};

function stem(species: string | null, dbhCm: number, extra: Partial<StemInput> = {}): StemInput {
  return { species, dbhCm, heightM: null, status: 'live', stumpCause: null, fireDamage: 0, inSubplot: false, ...extra };
}

const STEMS: StemInput[] = [
  stem('Veltria magna', 20, { heightM: 15 }), // 1
  stem('Veltria grandis', 30, { fireDamage: 2 }), // 2 synonym of Veltria magna
  stem('Ostra lenta', 40, { heightM: 25 }), // 3
  stem('Quenna alta', 10), // 4 no ρ for species or genus → Dravaceae mean 0.6
  stem('unknown', 20, { fireDamage: 1 }), // 5 unidentified → plot mean ρ
  stem('Pellamo rubra', 8, { inSubplot: true }), // 6
  stem('Xenoa spinosa', 6, { inSubplot: true }), // 7 unresolved → plot mean ρ
  stem('Veltria magna', 25, { status: 'dead' }), // 8 dead: ignored
  stem(null, 30, { status: 'stump', stumpCause: 'logged' }), // 9 logged stump, main plot (cut surface 30 cm: DBH 24 cm)
  stem(null, 50, { status: 'stump', stumpCause: 'natural' }), // 10 natural stump: ignored
  stem(null, 7, { status: 'stump', stumpCause: 'logged', inSubplot: true }), // 11 subplot stump: ignored
  stem('Ostra lenta', 8), // 12 live main-plot stem below dbh_min 10: left out
];

const rel = (got: number | null, want: number): number => Math.abs((got as number) - want) / Math.abs(want);

describe('computePlotMetrics on a small plot (every expected value computed by hand)', () => {
  const { metrics: m, diagnostics: d } = computePlotMetrics(VISIT, STEMS, index);
  // Basal areas in units of π/40000 m² (g = π D²/40000): main live D² = 400 + 900 + 1600 + 100 + 400 = 3400,
  // subplot D² = 64 + 36 = 100; expanded: 2·3400 + 10·100 = 7800.
  const U = Math.PI / 40000;
  // Plot wood density = Σ g w ρ / Σ g w over stems with a reference value (1, 2, 3, 4, 6):
  // (800·0.4 + 1800·0.4 + 3200·0.8 + 200·0.6 + 640·0.6)/(800 + 1800 + 3200 + 200 + 640) = 4104/6640.
  const rhoPlot = 4104 / 6640;

  it('stems/ha = 5·2 + 2·10 = 30', () => expect(m.stemsHa).toBe(30));
  it('basal area = 7800 π/40000 = 0.195π m²/ha (rel 1e-14)', () => expect(rel(m.basalAreaM2Ha, 7800 * U)).toBeLessThan(1e-14));
  it('QMD = sqrt((2·3400 + 10·100)/30) = sqrt(260) cm (rel 1e-14)', () => expect(rel(m.qmdCm, Math.sqrt(260))).toBeLessThan(1e-14));

  it('AGB = Σ w·AGB/1000 with measured H (Chave 2014 eq. 4) else Chave 2005 moist (rel 1e-13)', () => {
    const main =
      agbChave2014(0.4, 20, 15) +
      agbChave2005(0.4, 30, 'moist') +
      agbChave2014(0.8, 40, 25) +
      agbChave2005(0.6, 10, 'moist') +
      agbChave2005(rhoPlot, 20, 'moist');
    const sub = agbChave2005(0.6, 8, 'moist') + agbChave2005(rhoPlot, 6, 'moist');
    const want = (2 * main + 10 * sub) / 1000;
    expect(rel(m.agbMgHa, want)).toBeLessThan(1e-13);
    expect(rel(m.carbonMgHa, 0.47 * want)).toBeLessThan(1e-13);
  });

  it('with stemAgb, gives the biomass of every live stem (below the minimum too, stem 12: Ostra lenta ρ 0.8) and the same figures', () => {
    const withStems = computePlotMetrics(VISIT, STEMS, index, { stemAgb: true });
    expect(withStems.metrics).toEqual(m);
    expect(withStems.stemAgbKg).toEqual([
      agbChave2014(0.4, 20, 15),
      agbChave2005(0.4, 30, 'moist'),
      agbChave2014(0.8, 40, 25),
      agbChave2005(0.6, 10, 'moist'),
      agbChave2005(rhoPlot, 20, 'moist'),
      agbChave2005(0.6, 8, 'moist'),
      agbChave2005(rhoPlot, 6, 'moist'),
      null,
      null,
      null,
      null,
      agbChave2005(0.8, 8, 'moist'),
    ].map((x) => (x === null ? null : expect.closeTo(x, 9))));
    expect(computePlotMetrics(VISIT, STEMS, index).stemAgbKg).toBeUndefined();
  });

  it('carbon pools: BGB = 0.20 · AGB (moist → IPCC 2006 Table 4.4 tropical moist deciduous, AGB < 125 Mg/ha, memory); dead stem 8 kept apart', () => {
    expect(m.agbMgHa).toBeLessThan(125);
    expect(m.rootShootRatio).toBe(0.2);
    expect(rel(m.bgbMgHa, 0.2 * m.agbMgHa)).toBeLessThan(1e-15);
    expect(rel(m.bgbCarbonMgHa, 0.47 * 0.2 * m.agbMgHa)).toBeLessThan(1e-14);
    // Stem 8: Veltria magna ρ 0.4, 25 cm, no height, main plot (w = 2): 0.7 · AGB_2005,moist · 2 / 1000.
    const dead = (0.7 * agbChave2005(0.4, 25, 'moist') * 2) / 1000;
    expect(rel(m.standingDeadMgHa, dead)).toBeLessThan(1e-13);
    expect(rel(m.standingDeadCarbonMgHa, 0.47 * dead)).toBeLessThan(1e-13);
    expect(rel(m.treeCarbonMgHa, 0.47 * (1.2 * m.agbMgHa + dead))).toBeLessThan(1e-13);
  });

  it("the carbon uncertainty's sums: the plot's AGB, its ratio and row (sd (0.25 − 0.09)/√12), the dead stem's sums (w = 2, no height)", () => {
    const sums = computePlotMetrics(VISIT, STEMS, index, { carbonMoments: true }).carbonMoments;
    expect(rel(sums?.value as number, m.agbMgHa)).toBeLessThan(1e-13);
    expect(sums?.rootShoot?.row).toBe('tropical_moist_deciduous:0');
    expect(sums?.rootShoot?.ratio).toBe(0.2);
    expect(rel(sums?.rootShoot?.sd as number, 0.16 / Math.sqrt(12))).toBeLessThan(1e-12);
    const deadMg = (0.7 * agbChave2005(0.4, 25, 'moist')) / 1000;
    expect(rel(sums?.deadWood?.value as number, 2 * deadMg)).toBeLessThan(1e-13);
    expect(rel(sums?.deadWood?.sq[2] as number, 2 * deadMg * deadMg)).toBeLessThan(1e-12);
    expect(sums?.deadWood?.sq.slice(0, 2)).toEqual([0, 0]);
    // the tree pool of the plot: CF·((1 + R)·AGB + dead) is its tree carbon
    expect(rel(0.47 * ((1 + 0.2) * (sums?.value as number) + (sums?.deadWood?.value as number)), m.treeCarbonMgHa)).toBeLessThan(1e-13);
  });

  it('diversity on main-plot identified stems: counts 2 (incl. the synonym), 1, 1; N = 4', () => {
    expect(m.nIdentified).toBe(4);
    expect(m.richness).toBe(3);
    // H' = ln 4 − 2 ln 2 / 4 = 1.5 ln 2
    expect(rel(m.shannon, 1.5 * Math.LN2)).toBeLessThan(1e-14);
    // Σp² = (4 + 1 + 1)/16 = 0.375
    expect(rel(m.simpson, 0.625)).toBeLessThan(1e-14);
    expect(rel(m.invSimpson, 16 / 6)).toBeLessThan(1e-14);
    expect(rel(m.pielou, (1.5 * Math.LN2) / Math.log(3))).toBeLessThan(1e-14);
    expect(rel(m.fisherAlpha, fisherAlphaFromTotals(3, 4) as number)).toBeLessThan(1e-14);
    expect(m.rarefied50).toBeNull(); // N = 4 < 50
    // f1 = 2, f2 = 1: 3 + 2·1/(2·2) = 3.5
    expect(m.chao1).toBe(3.5);
  });

  it('guild shares of live basal area: pioneer 2600, light 200, shade 3840, unassigned 1160 (of 7800)', () => {
    expect(rel(m.pioneerBaShare, 2600 / 7800)).toBeLessThan(1e-14);
    expect(rel(m.lightDemanderBaShare, 200 / 7800)).toBeLessThan(1e-14);
    expect(rel(m.shadeTolerantBaShare, 3840 / 7800)).toBeLessThan(1e-14);
    expect(rel(m.unassignedBaShare, 1160 / 7800)).toBeLessThan(1e-14);
    const sum = (m.pioneerBaShare ?? 0) + (m.lightDemanderBaShare ?? 0) + (m.shadeTolerantBaShare ?? 0) + (m.unassignedBaShare ?? 0);
    expect(Math.abs(sum - 1)).toBeLessThan(1e-15);
  });

  it('disturbance: stump 30 cm → DBH 0.8 · 30 = 24 cm, f = 576/(3400 + 576); L = (f/0.5 + 1/3)/2; F = ((4400/7800)/3 + 0)/2; I = 1 − (1 − L)(1 − F)', () => {
    const f = 576 / 3976; // the logged stump at its DBH (docs/methods.md#stump-diameter-to-dbh)
    const l = (f / 0.5 + 1 / 3) / 2;
    const fs = (4400 / 7800 / 3) / 2; // fire damage: stem 2 (1800·2) and stem 5 (800·1)
    expect(rel(m.loggingRemovedBaFrac, f)).toBeLessThan(1e-14);
    expect(rel(m.loggingScore, l)).toBeLessThan(1e-14);
    expect(rel(m.fireScore, fs)).toBeLessThan(1e-14);
    expect(rel(m.disturbanceIndex, 1 - (1 - l) * (1 - fs))).toBeLessThan(1e-14);
  });

  it('diagnostics: wood-density levels by basal area, height sources, unresolved names, stems below minimum', () => {
    expect(d.woodDensityBaShare).not.toBeNull();
    const w = d.woodDensityBaShare as Record<string, number>;
    expect(rel(w.species, 6440 / 7800)).toBeLessThan(1e-14);
    expect(rel(w.family, 200 / 7800)).toBeLessThan(1e-14);
    expect(rel(w.plot, 1160 / 7800)).toBeLessThan(1e-14);
    expect(w.genus).toBe(0);
    expect(w.default).toBe(0);
    expect(d.heightSourceShare).toEqual({ measured: 2 / 7, modelled: 0, noHeightModel: 5 / 7 });
    expect(d.unresolvedNames).toEqual([{ name: 'Xenoa spinosa', level: 'unresolved', stems: 1 }]);
    expect(d.liveStemsBelowDbhMin).toBe(1);
    expect(d.modelledOutsideFitRange).toBe(0);
  });
});

describe('computePlotMetrics with a local height–diameter model', () => {
  // model fitted on 30 heights from ln H = 0.893 + 0.760 ln D − 0.0340 (ln D)² for D = 15 … 44 cm
  const dd = Array.from({ length: 30 }, (_, i) => 15 + i);
  const model = fitHeightDiameter(dd, dd.map((x) => Math.exp(0.893 + 0.76 * Math.log(x) - 0.034 * Math.log(x) ** 2)));
  const { metrics: m, diagnostics: d } = computePlotMetrics(VISIT, STEMS, index, { heightModel: model });

  it('gives unmeasured stems the model height and keeps measured heights (rel 1e-13)', () => {
    const rhoPlot = 4104 / 6640;
    const h = (x: number): number => predictHeight(model, x);
    const main =
      agbChave2014(0.4, 20, 15) +
      agbChave2014(0.4, 30, h(30)) +
      agbChave2014(0.8, 40, 25) +
      agbChave2014(0.6, 10, h(10)) +
      agbChave2014(rhoPlot, 20, h(20));
    const sub = agbChave2014(0.6, 8, h(8)) + agbChave2014(rhoPlot, 6, h(6));
    expect(rel(m.agbMgHa, (2 * main + 10 * sub) / 1000)).toBeLessThan(1e-13);
  });
  it('splits the AGB by height source and wood-density level (agb_*_share columns; hand-computed, rel 1e-13)', () => {
    const rhoPlot = 4104 / 6640;
    const h = (x: number): number => predictHeight(model, x);
    const measured = 2 * (agbChave2014(0.4, 20, 15) + agbChave2014(0.8, 40, 25));
    const plotLevel = 2 * agbChave2014(rhoPlot, 20, h(20)) + 10 * agbChave2014(rhoPlot, 6, h(6));
    const total = m.agbMgHa * 1000;
    expect(rel(m.agbHeightMeasuredShare as number, measured / total)).toBeLessThan(1e-13);
    expect(rel(m.agbHeightModelledShare as number, 1 - measured / total)).toBeLessThan(1e-13);
    expect(m.agbNoHeightShare).toBe(0);
    expect(rel(m.agbWdPlotShare as number, plotLevel / total)).toBeLessThan(1e-13);
    const wd = [m.agbWdSpeciesShare, m.agbWdGenusShare, m.agbWdFamilyShare, m.agbWdPlotShare, m.agbWdDefaultShare] as number[];
    expect(Math.abs(wd.reduce((a, b) => a + b, 0) - 1)).toBeLessThan(1e-14);
    expect(m.agbWdDefaultShare).toBe(0);
  });
  it('reports modelled stems and those outside the fitted dbh range (10, 8 and 6 cm < 15 cm)', () => {
    expect(d.heightSourceShare).toEqual({ measured: 2 / 7, modelled: 5 / 7, noHeightModel: 0 });
    expect(d.modelledOutsideFitRange).toBe(3);
  });
});

describe('computePlotMetrics: standing dead wood on hand-computed stems (docs/methods.md#standing-dead-wood)', () => {
  // Main plot 0.5 ha (w = 2), subplot 0.1 ha (w = 10), moist. One live stem gives the plot's wood density
  // (Ostra lenta ρ 0.8); the dead stems: (a) Ostra lenta 30 cm with a measured 20 m → Chave 2014 eq. 4;
  // (b) unidentified 20 cm → the plot's live mean ρ 0.8, Chave 2005 moist; (c) Pellamo rubra ρ 0.6, 7 cm on
  // the subplot (w = 10); (d) Pellamo rubra 9 cm on the main plot, below dbh_min 10 → left out.
  const stems: StemInput[] = [
    stem('Ostra lenta', 40),
    stem('Ostra lenta', 30, { status: 'dead', heightM: 20 }),
    stem(null, 20, { status: 'dead' }),
    stem('Pellamo rubra', 7, { status: 'dead', inSubplot: true }),
    stem('Pellamo rubra', 9, { status: 'dead' }),
  ];
  const perStemKg = (share: number): number =>
    share * (2 * agbChave2014(0.8, 30, 20) + 2 * agbChave2005(0.8, 20, 'moist') + 10 * agbChave2005(0.6, 7, 'moist'));

  it('Σ w · s · AGB_allometry / 1000 with the default share 0.7 (rel 1e-13); live figures unchanged by dead stems', () => {
    const { metrics: m } = computePlotMetrics(VISIT, stems, index);
    expect(rel(m.standingDeadMgHa, perStemKg(0.7) / 1000)).toBeLessThan(1e-13);
    expect(rel(m.agbMgHa, (2 * agbChave2005(0.8, 40, 'moist')) / 1000)).toBeLessThan(1e-13);
    expect(m.stemsHa).toBe(2);
    const liveOnly = computePlotMetrics(VISIT, [stems[0]], index).metrics;
    expect(liveOnly.standingDeadMgHa).toBe(0);
    expect({ ...m, standingDeadMgHa: 0, standingDeadCarbonMgHa: 0, treeCarbonMgHa: 0 }).toEqual({ ...liveOnly, treeCarbonMgHa: 0 });
  });
  it('with another share (0.4) and a configured relation (Mokany et al. 2006)', () => {
    const { metrics: m } = computePlotMetrics(VISIT, stems, index, { standingDeadShare: 0.4, rootShoot: 'mokany_2006' });
    expect(rel(m.standingDeadMgHa, perStemKg(0.4) / 1000)).toBeLessThan(1e-13);
    expect(rel(m.bgbMgHa, 0.489 * Math.pow(m.agbMgHa, 0.89))).toBeLessThan(1e-13);
  });
  it('a plot without live stems: no root-to-shoot ratio under the equation, BGB 0, dead wood still counted', () => {
    const { metrics: m } = computePlotMetrics(VISIT, stems.slice(1), index, { rootShoot: 'mokany_2006' });
    expect(m.rootShootRatio).toBeNull();
    expect(m.bgbMgHa).toBe(0);
    expect(m.standingDeadMgHa).toBeGreaterThan(0);
  });
});

describe('computePlotMetrics edge cases', () => {
  it('a plot of stumps only: zero structure, biomass and richness, null QMD, diversity indices and shares; removed fraction 1', () => {
    const { metrics: m, diagnostics: d } = computePlotMetrics({ ...VISIT, loggingClass: 3, fireClass: 2 }, [
      stem(null, 40, { status: 'stump', stumpCause: 'logged' }),
      stem(null, 30, { status: 'stump', stumpCause: 'unknown' }),
    ], index);
    expect(m.stemsHa).toBe(0);
    expect(m.basalAreaM2Ha).toBe(0);
    expect(m.qmdCm).toBeNull();
    expect(m.agbMgHa).toBe(0);
    expect(m.carbonMgHa).toBe(0);
    expect(m.nIdentified).toBe(0);
    expect(m.richness).toBe(0); // a count: no species among no stems
    for (const key of ['shannon', 'simpson', 'invSimpson', 'pielou', 'fisherAlpha', 'rarefied50', 'chao1',
      'pioneerBaShare', 'lightDemanderBaShare', 'shadeTolerantBaShare', 'unassignedBaShare', 'agbHeightMeasuredShare', 'agbWdSpeciesShare'] as const) {
      expect(m[key], key).toBeNull();
    }
    expect(m.loggingRemovedBaFrac).toBe(1);
    expect(m.loggingScore).toBe(1); // (min(1, 1/0.5) + 3/3)/2
    expect(rel(m.fireScore, (0 + 2 / 3) / 2)).toBeLessThan(1e-15); // no live stems → damage term 0
    expect(m.disturbanceIndex).toBe(1);
    expect(d.woodDensityBaShare).toBeNull();
    expect(d.heightSourceShare).toBeNull();
  });

  it('a plot with no stems at all: removed fraction null, logging score from the class alone', () => {
    const { metrics: m } = computePlotMetrics({ ...VISIT, loggingClass: 2 }, [], index);
    expect(m.stemsHa).toBe(0);
    expect(m.loggingRemovedBaFrac).toBeNull();
    expect(rel(m.loggingScore, (0 + 2 / 3) / 2)).toBeLessThan(1e-15);
    expect(m.fireScore).toBe(0);
  });

  it('no identified stems: structure counted, richness 0, diversity indices null, everything unassigned, ρ from the default', () => {
    const { metrics: m, diagnostics: d } = computePlotMetrics(VISIT, [stem('indet', 20), stem('Veltria sp.', 30), stem('Xenoa spinosa', 25)], index);
    expect(m.stemsHa).toBe(6);
    expect(m.nIdentified).toBe(0);
    expect(m.richness).toBe(0);
    expect(m.chao1).toBeNull();
    expect(m.unassignedBaShare).toBe(1);
    expect(m.pioneerBaShare).toBe(0);
    // Veltria sp. takes the genus mean 0.4; the two others the plot mean of it, 0.4 (plot level)
    expect(d.woodDensityBaShare?.genus).toBeCloseTo(900 / 1925, 14);
    expect(d.woodDensityBaShare?.plot).toBeCloseTo(1025 / 1925, 14);
    const only = computePlotMetrics(VISIT, [stem('indet', 20)], index);
    expect(only.diagnostics.woodDensityBaShare?.default).toBe(1);
    expect(rel(only.metrics.agbMgHa, (2 * agbChave2005(0.58, 20, 'moist')) / 1000)).toBeLessThan(1e-14);
  });

  it('genus-only names are not identified to species and are listed with their stem counts', () => {
    const { metrics: m, diagnostics: d } = computePlotMetrics(VISIT, [
      stem('Veltria magna', 20), stem('Ostra lenta', 20), stem('Veltria nova', 20), stem('Veltria nova', 22),
    ], index);
    expect(m.nIdentified).toBe(2);
    expect(d.unresolvedNames).toEqual([{ name: 'Veltria nova', level: 'genus', stems: 2 }]);
  });

  it('lists unresolved names over every stem of the visit, any status or size (the stems the ingest warnings count)', () => {
    const { diagnostics: d } = computePlotMetrics(VISIT, [
      stem('Veltria nova', 20), stem('Veltria nova', 25, { status: 'dead' }), stem('Veltria nova', 30, { status: 'stump', stumpCause: 'natural' }),
      stem('Veltria nova', 4), stem('Xenoa spinosa', 20, { status: 'dead' }),
    ], index);
    expect(d.unresolvedNames).toEqual([{ name: 'Veltria nova', level: 'genus', stems: 4 }, { name: 'Xenoa spinosa', level: 'unresolved', stems: 1 }]);
  });

  it('diversity indices are null below minStemsForDiversity (default 2) and computed from it; richness is always the count', () => {
    const one = [stem('Veltria magna', 20)];
    const m1 = computePlotMetrics(VISIT, one, index).metrics;
    expect(m1.nIdentified).toBe(1);
    expect(m1.richness).toBe(1);
    expect(m1.shannon).toBeNull();
    expect(m1.fisherAlpha).toBeNull(); // S = N = 1: no finite root
    const none = computePlotMetrics(VISIT, [stem(null, 20), stem('Veltria magna', 25, { status: 'dead' })], index).metrics;
    expect(none.nIdentified).toBe(0);
    expect(none.richness).toBe(0);
    expect(none.fisherAlpha).toBeNull();
    expect(computePlotMetrics(VISIT, [], index).metrics.richness).toBe(0);
    const two = [stem('Veltria magna', 20), stem('Veltria magna', 30)];
    const m2 = computePlotMetrics(VISIT, two, index).metrics;
    expect(m2.richness).toBe(1);
    expect(m2.pielou).toBeNull();
    // S = 1, N = 2: the root of 1 = α ln(1 + 2/α), 0.79591 (worked by hand in diversity.test.ts)
    expect(Math.abs((m2.fisherAlpha as number) - 0.79591)).toBeLessThan(1e-4);
  });

  it('with 60 identified stems, diversity equals the worked numbers of docs/methods.md#fishers-alpha and rarefied_50 is set', () => {
    const epithets = ['alba', 'bella', 'cava', 'dura', 'erecta', 'flava', 'gracilis', 'hirta', 'ima', 'juncea',
      'lata', 'mollis', 'nana', 'ovata', 'picta', 'quadra', 'rosea', 'sola'];
    const worked = [19, 12, 7, 3, 3, 2, 2, 2, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1];
    const big = new SpeciesIndex(epithets.map((e) => ({
      name: `Veltria ${e}`, family: 'Orvaceae', guild: 'pioneer' as const, woodDensity: 0.5, synonyms: [],
    })));
    const stems: StemInput[] = [];
    worked.forEach((count, k) => {
      for (let j = 0; j < count; j += 1) stems.push(stem(`Veltria ${epithets[k]}`, 12 + j));
    });
    const { metrics: m } = computePlotMetrics(VISIT, stems, big);
    expect(m.nIdentified).toBe(60);
    // worked numbers of docs/methods.md#chao1-bias-corrected (computed): H' = 2.2587587579, 1/D = 6.0606060606, α = 8.7185298805, Chao1 = 29.25
    expect(rel(m.shannon, 2.2587587579)).toBeLessThan(1e-10);
    expect(rel(m.invSimpson, 6.0606060606)).toBeLessThan(1e-10);
    expect(rel(m.fisherAlpha, 8.7185298805)).toBeLessThan(1e-10);
    expect(m.chao1).toBe(29.25);
    expect(m.rarefied50).toBe(rarefiedRichness(worked, 50));
    expect(m.pioneerBaShare).toBe(1);
    expect(m.unassignedBaShare).toBe(0);
  });

  it('rejects bad input with an error naming the function and the stem', () => {
    expect(() => computePlotMetrics({ ...VISIT, subplotAreaHa: 0 }, [stem('Veltria magna', 8, { inSubplot: true })], index))
      .toThrow(/computePlotMetrics: stem 0: a subplot stem on a plot without a subplot/);
    expect(() => computePlotMetrics(VISIT, [stem('x', 20), stem('x', -3)], index)).toThrow(/computePlotMetrics: stem 1: dbh/);
    expect(() => computePlotMetrics(VISIT, [stem(null, 20, { status: 'stump' })], index)).toThrow(/stump_cause/);
    expect(() => computePlotMetrics(VISIT, [stem('x', 20, { fireDamage: 5 })], index)).toThrow(/fire_damage/);
    expect(() => computePlotMetrics({ ...VISIT, climate: 'boreal' as never }, [], index)).toThrow(/climate/);
    expect(() => computePlotMetrics({ ...VISIT, loggingClass: 7 }, [], index)).toThrow(/logging_class/);
  });
});

describe('computePlotMetrics and the plot-metric catalogue', () => {
  // A full plot, an empty one and one identified stem (below the diversity minimum): the nullable
  // columns are null on the last two, the others never.
  const results = [STEMS, [], [stem('Ostra lenta', 30)]].map((stems) => computePlotMetrics(VISIT, stems, index).metrics);

  it('produces every catalogue key, and no key the catalogue lacks', () => {
    for (const metrics of results) expect(Object.keys(metrics).sort()).toEqual(PLOT_METRICS.map((m) => m.key).sort());
  });

  it('gives a finite number to every entry not marked nullable, an integer to every int column', () => {
    for (const metrics of results) {
      for (const m of PLOT_METRICS) {
        const v = metrics[m.key];
        if (!m.nullable || v !== null) expect(Number.isFinite(v), `${m.column} is ${v}`).toBe(true);
        if (m.sqlType === 'int' && v !== null) expect(Number.isInteger(v), `${m.column} is ${v}`).toBe(true);
      }
    }
    // The nullable marks are needed: the empty plot leaves the diversity columns and the shares null.
    expect(PLOT_METRICS.filter((m) => m.nullable && results[1][m.key] === null).map((m) => m.column)).toContain('fisher_alpha');
  });
});
