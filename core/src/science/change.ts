// Change of a permanent plot between two consecutive visits: which trees survived, died, were removed
// or recruited, the demographic rates, diameter growth, and basal-area, biomass and carbon change per
// hectare and year split into gains and losses. Rules and sources: docs/methods.md#change-between-visits.
//  - trees are matched by tree_id within the plot; only main-plot stems count, at or above a common
//    threshold: the larger dbh_min_cm of the two visits;
//  - N0: live at the first visit at or above the threshold; of these, survivors are live at the second,
//    removed are stumps with stump_cause = logged at the second, died are dead or other stumps at the
//    second or absent from it (not found: counted as died);
//  - recruits: live at the second visit at or above the threshold, and absent from the first or live
//    there below the threshold (or on the subplot); a tree recorded dead or as a stump at the first and
//    live at the second is an error in the data, counted nowhere (the ingest checks refuse it);
//  - Nt = Ns + Nr (live at the second visit among trees that count);
//  - biomass of each live stem is the caller's, from the same models at both visits (plot-metrics.ts);
//  - below-ground change: each visit's root-to-shoot ratio (of its plot figures) times the stock of the trees
//    that count, so with one ratio at both visits it is the ratio times the AGB net change; standing dead
//    wood change: the dead main-plot stems at or above the threshold, stock at the second minus the first.
// Rates are null where a count makes them undefined, never 0 or infinity.

import { carbonFromBiomass, IPCC_2006_CARBON_FRACTION } from './allometry';
import { CarbonMomentsBuilder, type CarbonSums, type HeightSource, type MomentTerm, type PlotRootShoot, type TreeChangeMoments } from './carbon-uncertainty';
import { basalAreaM2 } from './structure';

/** Days per year of the rates' time base (Julian year). */
export const DAYS_PER_YEAR = 365.25;

export interface ChangeTree {
  readonly treeId: string;
  readonly dbhCm: number;
  readonly status: 'live' | 'dead' | 'stump';
  readonly stumpCause: 'logged' | 'natural' | 'unknown' | null;
  readonly inSubplot: boolean;
  /** Above-ground biomass of the stem in kg when live (same models at both visits); null otherwise. */
  readonly agbKg: number | null;
  /** Standing dead wood biomass of the stem in kg when dead (docs/methods.md#standing-dead-wood); absent: unknown. */
  readonly deadKg?: number | null;
  /** Where a live or standing dead stem's height came from (for the carbon uncertainty's sums); absent: unknown. */
  readonly heightSource?: HeightSource | null;
}

export interface ChangeVisit {
  /** ISO date, YYYY-MM-DD. */
  readonly surveyDate: string;
  readonly areaHa: number;
  readonly dbhMinCm: number;
  readonly trees: readonly ChangeTree[];
  /** Root-to-shoot ratio applied to the visit's plot figures (null: none applies, BGB 0); absent: no below-ground change. */
  readonly rootShootRatio?: number | null;
  /** The SD of that ratio and the row of its relation (for the tree pool's uncertainty sums); absent: unknown. */
  readonly rootShootError?: Omit<PlotRootShoot, 'ratio'>;
}

export interface PlotChange {
  years: number;
  dbhThresholdCm: number;
  nStart: number;
  nSurvivors: number;
  nDied: number;
  /** Of nDied: trees not found at the second visit. */
  nAbsent: number;
  nRemoved: number;
  nRecruits: number;
  nEnd: number;
  mortalityRate: number | null;
  recruitmentRate: number | null;
  mortalityAnnual: number | null;
  recruitmentAnnual: number | null;
  dbhIncrementCmYr: number | null;
  baGrowthM2HaYr: number;
  baRecruitmentM2HaYr: number;
  baLossM2HaYr: number;
  baChangeM2HaYr: number;
  agbGrowthMgHaYr: number;
  agbRecruitmentMgHaYr: number;
  agbDiedMgHaYr: number;
  agbRemovedMgHaYr: number;
  agbLossMgHaYr: number;
  agbNetChangeMgHaYr: number;
  carbonNetChangeMgHaYr: number;
  /** (R₂ · stock₂ − R₁ · stock₁) / t of the trees that count; null without both visits' ratios. */
  bgbNetChangeMgHaYr: number | null;
  /** Change of the standing dead wood stock of dead main-plot stems at or above the threshold; null without their biomass. */
  standingDeadNetChangeMgHaYr: number | null;
  /** Carbon fraction × (AGB + BGB + standing dead wood net change); null where one of them is. */
  treeCarbonNetChangeMgHaYr: number | null;
  /**
   * With the `carbonMoments` option: the sums of the above-ground net change's whole uncertainty
   * (Mg/ha/yr; docs/methods.md#carbon-uncertainty), every live stem's height source known; null otherwise.
   */
  carbonMoments?: CarbonSums | null;
  /**
   * With the `carbonMoments` option: the sums of the tree pool's net change (Mg/ha/yr before the carbon
   * fraction; value = the AGB + BGB + standing dead wood net change) and the visits' live biomass that
   * their root-to-shoot rows multiply; null where that change is null or a stem's height source or a
   * visit's ratio error is unknown.
   */
  treeCarbonMoments?: TreeChangeMoments | null;
}

export interface PlotChangeOptions {
  /** Also build the sums of the carbon change's uncertainty (`carbonMoments`). */
  readonly carbonMoments?: boolean;
}

function fail(fn: string, message: string): never {
  throw new RangeError(`${fn}: ${message}`);
}

function dayNumber(fn: string, iso: string): number {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(iso);
  const ms = m ? Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])) : Number.NaN;
  if (!Number.isFinite(ms)) fail(fn, `a date must be YYYY-MM-DD (got ${iso})`);
  return ms / 86_400_000;
}

// t = (date₂ − date₁) in days / 365.25 — Julian year (common practice for census intervals)
export function yearsBetween(dateFrom: string, dateTo: string): number {
  const t = (dayNumber('yearsBetween', dateTo) - dayNumber('yearsBetween', dateFrom)) / DAYS_PER_YEAR;
  if (!(t > 0)) fail('yearsBetween', `the second date must be after the first (got ${dateFrom} to ${dateTo})`);
  return t;
}

function checkCounts(fn: string, a: number, b: number, t: number): void {
  if (!Number.isInteger(a) || !Number.isInteger(b) || a < 0 || b < 0 || b > a) fail(fn, `counts must be integers with 0 <= ${b} <= ${a}`);
  if (!(t > 0) || !Number.isFinite(t)) fail(fn, `years must be finite and > 0 (got ${t})`);
}

// m = ln(N0 / Ns) / t, instantaneous — constant-rate model Ns = N0·e^(−mt) solved for m (docs/methods.md#change-between-visits); null when N0 or Ns is 0
export function instantaneousMortality(n0: number, nSurvivors: number, years: number): number | null {
  checkCounts('instantaneousMortality', n0, nSurvivors, years);
  return n0 > 0 && nSurvivors > 0 ? Math.log(n0 / nSurvivors) / years : null;
}

// r = ln(Nt / Ns) / t, instantaneous — constant-rate model Nt = Ns·e^(rt) solved for r (docs/methods.md#change-between-visits); null when Ns is 0
export function instantaneousRecruitment(nEnd: number, nSurvivors: number, years: number): number | null {
  checkCounts('instantaneousRecruitment', nEnd, nSurvivors, years);
  return nSurvivors > 0 ? Math.log(nEnd / nSurvivors) / years : null;
}

// m_a = 1 − (Ns / N0)^(1/t) = 1 − e^(−m), the share dying per year at a constant rate (docs/methods.md#change-between-visits); null when N0 is 0
export function annualMortality(n0: number, nSurvivors: number, years: number): number | null {
  checkCounts('annualMortality', n0, nSurvivors, years);
  return n0 > 0 ? 1 - Math.pow(nSurvivors / n0, 1 / years) : null;
}

// r_a = 1 − (1 − Nr / Nt)^(1/t) = 1 − e^(−r), the yearly share of recruits at a constant rate (docs/methods.md#change-between-visits); null when Nt is 0
export function annualRecruitment(nEnd: number, nRecruits: number, years: number): number | null {
  checkCounts('annualRecruitment', nEnd, nRecruits, years);
  return nEnd > 0 ? 1 - Math.pow(1 - nRecruits / nEnd, 1 / years) : null;
}

function checkVisit(fn: string, which: string, v: ChangeVisit): Map<string, ChangeTree> {
  if (!(v.areaHa > 0) || !Number.isFinite(v.areaHa)) fail(fn, `${which} visit: area_ha must be > 0 (got ${v.areaHa})`);
  if (!(v.dbhMinCm > 0) || !Number.isFinite(v.dbhMinCm)) fail(fn, `${which} visit: dbh_min_cm must be > 0 (got ${v.dbhMinCm})`);
  const byId = new Map<string, ChangeTree>();
  for (const tree of v.trees) {
    if (byId.has(tree.treeId)) fail(fn, `${which} visit: tree ${tree.treeId} recorded twice`);
    if (!(tree.dbhCm > 0) || !Number.isFinite(tree.dbhCm)) fail(fn, `${which} visit: tree ${tree.treeId} dbh must be > 0 (got ${tree.dbhCm})`);
    if (tree.status === 'live' && (tree.agbKg === null || !(tree.agbKg >= 0) || !Number.isFinite(tree.agbKg))) {
      fail(fn, `${which} visit: live tree ${tree.treeId} needs its biomass (got ${tree.agbKg})`);
    }
    byId.set(tree.treeId, tree);
  }
  return byId;
}

const counts = (t: ChangeTree, threshold: number): boolean => t.status === 'live' && !t.inSubplot && t.dbhCm >= threshold;

// ΔC = sign(ΔB) · CF · |ΔB| — carbonFromBiomass takes a stock (>= 0); a change may be negative, so the fraction is applied to its size
function carbonOfChange(changeMgHaYr: number, carbonFraction: number): number {
  return Math.sign(changeMgHaYr) * carbonFromBiomass(Math.abs(changeMgHaYr), carbonFraction);
}

// ΔX/ha/yr = [Σ_surv (x₂/A₂ − x₁/A₁) + Σ_recr x₂/A₂ − Σ_lost x₁/A₁] / t, net = growth + recruitment − losses — docs/methods.md#change-between-visits
export function plotChange(first: ChangeVisit, second: ChangeVisit, carbonFraction: number = IPCC_2006_CARBON_FRACTION, options: PlotChangeOptions = {}): PlotChange {
  const fn = 'plotChange';
  // Sums of the uncertainty: a survivor has two terms (−1/t at the first visit, +1/t at the second: its
  // model errors taken as the same at both), a tree lost or recruited one. Null once a source is unknown.
  let moments = options.carbonMoments ? new CarbonMomentsBuilder() : null;
  const term = (t: ChangeTree, area: number, coef: number, kg: number | null | undefined = t.agbKg): MomentTerm | null =>
    t.heightSource === undefined || t.heightSource === null || kg === undefined || kg === null ? null : { weight: 1 / area, coef, agbMg: kg / 1000, dbhCm: t.dbhCm, modelled: t.heightSource === 'modelled' };
  const addTree = (to: CarbonMomentsBuilder | null, terms: (MomentTerm | null)[], sources: (HeightSource | null | undefined)[]): boolean => {
    if (to === null || terms.some((x) => x === null)) return false;
    // a tree whose height was modelled at either visit counts as modelled (its height error is then in its value)
    const source: HeightSource = sources.includes('modelled') ? 'modelled' : sources.includes('measured') ? 'measured' : 'noHeight';
    to.addTree(source, terms as MomentTerm[]);
    return true;
  };
  const addLive = (terms: (MomentTerm | null)[], sources: (HeightSource | null | undefined)[]): void => {
    if (!addTree(moments, terms, sources)) moments = null;
  };
  // The tree pool's sums: each stem that counts at a visit, live ((1 + R_v)·AGB) or standing dead (its dead
  // wood), with −1/t at the first visit and +1/t at the second; a tree's terms at both visits together (its
  // model errors the same at both, as for a survivor above).
  const poolTrees = new Map<string, { terms: (MomentTerm | null)[]; sources: (HeightSource | null | undefined)[] }>();
  const addPool = (t: ChangeTree, area: number, coef: number, kg: number | null | undefined = t.agbKg): void => {
    if (!options.carbonMoments) return;
    const x = term(t, area, coef, kg);
    const at = poolTrees.get(t.treeId);
    if (at) {
      at.terms.push(x);
      at.sources.push(t.heightSource);
    } else poolTrees.set(t.treeId, { terms: [x], sources: [t.heightSource] });
  };
  const at1 = checkVisit(fn, 'first', first);
  const at2 = checkVisit(fn, 'second', second);
  const years = yearsBetween(first.surveyDate, second.surveyDate);
  const threshold = Math.max(first.dbhMinCm, second.dbhMinCm);
  const a1 = first.areaHa;
  const a2 = second.areaHa;
  const rf1 = 1 + (first.rootShootRatio ?? 0);
  const rf2 = 1 + (second.rootShootRatio ?? 0);

  let nStart = 0;
  let nSurvivors = 0;
  let nDied = 0;
  let nAbsent = 0;
  let nRemoved = 0;
  let nRecruits = 0;
  let increment = 0;
  let baGrowth = 0;
  let baRecruitment = 0;
  let baLoss = 0;
  let agbGrowth = 0; // kg/ha over the interval until the end
  let agbRecruitment = 0;
  let agbDied = 0;
  let agbRemoved = 0;
  let stock1 = 0; // kg/ha of the N0 trees at the first visit
  let stock2 = 0; // kg/ha of survivors and recruits at the second visit

  for (const t1 of first.trees) {
    if (!counts(t1, threshold)) continue;
    nStart += 1;
    const g1 = basalAreaM2(t1.dbhCm) / a1;
    const b1 = (t1.agbKg as number) / a1;
    stock1 += b1;
    addPool(t1, a1, -rf1 / years);
    const t2 = at2.get(t1.treeId);
    if (t2 !== undefined && t2.status === 'live') {
      nSurvivors += 1;
      increment += t2.dbhCm - t1.dbhCm;
      baGrowth += basalAreaM2(t2.dbhCm) / a2 - g1;
      agbGrowth += (t2.agbKg as number) / a2 - b1;
      stock2 += (t2.agbKg as number) / a2;
      addLive([term(t1, a1, -1 / years), term(t2, a2, 1 / years)], [t1.heightSource, t2.heightSource]);
      addPool(t2, a2, rf2 / years);
    } else if (t2 !== undefined && t2.status === 'stump' && t2.stumpCause === 'logged') {
      nRemoved += 1;
      baLoss += g1;
      agbRemoved += b1;
      addLive([term(t1, a1, -1 / years)], [t1.heightSource]);
    } else {
      nDied += 1;
      if (t2 === undefined) nAbsent += 1;
      baLoss += g1;
      agbDied += b1;
      addLive([term(t1, a1, -1 / years)], [t1.heightSource]);
    }
  }
  for (const t2 of second.trees) {
    if (!counts(t2, threshold)) continue;
    const t1 = at1.get(t2.treeId);
    const recruit = t1 === undefined || (t1.status === 'live' && !counts(t1, threshold));
    if (!recruit) continue;
    nRecruits += 1;
    baRecruitment += basalAreaM2(t2.dbhCm) / a2;
    agbRecruitment += (t2.agbKg as number) / a2;
    stock2 += (t2.agbKg as number) / a2;
    addLive([term(t2, a2, 1 / years)], [t2.heightSource]);
    addPool(t2, a2, rf2 / years);
  }
  const deadStock = (v: ChangeVisit, coef: number): number | null => {
    let kgHa = 0;
    for (const t of v.trees) {
      if (t.status !== 'dead' || t.inSubplot || t.dbhCm < threshold) continue;
      if (t.deadKg === undefined || t.deadKg === null) return null;
      if (!(t.deadKg >= 0) || !Number.isFinite(t.deadKg)) fail(fn, `dead tree ${t.treeId} biomass must be finite and >= 0 (got ${t.deadKg})`);
      kgHa += t.deadKg / v.areaHa;
      addPool(t, v.areaHa, coef, t.deadKg);
    }
    return kgHa;
  };
  const dead1 = deadStock(first, -1 / years);
  const dead2 = deadStock(second, 1 / years);

  const perYearMg = (kgHa: number): number => kgHa / 1000 / years;
  const agbGrowthMgHaYr = perYearMg(agbGrowth);
  const agbRecruitmentMgHaYr = perYearMg(agbRecruitment);
  const agbDiedMgHaYr = perYearMg(agbDied);
  const agbRemovedMgHaYr = perYearMg(agbRemoved);
  const agbLossMgHaYr = agbDiedMgHaYr + agbRemovedMgHaYr;
  const agbNetChangeMgHaYr = agbGrowthMgHaYr + agbRecruitmentMgHaYr - agbLossMgHaYr;
  const baGrowthM2HaYr = baGrowth / years;
  const baRecruitmentM2HaYr = baRecruitment / years;
  const baLossM2HaYr = baLoss / years;
  const nEnd = nSurvivors + nRecruits;
  const r1 = first.rootShootRatio;
  const r2 = second.rootShootRatio;
  const bgbNetChangeMgHaYr = r1 === undefined || r2 === undefined ? null : perYearMg((r2 ?? 0) * stock2 - (r1 ?? 0) * stock1);
  const standingDeadNetChangeMgHaYr = dead1 === null || dead2 === null ? null : perYearMg(dead2 - dead1);
  const treeNet = bgbNetChangeMgHaYr === null || standingDeadNetChangeMgHaYr === null ? null : agbNetChangeMgHaYr + bgbNetChangeMgHaYr + standingDeadNetChangeMgHaYr;
  let treeMoments: TreeChangeMoments | null = null;
  const e1 = first.rootShootError;
  const e2 = second.rootShootError;
  if (options.carbonMoments && treeNet !== null && e1 !== undefined && e2 !== undefined) {
    const builder = new CarbonMomentsBuilder();
    let known = true;
    for (const t of poolTrees.values()) known = known && addTree(builder, t.terms, t.sources);
    // each visit's BGB = R_v·S_v: its row's error multiplies S_v (Mg/ha), with the visit's sign and 1/t
    const built = builder.build();
    // Σu is the same figure summed tree by tree: kept as a check, the figure itself stored, so that the section's sampling values are the summary's to the last bit
    const scale = 1 + (rf1 * stock1 + rf2 * stock2 + (dead1 as number) + (dead2 as number)) / 1000 / years;
    if (known && Math.abs(built.value - treeNet) > 1e-9 * scale) fail(fn, `the tree pool's sums add to ${built.value}, not its net change ${treeNet} (a bug)`);
    if (known) {
      treeMoments = {
        ...built,
        value: treeNet,
        rootShootParts: [
          { ratio: first.rootShootRatio ?? 0, sd: e1.sd, row: e1.row, agb: -stock1 / 1000 / years },
          { ratio: second.rootShootRatio ?? 0, sd: e2.sd, row: e2.row, agb: stock2 / 1000 / years },
        ],
      };
    }
  }
  return {
    years,
    dbhThresholdCm: threshold,
    nStart,
    nSurvivors,
    nDied,
    nAbsent,
    nRemoved,
    nRecruits,
    nEnd,
    mortalityRate: instantaneousMortality(nStart, nSurvivors, years),
    recruitmentRate: instantaneousRecruitment(nEnd, nSurvivors, years),
    mortalityAnnual: annualMortality(nStart, nSurvivors, years),
    recruitmentAnnual: annualRecruitment(nEnd, nRecruits, years),
    dbhIncrementCmYr: nSurvivors > 0 ? increment / nSurvivors / years : null,
    baGrowthM2HaYr,
    baRecruitmentM2HaYr,
    baLossM2HaYr,
    baChangeM2HaYr: baGrowthM2HaYr + baRecruitmentM2HaYr - baLossM2HaYr,
    agbGrowthMgHaYr,
    agbRecruitmentMgHaYr,
    agbDiedMgHaYr,
    agbRemovedMgHaYr,
    agbLossMgHaYr,
    agbNetChangeMgHaYr,
    // carbonFromBiomass takes a stock (>= 0); a change may be negative, so the fraction is applied to its size.
    carbonNetChangeMgHaYr: carbonOfChange(agbNetChangeMgHaYr, carbonFraction),
    bgbNetChangeMgHaYr,
    standingDeadNetChangeMgHaYr,
    treeCarbonNetChangeMgHaYr: treeNet === null ? null : carbonOfChange(treeNet, carbonFraction),
    ...(options.carbonMoments ? { carbonMoments: moments === null ? null : (moments as CarbonMomentsBuilder).build(), treeCarbonMoments: treeMoments } : {}),
  };
}

/** The figures of `export change` after the plot, region and dates, snake_case, in column order (docs/exports.md). */
export const PLOT_CHANGE_COLUMNS = [
  { column: 'years', key: 'years' },
  { column: 'dbh_threshold_cm', key: 'dbhThresholdCm' },
  { column: 'n_start', key: 'nStart' },
  { column: 'n_survivors', key: 'nSurvivors' },
  { column: 'n_died', key: 'nDied' },
  { column: 'n_removed', key: 'nRemoved' },
  { column: 'n_recruits', key: 'nRecruits' },
  { column: 'mortality_rate', key: 'mortalityRate' },
  { column: 'recruitment_rate', key: 'recruitmentRate' },
  { column: 'mortality_annual', key: 'mortalityAnnual' },
  { column: 'recruitment_annual', key: 'recruitmentAnnual' },
  { column: 'dbh_increment_cm_yr', key: 'dbhIncrementCmYr' },
  { column: 'ba_change_m2_ha_yr', key: 'baChangeM2HaYr' },
  { column: 'agb_growth_mg_ha_yr', key: 'agbGrowthMgHaYr' },
  { column: 'agb_recruitment_mg_ha_yr', key: 'agbRecruitmentMgHaYr' },
  { column: 'agb_loss_mg_ha_yr', key: 'agbLossMgHaYr' },
  { column: 'agb_net_change_mg_ha_yr', key: 'agbNetChangeMgHaYr' },
  { column: 'carbon_net_change_mg_ha_yr', key: 'carbonNetChangeMgHaYr' },
  { column: 'n_absent', key: 'nAbsent' },
  { column: 'ba_growth_m2_ha_yr', key: 'baGrowthM2HaYr' },
  { column: 'ba_recruitment_m2_ha_yr', key: 'baRecruitmentM2HaYr' },
  { column: 'ba_loss_m2_ha_yr', key: 'baLossM2HaYr' },
  { column: 'agb_died_mg_ha_yr', key: 'agbDiedMgHaYr' },
  { column: 'agb_removed_mg_ha_yr', key: 'agbRemovedMgHaYr' },
  { column: 'bgb_net_change_mg_ha_yr', key: 'bgbNetChangeMgHaYr' },
  { column: 'standing_dead_net_change_mg_ha_yr', key: 'standingDeadNetChangeMgHaYr' },
  { column: 'tree_carbon_net_change_mg_ha_yr', key: 'treeCarbonNetChangeMgHaYr' },
] as const satisfies readonly { column: string; key: keyof PlotChange }[];
