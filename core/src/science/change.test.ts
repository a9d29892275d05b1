import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  annualMortality,
  annualRecruitment,
  type ChangeTree,
  type ChangeVisit,
  instantaneousMortality,
  instantaneousRecruitment,
  plotChange,
  yearsBetween,
} from './change';
import { basalAreaM2 } from './structure';

const rel = (got: number | null, want: number): number => Math.abs((got as number) - want) / Math.abs(want);

const live = (treeId: string, dbhCm: number, agbKg: number, inSubplot = false): ChangeTree => ({ treeId, dbhCm, status: 'live', stumpCause: null, inSubplot, agbKg });
const dead = (treeId: string, dbhCm: number): ChangeTree => ({ treeId, dbhCm, status: 'dead', stumpCause: null, inSubplot: false, agbKg: null });
const stump = (treeId: string, dbhCm: number, cause: 'logged' | 'natural' | 'unknown'): ChangeTree => ({ treeId, dbhCm, status: 'stump', stumpCause: cause, inSubplot: false, agbKg: null });

describe('yearsBetween', () => {
  it('counts 365.25-day years: 2016-03-01 → 2020-03-01 is 1461 days = 4 years exactly (calendar arithmetic)', () => {
    expect(yearsBetween('2016-03-01', '2020-03-01')).toBe(4);
  });
  it('2019-01-01 → 2020-01-01 is 365 days = 365/365.25 years (computed by hand)', () => {
    expect(yearsBetween('2019-01-01', '2020-01-01')).toBe(365 / 365.25);
  });
  it('refuses a second date that is not after the first, and a malformed date', () => {
    expect(() => yearsBetween('2020-01-01', '2020-01-01')).toThrow(/yearsBetween: the second date/);
    expect(() => yearsBetween('2020-1-1', '2021-01-01')).toThrow(/yearsBetween: a date/);
  });
});

// Every value below is computed by hand from the formula in docs/methods.md#change-between-visits (a
// calculator for the logarithms and roots). No published worked value is pinned: none is recalled with
// enough certainty to quote its digits (from memory, the permanent-plot literature reports such rates
// in %/yr without the counts needed to redo them).
describe('rates (computed by hand from the formula in docs/methods.md#change-between-visits)', () => {
  it('m = ln(N0/Ns)/t: N0 = 100, Ns = 90, t = 5 → ln(10/9)/5 = 0.105360515657826/5 = 0.0210721031315652', () => {
    expect(rel(instantaneousMortality(100, 90, 5), 0.0210721031315652)).toBeLessThan(1e-13);
  });
  it('annual mortality 1 − (Ns/N0)^(1/t) = 1 − exp(−m) (the annual and instantaneous forms of one constant rate): 1 − 0.9^0.2 = 0.0208516376', () => {
    expect(rel(annualMortality(100, 90, 5), 0.020851637639023)).toBeLessThan(1e-10);
    expect(rel(annualMortality(100, 90, 5), 1 - Math.exp(-(instantaneousMortality(100, 90, 5) as number)))).toBeLessThan(1e-12);
  });
  it('r = ln(Nt/Ns)/t: Nt = 110, Ns = 90, t = 5 → ln(11/9)/5 = 0.200670695462151/5 = 0.0401341390924302', () => {
    expect(rel(instantaneousRecruitment(110, 90, 5), 0.0401341390924302)).toBeLessThan(1e-13);
  });
  it('annual recruitment 1 − (1 − Nr/Nt)^(1/t): Nt = 110, Nr = 20, t = 5 → 1 − (9/11)^0.2 = 0.0393398... = 1 − exp(−r)', () => {
    expect(rel(annualRecruitment(110, 20, 5), 1 - Math.pow(9 / 11, 0.2))).toBeLessThan(1e-15);
    expect(rel(annualRecruitment(110, 20, 5), 1 - Math.exp(-(instantaneousRecruitment(110, 90, 5) as number)))).toBeLessThan(1e-12);
  });
  it('is null, never 0 or infinity, where a count makes a rate undefined', () => {
    expect(instantaneousMortality(0, 0, 5)).toBeNull(); // nothing to die
    expect(instantaneousMortality(10, 0, 5)).toBeNull(); // ln(10/0) is infinite
    expect(instantaneousRecruitment(0, 0, 5)).toBeNull();
    expect(instantaneousRecruitment(4, 0, 5)).toBeNull();
    expect(annualMortality(0, 0, 5)).toBeNull();
    expect(annualRecruitment(0, 0, 5)).toBeNull();
  });
  it('every tree dying in the interval is an annual mortality of 1 (defined: (0/N0)^(1/t) = 0)', () => {
    expect(annualMortality(10, 0, 5)).toBe(1);
    expect(annualRecruitment(4, 4, 5)).toBe(1);
  });
  it('refuses impossible counts and intervals', () => {
    expect(() => instantaneousMortality(5, 6, 1)).toThrow(/instantaneousMortality: counts/);
    expect(() => annualRecruitment(5, 1.5, 1)).toThrow(/annualRecruitment: counts/);
    expect(() => annualMortality(5, 1, 0)).toThrow(/annualMortality: years/);
  });
});

describe('plotChange: a hand-computed plot', () => {
  // Computed by hand from the formula in docs/methods.md#change-between-visits.
  // 0.5 ha at both visits, 2016-03-01 → 2020-03-01 (t = 4 years); dbh minimum 5 cm then 10 cm, so the
  // common threshold is 10 cm. Biomass per stem is given (kg); the function only adds it up.
  const first: ChangeVisit = {
    surveyDate: '2016-03-01',
    areaHa: 0.5,
    dbhMinCm: 5,
    trees: [
      live('A', 20, 200), // survives: 22 cm, 250 kg
      live('B', 30, 500), // dies (dead)
      live('C', 15, 100), // absent at the second visit: died
      live('D', 40, 1000), // logged stump: removed
      live('E', 12, 80), // survives: 13 cm, 90 kg
      live('F', 8, 30), // below the threshold: grows in to 11 cm, a recruit
      live('G', 6, 10, true), // subplot stem, absent later: counts nowhere
      dead('K', 25), // dead at both: counts nowhere
    ],
  };
  const second: ChangeVisit = {
    surveyDate: '2020-03-01',
    areaHa: 0.5,
    dbhMinCm: 10,
    trees: [live('A', 22, 250), dead('B', 30), stump('D', 40, 'logged'), live('E', 13, 90), live('F', 11, 60), live('H', 10.5, 50), live('I', 9, 20), dead('J', 12), dead('K', 25)],
  };
  const c = plotChange(first, second);

  it('threshold = max(5, 10) = 10 cm; t = 4', () => {
    expect(c.dbhThresholdCm).toBe(10);
    expect(c.years).toBe(4);
  });
  it('N0 = 5 (A B C D E), Ns = 2 (A E), died = 2 (B dead, C absent), removed = 1 (D), recruits = 2 (F grew in, H new), Nt = 4', () => {
    expect([c.nStart, c.nSurvivors, c.nDied, c.nAbsent, c.nRemoved, c.nRecruits, c.nEnd]).toEqual([5, 2, 2, 1, 1, 2, 4]);
  });
  it('m = ln(5/2)/4 = 0.229072682968539; r = ln(4/2)/4 = 0.173286795139986', () => {
    expect(rel(c.mortalityRate, 0.229072682968539)).toBeLessThan(1e-13);
    expect(rel(c.recruitmentRate, 0.173286795139986)).toBeLessThan(1e-13);
  });
  it('annual: 1 − 0.4^0.25 = 0.204729271232949; 1 − 0.5^0.25 = 0.159103584746285', () => {
    expect(rel(c.mortalityAnnual, 0.204729271232949)).toBeLessThan(1e-13);
    expect(rel(c.recruitmentAnnual, 0.159103584746285)).toBeLessThan(1e-13);
  });
  it('diameter increment of survivors = ((22 − 20) + (13 − 12)) / 2 / 4 = 0.375 cm/yr', () => {
    expect(rel(c.dbhIncrementCmYr, 0.375)).toBeLessThan(1e-14);
  });
  it('AGB per ha per year (×2 for 0.5 ha, /1000 to Mg, /4 years): growth ((250−200)+(90−80))·2 = 120 kg → 0.03; recruitment (60+50)·2 = 220 kg → 0.055; died (500+100)·2 → 0.3; removed 1000·2 → 0.5; net 0.03 + 0.055 − 0.8 = −0.715', () => {
    expect(rel(c.agbGrowthMgHaYr, 0.03)).toBeLessThan(1e-12);
    expect(rel(c.agbRecruitmentMgHaYr, 0.055)).toBeLessThan(1e-12);
    expect(rel(c.agbDiedMgHaYr, 0.3)).toBeLessThan(1e-12);
    expect(rel(c.agbRemovedMgHaYr, 0.5)).toBeLessThan(1e-12);
    expect(rel(c.agbLossMgHaYr, 0.8)).toBeLessThan(1e-12);
    expect(rel(c.agbNetChangeMgHaYr, -0.715)).toBeLessThan(1e-12);
  });
  it('carbon net change = 0.47 · (−0.715) = −0.33605 Mg C/ha/yr (IPCC 2006 Vol. 4 Table 4.3 fraction); another fraction scales it', () => {
    expect(rel(c.carbonNetChangeMgHaYr, -0.33605)).toBeLessThan(1e-12);
    expect(rel(plotChange(first, second, 0.5).carbonNetChangeMgHaYr, -0.3575)).toBeLessThan(1e-12);
  });
  it('without root-to-shoot ratios or dead-stem biomass, the pool changes are empty (null), never 0', () => {
    expect(c.bgbNetChangeMgHaYr).toBeNull();
    expect(c.standingDeadNetChangeMgHaYr).toBeNull();
    expect(c.treeCarbonNetChangeMgHaYr).toBeNull();
  });
  describe('carbon pools (docs/methods.md#change-between-visits; computed by hand)', () => {
    // Stock of the trees that count: first (200 + 500 + 100 + 1000 + 80)·2 = 3760 kg/ha, second (250 + 90 +
    // 60 + 50)·2 = 900 kg/ha, so AGB net = (900 − 3760)/1000/4 = −0.715. Dead stems at or above 10 cm on the
    // main plot: first K 150 kg → 300 kg/ha; second B 300, J 40, K 150 kg → 980 kg/ha.
    const deadKg: Record<string, number> = { B: 300, J: 40, K: 150 };
    const withPools = (v: ChangeVisit, ratio: number | null): ChangeVisit => ({
      ...v,
      rootShootRatio: ratio,
      trees: v.trees.map((t) => (t.status === 'dead' ? { ...t, deadKg: deadKg[t.treeId] } : t)),
    });
    it('one ratio at both visits (0.24): BGB net = 0.24 · AGB net = −0.1716 Mg/ha/yr', () => {
      const p = plotChange(withPools(first, 0.24), withPools(second, 0.24));
      expect(rel(p.bgbNetChangeMgHaYr, 0.24 * -0.715)).toBeLessThan(1e-12);
    });
    it('ratio 0.24 then 0.20 (a plot that fell below 125 Mg/ha): (0.20·900 − 0.24·3760)/4000 = −0.1806 Mg/ha/yr', () => {
      const p = plotChange(withPools(first, 0.24), withPools(second, 0.2));
      expect(rel(p.bgbNetChangeMgHaYr, -0.1806)).toBeLessThan(1e-12);
      expect(rel(p.standingDeadNetChangeMgHaYr, (980 - 300) / 4000)).toBeLessThan(1e-12);
      // 0.47 · (−0.715 − 0.1806 + 0.17) = −0.341032 Mg C/ha/yr
      expect(rel(p.treeCarbonNetChangeMgHaYr, -0.341032)).toBeLessThan(1e-12);
      expect(p.agbNetChangeMgHaYr).toBe(c.agbNetChangeMgHaYr);
    });
    it('a null ratio (no ratio applies) counts as no below-ground biomass at that visit', () => {
      const p = plotChange(withPools(first, null), withPools(second, 0.2));
      expect(rel(p.bgbNetChangeMgHaYr, (0.2 * 900) / 4000)).toBeLessThan(1e-12);
    });
  });
  it('basal area per ha per year: growth 2·π/40000·(22² − 20² + 13² − 12²)/4, recruitment 2·π/40000·(11² + 10.5²)/4, loss 2·π/40000·(30² + 15² + 40²)/4', () => {
    const k = (2 * Math.PI) / 40000 / 4;
    expect(rel(c.baGrowthM2HaYr, k * (484 - 400 + 169 - 144))).toBeLessThan(1e-12);
    expect(rel(c.baRecruitmentM2HaYr, k * (121 + 110.25))).toBeLessThan(1e-12);
    expect(rel(c.baLossM2HaYr, k * (900 + 225 + 1600))).toBeLessThan(1e-12);
    expect(rel(c.baChangeM2HaYr, k * (109 + 231.25 - 2725))).toBeLessThan(1e-12);
  });
  it('a natural or unknown stump is a death, kept apart from removal', () => {
    const s = plotChange(first, { ...second, trees: second.trees.map((t) => (t.treeId === 'D' ? stump('D', 40, 'natural') : t)) });
    expect([s.nDied, s.nRemoved]).toEqual([3, 0]);
    expect(rel(s.agbDiedMgHaYr, 0.8)).toBeLessThan(1e-12);
  });
  it('rates are null with no live tree at the start, and the increment with no survivor', () => {
    const empty = plotChange({ ...first, trees: [] }, second);
    expect([empty.nStart, empty.mortalityRate, empty.recruitmentRate, empty.mortalityAnnual, empty.dbhIncrementCmYr]).toEqual([0, null, null, null, null]);
    expect(empty.recruitmentAnnual).toBe(1);
  });
  it('refuses a tree recorded twice, a live tree without biomass and visits out of order', () => {
    expect(() => plotChange({ ...first, trees: [live('A', 20, 1), live('A', 21, 1)] }, second)).toThrow(/plotChange: first visit: tree A recorded twice/);
    expect(() => plotChange(first, { ...second, trees: [{ ...live('A', 20, 1), agbKg: null }] })).toThrow(/plotChange: second visit: live tree A needs its biomass/);
    expect(() => plotChange(second, first)).toThrow(/yearsBetween/);
  });
});

describe('plotChange: a second hand-computed plot, a leap-year interval and a corrected area (1 ha, then 0.8 ha)', () => {
  // Computed by hand from the formula in docs/methods.md#change-between-visits.
  // 2018-01-01 → 2023-01-01 is 1826 days (2020 is a leap year): t = 1826 / 365.25 = 4.999315537303217 years.
  // A: live 30 cm 600 kg → live 32 cm 700 kg (survivor); B: live 20 cm 200 kg → dead (died);
  // C: live 50 cm 2000 kg → logged stump (removed); R: absent → live 11 cm 40 kg (recruit).
  const c = plotChange(
    { surveyDate: '2018-01-01', areaHa: 1, dbhMinCm: 10, trees: [live('A', 30, 600), live('B', 20, 200), live('C', 50, 2000)] },
    { surveyDate: '2023-01-01', areaHa: 0.8, dbhMinCm: 10, trees: [live('A', 32, 700), dead('B', 20), stump('C', 50, 'logged'), live('R', 11, 40)] },
  );
  const t = 4.999315537303217;

  it('t = 1826/365.25; N0 = 3, Ns = 1, died 1, removed 1, Nr = 1, Nt = 2', () => {
    expect(c.years).toBe(t);
    expect([c.nStart, c.nSurvivors, c.nDied, c.nRemoved, c.nRecruits, c.nEnd]).toEqual([3, 1, 1, 1, 1, 2]);
  });
  it('m = ln 3 / t = 1.0986122886681098 / 4.999315537303217 = 0.21975254021688; r = ln 2 / t = 0.13864841604574', () => {
    expect(rel(c.mortalityRate, 0.21975254021688229)).toBeLessThan(1e-13);
    expect(rel(c.recruitmentRate, 0.13864841604573933)).toBeLessThan(1e-13);
  });
  it('annual: 1 − (1/3)^(1/t) = 0.19728258633614; 1 − (1 − 1/2)^(1/t) = 0.12946595953909; each = 1 − e^(−rate)', () => {
    expect(rel(c.mortalityAnnual, 0.19728258633614415)).toBeLessThan(1e-13);
    expect(rel(c.recruitmentAnnual, 0.1294659595390918)).toBeLessThan(1e-13);
    expect(rel(c.mortalityAnnual, 1 - Math.exp(-0.21975254021688229))).toBeLessThan(1e-13);
    expect(rel(c.recruitmentAnnual, 1 - Math.exp(-0.13864841604573933))).toBeLessThan(1e-13);
  });
  it('diameter increment (32 − 30) / 1 / t = 0.40005476451260 cm/yr', () => {
    expect(rel(c.dbhIncrementCmYr, 0.4000547645125958)).toBeLessThan(1e-13);
  });
  it('AGB per ha and year: growth (700/0.8 − 600/1) kg = 275 kg → 0.275/t; recruitment 40/0.8 = 50 kg → 0.05/t; died 200 kg → 0.2/t; removed 2000 kg → 2/t; net (0.275 + 0.05 − 2.2)/t = −1.875/t', () => {
    expect(rel(c.agbGrowthMgHaYr, 0.05500753012048193)).toBeLessThan(1e-13);
    expect(rel(c.agbRecruitmentMgHaYr, 0.010001369112814896)).toBeLessThan(1e-13);
    expect(rel(c.agbDiedMgHaYr, 0.04000547645125958)).toBeLessThan(1e-13);
    expect(rel(c.agbRemovedMgHaYr, 0.4000547645125958)).toBeLessThan(1e-13);
    expect(rel(c.agbNetChangeMgHaYr, -0.3750513417305586)).toBeLessThan(1e-13);
    // The same as the change of the stock: ((700 + 40)/0.8 − (600 + 200 + 2000)/1) kg = 925 − 2800 = −1875 kg.
    expect(rel(c.agbNetChangeMgHaYr, -1.875 / t)).toBeLessThan(1e-13);
  });
  it('carbon net change 0.47 × (−1.875/t) = −0.17627413061336 Mg C/ha/yr (IPCC 2006 Vol. 4 Table 4.3 fraction)', () => {
    expect(rel(c.carbonNetChangeMgHaYr, -0.17627413061336253)).toBeLessThan(1e-13);
  });
  it('basal area per ha and year, g = π D²/40000: growth (g(32)/0.8 − g(30))/t, recruitment g(11)/0.8/t, loss (g(20) + g(50))/t', () => {
    expect(rel(c.baGrowthM2HaYr, 0.005969843268825237)).toBeLessThan(1e-12);
    expect(rel(c.baRecruitmentM2HaYr, 0.0023761547221310977)).toBeLessThan(1e-12);
    expect(rel(c.baLossM2HaYr, 0.04555933020945575)).toBeLessThan(1e-12);
  });
});

describe('plotChange: gains minus losses is the net change on random plots (property)', () => {
  const status = fc.constantFrom('live', 'live', 'live', 'dead', 'logged', 'natural', 'absent') as fc.Arbitrary<string>;
  const treeArb = fc.record({ d1: fc.double({ min: 1, max: 150, noNaN: true }), grow: fc.double({ min: -2, max: 8, noNaN: true }), s1: status, s2: status, sub: fc.boolean(), w: fc.double({ min: 0.2, max: 1.1, noNaN: true }) });
  const plotArb = fc.record({
    trees: fc.array(treeArb, { maxLength: 60 }),
    a1: fc.double({ min: 0.01, max: 2, noNaN: true }),
    a2: fc.double({ min: 0.01, max: 2, noNaN: true }),
    min1: fc.constantFrom(5, 10, 12.5),
    min2: fc.constantFrom(5, 10, 12.5),
    days: fc.integer({ min: 30, max: 8000 }),
  });
  const agb = (d: number, w: number): number => w * 0.1 * Math.pow(d, 2.4); // any positive per-stem biomass will do

  type PlotDraw = typeof plotArb extends fc.Arbitrary<infer T> ? T : never;
  function build(p: PlotDraw): [ChangeVisit, ChangeVisit] {
    const t1: ChangeTree[] = [];
    const t2: ChangeTree[] = [];
    p.trees.forEach((t, i) => {
      const id = `T${i}`;
      const d2 = Math.max(0.5, t.d1 + t.grow);
      const make = (s: string, d: number, sub: boolean): ChangeTree | null =>
        s === 'absent' ? null : s === 'live' ? live(id, d, agb(d, t.w), sub) : s === 'dead' ? dead(id, d) : stump(id, d, s as 'logged' | 'natural');
      const a = make(t.s1, t.d1, t.sub);
      const b = make(t.s2, d2, false);
      if (a) t1.push(a);
      if (b) t2.push(b);
    });
    const to = new Date(Date.UTC(2010, 0, 1) + p.days * 86_400_000).toISOString().slice(0, 10);
    return [
      { surveyDate: '2010-01-01', areaHa: p.a1, dbhMinCm: p.min1, trees: t1 },
      { surveyDate: to, areaHa: p.a2, dbhMinCm: p.min2, trees: t2 },
    ];
  }

  it('net AGB and basal-area change equal the change of the stock of the trees that count (computed independently), and the counts add up', () => {
    fc.assert(
      fc.property(plotArb, (p) => {
        const [v1, v2] = build(p);
        const c = plotChange(v1, v2);
        // The parts add up to the net change exactly (it is defined as their sum).
        expect(c.agbNetChangeMgHaYr).toBe(c.agbGrowthMgHaYr + c.agbRecruitmentMgHaYr - (c.agbDiedMgHaYr + c.agbRemovedMgHaYr));
        expect(c.baChangeM2HaYr).toBe(c.baGrowthM2HaYr + c.baRecruitmentM2HaYr - c.baLossM2HaYr);
        // Independently: stock at the second visit of survivors and recruits minus stock at the first of N0.
        const thr = Math.max(p.min1, p.min2);
        const startIds = new Set(v1.trees.filter((t) => t.status === 'live' && !t.inSubplot && t.dbhCm >= thr).map((t) => t.treeId));
        const bad = new Set(v1.trees.filter((t) => t.status !== 'live').map((t) => t.treeId));
        const endTrees = v2.trees.filter((t) => t.status === 'live' && (startIds.has(t.treeId) || (t.dbhCm >= thr && !bad.has(t.treeId))));
        const startTrees = v1.trees.filter((t) => startIds.has(t.treeId));
        const sum = (ts: ChangeTree[], f: (t: ChangeTree) => number): number => ts.reduce((s, t) => s + f(t), 0);
        const agbNet = (sum(endTrees, (t) => t.agbKg as number) / p.a2 - sum(startTrees, (t) => t.agbKg as number) / p.a1) / 1000 / c.years;
        const baNet = (sum(endTrees, (t) => basalAreaM2(t.dbhCm)) / p.a2 - sum(startTrees, (t) => basalAreaM2(t.dbhCm)) / p.a1) / c.years;
        const scaleA = (sum(endTrees, (t) => t.agbKg as number) / p.a2 + sum(startTrees, (t) => t.agbKg as number) / p.a1) / 1000 / c.years + 1e-12;
        const scaleB = (sum(endTrees, (t) => basalAreaM2(t.dbhCm)) / p.a2 + sum(startTrees, (t) => basalAreaM2(t.dbhCm)) / p.a1) / c.years + 1e-12;
        expect(Math.abs(c.agbNetChangeMgHaYr - agbNet) / scaleA).toBeLessThan(1e-12);
        expect(Math.abs(c.baChangeM2HaYr - baNet) / scaleB).toBeLessThan(1e-12);
        expect(c.nStart).toBe(c.nSurvivors + c.nDied + c.nRemoved);
        expect(c.nEnd).toBe(endTrees.length);
        for (const r of [c.mortalityRate, c.recruitmentRate, c.mortalityAnnual, c.recruitmentAnnual]) {
          if (r !== null) expect(Number.isFinite(r) && r >= 0).toBe(true);
        }
      }),
      { numRuns: 500, seed: 14 },
    );
  });
});

describe("the sums of the carbon change's uncertainty (computed by hand; docs/methods.md#carbon-uncertainty)", () => {
  // 0.1 ha (w = 10 stems/ha), 2016-03-01 → 2020-03-01 = 4 years (1461 days). A survivor 100 → 160 kg (measured height at
  // both visits), a tree that died at 50 kg (modelled height), a recruit of 20 kg (no height model).
  // u = Σ w·coef·v (Mg/ha/yr): survivor 10·(0.160 − 0.100)/4 = 0.15; died −10·0.050/4 = −0.125; recruit 10·0.020/4 = 0.05.
  const visit = (date: string, trees: ChangeTree[]): ChangeVisit => ({ surveyDate: date, areaHa: 0.1, dbhMinCm: 10, trees });
  const src = (t: ChangeTree, heightSource: 'measured' | 'modelled' | 'noHeight'): ChangeTree => ({ ...t, heightSource });
  const first = visit('2016-03-01', [src(live('a', 30, 100), 'measured'), src(live('b', 20, 50), 'modelled')]);
  const second = visit('2020-03-01', [src(live('a', 34, 160), 'measured'), dead('b', 20), src(live('c', 12, 20), 'noHeight')]);

  it('value Σu = the net AGB change (0.075 Mg/ha/yr); Σu²/w by source; Σu² per plot; Σ w·c·v·(ln D)^k over modelled terms', () => {
    const c = plotChange(first, second, 0.47, { carbonMoments: true });
    const m = c.carbonMoments as NonNullable<typeof c.carbonMoments>;
    expect(m.value).toBeCloseTo(0.075, 14);
    expect(m.value).toBeCloseTo(c.agbNetChangeMgHaYr, 14);
    expect(0.47 * m.value).toBeCloseTo(c.carbonNetChangeMgHaYr, 14);
    expect(m.sq[0]).toBeCloseTo(0.0225 / 10, 14);
    expect(m.sq[1]).toBeCloseTo(0.015625 / 10, 14);
    expect(m.sq[2]).toBeCloseTo(0.0025 / 10, 14);
    expect(m.sqPlot[0]).toBeCloseTo(0.0225, 14);
    expect(m.lnD[0]).toBeCloseTo(-0.125, 14);
    expect(m.lnD[1]).toBeCloseTo(-0.125 * Math.log(20), 14);
  });
  it('null when a counted tree has no height source; absent without the option', () => {
    const unknown = visit('2020-03-01', [src(live('a', 34, 160), 'measured'), dead('b', 20), live('c', 12, 20)]);
    expect(plotChange(first, unknown, 0.47, { carbonMoments: true }).carbonMoments).toBeNull();
    expect('carbonMoments' in plotChange(first, second)).toBe(false);
  });
});

describe("the sums of the tree pool change's uncertainty (computed by hand; docs/methods.md#carbon-uncertainty)", () => {
  // 0.1 ha (w = 10 stems/ha), 2016-03-01 → 2020-03-01 = 4 years. Root-to-shoot ratio R₁ = 0.2 (row z:0, SD 0.05) at the
  // first visit, R₂ = 0.25 (row z:1, SD 0.08) at the second: the plot moved to another row. Trees:
  //  a survivor, measured height, 100 → 160 kg:     u = −1.2·10·0.100/4 + 1.25·10·0.160/4 = −0.3 + 0.5 = 0.2
  //  b live 50 kg (modelled) → dead, 30 kg of wood:  u = −1.2·10·0.050/4 + 10·0.030/4 = −0.15 + 0.075 = −0.075
  //  c recruit, 20 kg, no height model:               u = 1.25·10·0.020/4 = 0.0625
  //  d standing dead at both, measured, 40 → 36 kg:   u = −10·0.040/4 + 10·0.036/4 = −0.1 + 0.09 = −0.01
  // Σu = 0.1775 = AGB net (1.8 − 1.5)/4 = 0.075 + BGB net (0.25·1.8 − 0.2·1.5)/4 = 0.0375 + dead wood (0.66 − 0.4)/4 = 0.065.
  const src = (t: ChangeTree, heightSource: 'measured' | 'modelled' | 'noHeight'): ChangeTree => ({ ...t, heightSource });
  const deadWood = (t: ChangeTree, deadKg: number, heightSource: 'measured' | 'modelled'): ChangeTree => ({ ...t, deadKg, heightSource });
  const visit = (surveyDate: string, rootShootRatio: number, sd: number, row: string, trees: ChangeTree[]): ChangeVisit => ({
    surveyDate,
    areaHa: 0.1,
    dbhMinCm: 10,
    rootShootRatio,
    rootShootError: { sd, row },
    trees,
  });
  const first = visit('2016-03-01', 0.2, 0.05, 'z:0', [src(live('a', 30, 100), 'measured'), src(live('b', 20, 50), 'modelled'), deadWood(dead('d', 25), 40, 'measured')]);
  const second = visit('2020-03-01', 0.25, 0.08, 'z:1', [src(live('a', 34, 160), 'measured'), deadWood(dead('b', 20), 30, 'modelled'), src(live('c', 12, 20), 'noHeight'), deadWood(dead('d', 25), 36, 'measured')]);

  it('value Σu = the AGB + BGB + dead wood net change (0.1775 Mg/ha/yr); a tree’s terms at both visits together', () => {
    const c = plotChange(first, second, 0.47, { carbonMoments: true });
    const m = c.treeCarbonMoments as NonNullable<typeof c.treeCarbonMoments>;
    expect(c.agbNetChangeMgHaYr).toBeCloseTo(0.075, 14);
    expect(c.bgbNetChangeMgHaYr).toBeCloseTo(0.0375, 14);
    expect(c.standingDeadNetChangeMgHaYr).toBeCloseTo(0.065, 14);
    expect(m.value).toBeCloseTo(0.1775, 14);
    expect(0.47 * m.value).toBe(c.treeCarbonNetChangeMgHaYr);
    // Σu²/w by source (measured: a and d; modelled: b, modelled at either visit; noHeight: c) and Σu²
    expect(m.sq[0]).toBeCloseTo((0.2 ** 2 + 0.01 ** 2) / 10, 14);
    expect(m.sq[1]).toBeCloseTo(0.075 ** 2 / 10, 14);
    expect(m.sq[2]).toBeCloseTo(0.0625 ** 2 / 10, 14);
    expect(m.sqPlot[0]).toBeCloseTo(0.2 ** 2 + 0.01 ** 2, 14);
    expect(m.sqPlot[1]).toBeCloseTo(0.075 ** 2, 14);
    // modelled terms: b's live −0.15 and dead +0.075, both at 20 cm
    expect(m.lnD[0]).toBeCloseTo(-0.075, 14);
    expect(m.lnD[2]).toBeCloseTo(-0.075 * Math.log(20) ** 2, 14);
    // each visit's live biomass that its row multiplies: −S₁/t = −1.5/4, +S₂/t = 1.8/4
    expect(m.rootShootParts).toHaveLength(2);
    expect(m.rootShootParts[0]).toMatchObject({ row: 'z:0', ratio: 0.2, sd: 0.05 });
    expect(m.rootShootParts[0].agb).toBeCloseTo(-0.375, 14);
    expect(m.rootShootParts[1]).toMatchObject({ row: 'z:1', ratio: 0.25, sd: 0.08 });
    expect(m.rootShootParts[1].agb).toBeCloseTo(0.45, 14);
    // the above-ground sums are untouched by the tree pool's: a 0.06/4·10 = 0.15, b −0.125, c 0.05
    expect((c.carbonMoments as NonNullable<typeof c.carbonMoments>).value).toBeCloseTo(0.075, 14);
  });
  it("null when a dead stem's height source or wood, or a visit's ratio error, is unknown; absent without the option", () => {
    const noSource: ChangeVisit = { ...second, trees: second.trees.map((t) => (t.treeId === 'b' ? { ...t, heightSource: null } : t)) };
    expect(plotChange(first, noSource, 0.47, { carbonMoments: true }).treeCarbonMoments).toBeNull();
    const noWood: ChangeVisit = { ...second, trees: second.trees.map((t) => (t.treeId === 'd' ? { ...t, deadKg: null } : t)) };
    const c = plotChange(first, noWood, 0.47, { carbonMoments: true });
    expect(c.treeCarbonNetChangeMgHaYr).toBeNull();
    expect(c.treeCarbonMoments).toBeNull();
    const { rootShootError: _e, ...noError } = first;
    expect(plotChange(noError, second, 0.47, { carbonMoments: true }).treeCarbonMoments).toBeNull();
    expect('treeCarbonMoments' in plotChange(first, second)).toBe(false);
  });
});
