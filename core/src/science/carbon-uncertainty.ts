// Whole uncertainty of carbon stocks and carbon change: Monte Carlo propagation (IPCC 2006 Guidelines,
// Vol. 1, Ch. 3, approach 2) of the biomass models' errors together with the sampling error of the
// stratified estimate. Method, assumptions and what is not covered: docs/methods.md#carbon-uncertainty.
//
// Two kinds of error, treated apart:
//  - per tree (the allometry's residual, the height model's residual, the tree's wood density around
//    its reference value): independent from tree to tree, so they average out over many trees. Their
//    variance on a stratum mean is known analytically from two sums per plot (Σ w·v², Σ w²·v² by height
//    source, v the tree's value); the Monte Carlo draws that aggregate once per stratum and iteration,
//    never per tree;
//  - shared by many trees: the height model's parameters of a forest type, drawn once per iteration and
//    forest type (a draw changes every modelled tree's biomass nonlinearly; its effect on a plot is taken
//    to second order from five sums per plot, Σ w·v·(ln D)^k, k = 0..4, accuracy tested against the
//    tree-by-tree effect); and, for the tree pool, the root-to-shoot ratio, drawn once per iteration and
//    row of its relation (a table row or the equation): every plot that read the same row shares its error.
// Pools: 'aboveGround' (live trees above ground; also the change of it between visits) and 'trees'
// (CF·((1 + R_p)·AGB_p + dead wood_p), the figure of tree_carbon_mg_ha): each plot carries its own ratio
// R_p, so the sampling part is the stratified estimate of the plot's own tree carbon, and its per-tree
// and height-parameter sums are scaled by (1 + R_p) before the standing dead wood's sums are added.
// A third, 'treesChange' (the figure of tree_carbon_net_change_mg_ha_yr): the pair's sums are built whole
// (change.ts: each visit's live stems with ∓(1 + R_v)/t, its standing dead stems with ∓1/t), and each
// visit's live biomass S_v/t is the figure its ratio's row multiplies (the same row at both visits: one draw).
// The sampling error enters as one draw of SE·T, T Student's t at the sampling interval's df
// (Satterthwaite), by Latin hypercube sampling, so that the sampling-only part of the whole interval
// agrees with the sampling interval to within 1/draws in probability.

import { percentileInterval } from './bootstrap';
import { createRng, type Rng } from './random';
import { stratifiedEstimate, type StratifiedOptions } from './stratified';
import { studentTDensity, studentTQuantile } from './student-t';

/** Exponent of ρD²H in Chave et al. 2014 eq. 4 (AGB ∝ H^0.976 and ρ^0.976). */
export const CHAVE_2014_EXPONENT = 0.976;

/**
 * Residual standard error of Chave et al. 2014 eq. 4 on the ln AGB scale: 0.357 (Chave et al. 2014,
 * Global Change Biology 20:3177–3190; from memory — eq. 6a's 0.243 is the height model's, not this).
 */
export const CHAVE_2014_EQ4_RSE = 0.357;

/**
 * Relative standard deviation of a tree's wood density around the reference value it was given:
 * 0.10, common practice (the order of within-species variation, from memory; no single source). A setting.
 */
export const DEFAULT_WOOD_DENSITY_TREE_SD = 0.1;

/**
 * Monte Carlo draws (a setting): 20 000. The Monte Carlo error of a 2.5 % or 97.5 % quantile of a normal is
 * about sqrt(p(1 − p)/draws)/φ(1.96) ≈ 0.019 SD at 20 000 draws (0.038 SD at 5000), small beside the interval.
 */
export const DEFAULT_CARBON_DRAWS = 20_000;

/** Where a tree's height came from: measured, the local model, or none (the no-height biomass model). */
export type HeightSource = 'measured' | 'modelled' | 'noHeight';
export const HEIGHT_SOURCES: readonly HeightSource[] = ['measured', 'modelled', 'noHeight'];
const SOURCE_INDEX: Readonly<Record<HeightSource, number>> = { measured: 0, modelled: 1, noHeight: 2 };

/**
 * The few sums of one plot (or pair of visits) that the Monte Carlo needs, per hectare. `value` is the
 * plot's figure (Mg/ha, or Mg/ha/yr for change); v is a tree's own value (Mg, or Mg/yr).
 */
export interface CarbonSums {
  /** Σ w·v over trees, the plot's figure. */
  readonly value: number;
  /** Σ w·v² by height source (measured, modelled, noHeight): the per-hectare density of squared tree values. */
  readonly sq: readonly [number, number, number];
  /** Σ w²·v² by height source: the variance of this plot's figure per unit of (e^{σ²} − 1). */
  readonly sqPlot: readonly [number, number, number];
  /** Σ w·v·(ln D)^k, k = 0..4, over modelled-height terms. */
  readonly lnD: readonly [number, number, number, number, number];
}

/** A plot's root-to-shoot ratio R_p, its SD and the row of the relation it came from (root-shoot.ts). */
export interface PlotRootShoot {
  readonly ratio: number;
  readonly sd: number;
  /** Plots of the same row share the row's error (one draw per row and iteration). */
  readonly row: string;
}

/** A live above-ground biomass figure that a root-to-shoot row multiplies (Mg/ha; a change: −S₁/t or +S₂/t, Mg/ha/yr). */
export interface RootShootPart extends PlotRootShoot {
  readonly agb: number;
}

/** The sums of a plot's live above-ground biomass, and what the tree pool adds to them. */
export interface CarbonMoments extends CarbonSums {
  /** The plot's root-to-shoot ratio (the 'trees' pool needs it; absent in sums kept before it was). */
  readonly rootShoot?: PlotRootShoot;
  /** The same sums over the plot's standing dead stems (their biomass × the share a dead stem keeps). */
  readonly deadWood?: CarbonSums;
  /**
   * The 'treesChange' pool: the sums are already of the tree pool's change ((1 + R_v)·AGB_v + dead_v, ∓1/t
   * by visit), and these are the visits' live biomass figures their rows' ratios multiply (TreeChangeMoments).
   */
  readonly rootShootParts?: readonly RootShootPart[];
}

/** The sums of the tree pool's net change of a pair of visits (change.ts), and the figures the visits' ratios multiply. */
export interface TreeChangeMoments extends CarbonSums {
  readonly rootShootParts: readonly RootShootPart[];
}

/**
 * The figure whose uncertainty is propagated: live above-ground biomass (or its change), the tree pool
 * (stock), or the tree pool's change between visits.
 */
export type CarbonPool = 'aboveGround' | 'trees' | 'treesChange';

/** One visit's part of a tree's value: its weight (stems/ha it stands for), sign or 1/years, biomass in Mg and dbh. */
export interface MomentTerm {
  readonly weight: number;
  readonly coef: number;
  readonly agbMg: number;
  readonly dbhCm: number;
  readonly modelled: boolean;
}

/** Builds the sums of one plot, tree by tree (a stock: one term per tree; a change: a survivor has two). */
export class CarbonMomentsBuilder {
  private value = 0;
  private readonly sq: [number, number, number] = [0, 0, 0];
  private readonly sqPlot: [number, number, number] = [0, 0, 0];
  private readonly lnD: [number, number, number, number, number] = [0, 0, 0, 0, 0];

  // u = Σ_j w_j c_j v_j (the tree's per-hectare part); Σu, Σu²/w₁, Σu², Σ_mod w c v L^k — docs/methods.md#carbon-uncertainty
  addTree(source: HeightSource, terms: readonly MomentTerm[]): void {
    const s = SOURCE_INDEX[source];
    if (s === undefined) throw new RangeError(`CarbonMomentsBuilder.addTree: unknown height source ${String(source)}`);
    if (terms.length === 0) return;
    let u = 0;
    for (const t of terms) {
      if (!(t.weight > 0) || !Number.isFinite(t.weight) || !Number.isFinite(t.coef) || !(t.agbMg >= 0) || !(t.dbhCm > 0)) {
        throw new RangeError(`CarbonMomentsBuilder.addTree: weight and dbh must be > 0, biomass >= 0 (got ${t.weight}, ${t.dbhCm}, ${t.agbMg})`);
      }
      const x = t.weight * t.coef * t.agbMg;
      u += x;
      if (t.modelled) {
        const l = Math.log(t.dbhCm);
        let p = x;
        for (let k = 0; k < 5; k += 1) {
          this.lnD[k] += p;
          p *= l;
        }
      }
    }
    this.value += u;
    this.sq[s] += (u * u) / terms[0].weight;
    this.sqPlot[s] += u * u;
  }

  build(): CarbonSums {
    return { value: this.value, sq: [...this.sq], sqPlot: [...this.sqPlot], lnD: [...this.lnD] };
  }
}

/** A forest type's height model as the Monte Carlo needs it: residual SE (ln H) and the covariance of (a, b, c). */
export interface HeightModelError {
  readonly rse: number;
  /** 3 × 3 covariance of (a, b, c), row-major; null: parameter uncertainty unknown (not drawn). */
  readonly covariance: readonly number[] | null;
}

export interface CarbonStratum {
  readonly name: string;
  /** Key of the height model this stratum's trees use. */
  readonly forestType: string;
  /** Forest area in ha; null when unknown. */
  readonly size: number | null;
  readonly plots: readonly CarbonMoments[];
}

export interface CarbonUncertaintySettings {
  /** Monte Carlo draws (default DEFAULT_CARBON_DRAWS = 20 000; at least 100). */
  readonly draws?: number;
  /** Seed of the generator (same inputs and seed, same intervals). Default 1. */
  readonly seed?: number;
  /** Confidence of both intervals (default 0.95). */
  readonly confidence?: number;
  /** Carbon fraction of biomass (default 0.47, IPCC 2006 Vol. 4 Table 4.3). */
  readonly carbonFraction?: number;
  /** ln-scale residual SE of the biomass model with height (default CHAVE_2014_EQ4_RSE). */
  readonly allometryRse?: number;
  /** ln-scale residual SE of the no-height biomass models (default: the same as allometryRse; see docs). */
  readonly allometryRseNoHeight?: number;
  /** Relative SD of a tree's wood density around its reference value (default 0.10, common practice). */
  readonly woodDensityTreeSd?: number;
  /**
   * Over which trees the per-tree errors average out: 'forest' (every tree of the stratum's forest area,
   * the default where the area is known) or 'plots' (the measured trees only: larger, used where the
   * area is unknown).
   */
  readonly treeErrorScope?: 'forest' | 'plots';
  /** Height models by forest type; a type without one has no modelled heights. */
  readonly heightModels?: ReadonlyMap<string, HeightModelError>;
  /**
   * 'aboveGround' (default): CF × the plots' values. 'trees': CF × ((1 + R_p) × value + standing dead
   * wood), every plot carrying `rootShoot` and `deadWood`. 'treesChange': CF × the values (already of
   * the tree pool's change), every pair carrying `rootShootParts`.
   */
  readonly pool?: CarbonPool;
  /** Options of the stratified estimator (df, weighting, fpc) — those of the sampling interval beside it. */
  readonly stratified?: Omit<StratifiedOptions, 'confidence'>;
}

export const CARBON_ERROR_SOURCES = ['sampling', 'allometry', 'heightResidual', 'woodDensity', 'heightParameters', 'rootShoot'] as const;
export type CarbonErrorSource = (typeof CARBON_ERROR_SOURCES)[number];

export interface CarbonInterval {
  readonly low: number;
  readonly high: number;
}

export interface CarbonUncertainty {
  readonly n: number;
  /** Per-hectare estimate (Mg C/ha, or Mg C/ha/yr): the stratified mean of the plots' carbon figures. */
  readonly mean: number;
  /** Total over the forest area (Mg C, or Mg C/yr); null unless every stratum's area is known. */
  readonly total: number | null;
  readonly area: number | null;
  /** The stratified estimator's t interval and SE (sampling error only). */
  readonly samplingSe: number;
  readonly sampling: CarbonInterval;
  /**
   * Percentile interval of the Monte Carlo draws (every source) and their SD. Never inside the sampling
   * interval: a bound the draws put inside it (Monte Carlo noise, where the model errors are negligible
   * beside the sampling error) is the sampling interval's.
   */
  readonly wholeSe: number;
  readonly whole: CarbonInterval;
  /** Mean of the draws (differs from `mean` by Monte Carlo error and the second-order height-parameter term). */
  readonly drawsMean: number;
  /** Share of each source's variance in the sum of the sources' variances (0..1, summing to 1). */
  readonly shares: Readonly<Record<CarbonErrorSource, number>>;
  readonly draws: number;
  readonly seed: number;
  readonly confidence: number;
  /** How the per-tree errors were scoped (see treeErrorScope). */
  readonly treeErrorScope: 'forest' | 'plots';
}

function fail(message: string): never {
  throw new RangeError(`carbonUncertainty: ${message}`);
}

// Standard normal by Box–Muller (Box & Muller 1958, Ann. Math. Stat. 29:610–611), both values used.
export function normalSampler(rng: Rng): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    let u = rng.next();
    while (u === 0) u = rng.next();
    const r = Math.sqrt(-2 * Math.log(u));
    const a = 2 * Math.PI * rng.next();
    spare = r * Math.sin(a);
    return r * Math.cos(a);
  };
}

// Lower Cholesky factor L (LLᵀ = Σ) of a 3 × 3 covariance, row-major; semidefinite pivots become 0 (Golub & Van Loan, Matrix Computations, Cholesky algorithm)
export function cholesky3(cov: readonly number[], fn: string): number[] {
  if (cov.length !== 9 || cov.some((x) => !Number.isFinite(x))) throw new RangeError(`${fn}: a covariance must be 9 finite numbers`);
  const l = [0, 0, 0, 0, 0, 0, 0, 0, 0];
  for (let i = 0; i < 3; i += 1) {
    for (let j = 0; j <= i; j += 1) {
      let s = cov[i * 3 + j];
      for (let k = 0; k < j; k += 1) s -= l[i * 3 + k] * l[j * 3 + k];
      if (i === j) {
        if (s < -1e-12 * Math.max(1, Math.abs(cov[i * 3 + i]))) throw new RangeError(`${fn}: the covariance is not positive semidefinite`);
        l[i * 3 + i] = s > 0 ? Math.sqrt(s) : 0;
      } else l[i * 3 + j] = l[j * 3 + j] > 0 ? s / l[j * 3 + j] : 0;
    }
  }
  return l;
}

// Σ_i w v_i (e^{β x_i} − 1), x = δa + δb L + δc L², to second order: β Σ wvx + β²/2 Σ wvx², from Σ w v L^k (k = 0..4)
export function heightShiftEffect(lnD: ArrayLike<number>, delta: ArrayLike<number>, beta: number = CHAVE_2014_EXPONENT): number {
  const a = delta[0];
  const b = delta[1];
  const c = delta[2];
  const first = a * lnD[0] + b * lnD[1] + c * lnD[2];
  const second = a * a * lnD[0] + 2 * a * b * lnD[1] + (b * b + 2 * a * c) * lnD[2] + 2 * b * c * lnD[3] + c * c * lnD[4];
  return beta * first + 0.5 * beta * beta * second;
}

/** Knots of the interpolants of the t quantile: 128 intervals of p on [0.05, 0.5], 64 of ln p on [ln 1e-4, ln 0.05]. */
const LHS_CENTRE = { from: 0.05, knots: 128 } as const;
const LHS_TAIL = { from: 1e-4, knots: 64 } as const;

// Cubic Hermite interpolant of y(x) on equally spaced knots x₀ + k·h with values y_k and slopes y'_k (Burden & Faires, Numerical Analysis, §3.4)
function hermite(x0: number, h: number, y: Float64Array, dy: Float64Array): (x: number) => number {
  const last = y.length - 2;
  return (x: number): number => {
    const at = (x - x0) / h;
    const k = Math.max(0, Math.min(last, Math.floor(at)));
    const s = at - k;
    const s2 = s * s;
    const s3 = s2 * s;
    return (2 * s3 - 3 * s2 + 1) * y[k] + (s3 - 2 * s2 + s) * h * dy[k] + (-2 * s3 + 3 * s2) * y[k + 1] + (s3 - s2) * h * dy[k + 1];
  };
}

// Latin hypercube sample of Student's t (McKay, Beckman & Conover 1979, Technometrics 21:239–245): t_i = F⁻¹((π(i) + U_i)/n; ν), π a random permutation
// F⁻¹(p) = −F⁻¹(1 − p); for p in [0.05, 0.5] cubic Hermite in p (slopes 1/f), in [1e-4, 0.05] in ln p (slopes p/f), exact below (error < 1e-6, tested)
export function latinHypercubeT(rng: Rng, n: number, df: number): Float64Array {
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`latinHypercubeT: n must be a positive integer (got ${n})`);
  if (!(df > 0) || !Number.isFinite(df)) throw new RangeError(`latinHypercubeT: degrees of freedom must be positive and finite, got ${df}`);
  const grid = (knots: number, at: (k: number) => number, slope: (p: number, q: number) => number): [Float64Array, Float64Array] => {
    const q = new Float64Array(knots + 1);
    const dq = new Float64Array(knots + 1);
    for (let k = 0; k <= knots; k += 1) {
      const p = at(k);
      q[k] = studentTQuantile(p, df);
      dq[k] = slope(p, q[k]);
    }
    return [q, dq];
  };
  const hc = (0.5 - LHS_CENTRE.from) / LHS_CENTRE.knots;
  const centre = hermite(LHS_CENTRE.from, hc, ...grid(LHS_CENTRE.knots, (k) => LHS_CENTRE.from + k * hc, (_p, q) => 1 / studentTDensity(q, df)));
  const l0 = Math.log(LHS_TAIL.from);
  const ht = (Math.log(LHS_CENTRE.from) - l0) / LHS_TAIL.knots;
  const tail = hermite(l0, ht, ...grid(LHS_TAIL.knots, (k) => Math.exp(l0 + k * ht), (p, q) => p / studentTDensity(q, df)));
  const lower = (p: number): number => (p >= LHS_CENTRE.from ? centre(p) : p >= LHS_TAIL.from ? tail(Math.log(p)) : studentTQuantile(p, df));
  const quantile = (p: number): number => (p <= 0.5 ? lower(p) : -lower(1 - p));
  const out = new Float64Array(n);
  for (let i = 0; i < n; i += 1) {
    let u = rng.next();
    while (u === 0) u = rng.next();
    out[i] = quantile((i + u) / n);
  }
  // Fisher–Yates shuffle (Knuth, TAOCP vol. 2, Algorithm P): the strata in random order
  for (let i = n - 1; i > 0; i -= 1) {
    const j = rng.int(i + 1);
    const x = out[i];
    out[i] = out[j];
    out[j] = x;
  }
  return out;
}

interface StratumPlan {
  readonly weight: number;
  readonly forestType: string;
  /** SD of the stratum mean (biomass) from each per-tree source: allometry, height residual, wood density. */
  readonly treeSd: readonly [number, number, number];
  readonly lnD: readonly number[];
  /** Per root-to-shoot row: the stratum mean of sd_p · value_p (biomass), and the draw below which R_p would turn negative. */
  readonly rootShoot: ReadonlyMap<string, { readonly effect: number; readonly zMin: number }>;
}

// Var of a stratum mean from per-tree errors: Σ_s (e^{σ_s²} − 1) · (mean Σ w v² / A_h  or  Σ_plots Σ w² v² / n_h²), split by source in proportion to e^{σ²} − 1
function treeErrorSds(
  plots: readonly CarbonSums[],
  area: number | null,
  scope: 'forest' | 'plots',
  logVars: readonly (readonly [number, number, number])[],
): [number, number, number] {
  const n = plots.length;
  const out: [number, number, number] = [0, 0, 0];
  for (let s = 0; s < 3; s += 1) {
    let sum = 0;
    for (const p of plots) sum += scope === 'forest' ? p.sq[s] : p.sqPlot[s];
    const density = scope === 'forest' ? sum / n / (area as number) : sum / (n * n);
    const parts = logVars[s];
    const whole = Math.expm1(parts[0] + parts[1] + parts[2]);
    const sumParts = Math.expm1(parts[0]) + Math.expm1(parts[1]) + Math.expm1(parts[2]);
    for (let k = 0; k < 3; k += 1) if (sumParts > 0) out[k] += (density * whole * Math.expm1(parts[k])) / sumParts;
  }
  return [Math.sqrt(out[0]), Math.sqrt(out[1]), Math.sqrt(out[2])];
}

const isSums = (x: unknown): x is CarbonSums => {
  if (typeof x !== 'object' || x === null) return false;
  const m = x as Record<string, unknown>;
  const arr = (v: unknown, n: number): boolean => Array.isArray(v) && v.length === n && v.every((e) => typeof e === 'number' && Number.isFinite(e));
  return typeof m.value === 'number' && Number.isFinite(m.value) && arr(m.sq, 3) && arr(m.sqPlot, 3) && arr(m.lnD, 5);
};

const isRootShoot = (x: unknown): x is PlotRootShoot => {
  const r = x as Record<string, unknown> | null | undefined;
  return typeof r === 'object' && r !== null && typeof r.row === 'string' && typeof r.ratio === 'number' && typeof r.sd === 'number' && r.ratio >= 0 && r.sd >= 0 && Number.isFinite(r.ratio) && Number.isFinite(r.sd);
};

/**
 * Whether a stored value holds the sums of a plot, for the 'trees' pool also its ratio and dead-wood sums,
 * for 'treesChange' the parts its rows' ratios multiply.
 */
export function hasCarbonSums(x: unknown, pool: CarbonPool = 'aboveGround'): x is CarbonMoments {
  if (!isSums(x)) return false;
  if (pool === 'aboveGround') return true;
  const m = x as CarbonMoments;
  if (pool === 'treesChange') {
    const parts = m.rootShootParts as unknown;
    return Array.isArray(parts) && parts.every((r) => isRootShoot(r) && typeof (r as RootShootPart).agb === 'number' && Number.isFinite((r as RootShootPart).agb));
  }
  return isRootShoot(m.rootShoot) && isSums(m.deadWood);
}

// The figures a plot's root-to-shoot rows multiply: a stock's live biomass by its one ratio, a change's by each visit's
function rootShootParts(p: CarbonMoments, pool: CarbonPool): readonly RootShootPart[] {
  if (pool === 'trees') return [{ ...(p.rootShoot as PlotRootShoot), agb: p.value }];
  return pool === 'treesChange' ? (p.rootShootParts as readonly RootShootPart[]) : [];
}

// The tree pool's sums of a plot, in biomass: (1 + R_p)·v + dead, (1 + R_p)²·Σwv² + dead's, (1 + R_p)·Σwv(ln D)^k + dead's (distinct trees: squares add)
function poolSums(p: CarbonMoments, pool: CarbonPool): CarbonSums {
  if (pool !== 'trees') return p; // a tree-pool change's sums are built whole (change.ts)
  const g = 1 + (p.rootShoot as PlotRootShoot).ratio;
  const d = p.deadWood as CarbonSums;
  const add = <T extends readonly number[]>(a: T, b: T, f: number): T => a.map((x, i) => f * x + b[i]) as unknown as T;
  return { value: g * p.value + d.value, sq: add(p.sq, d.sq, g * g), sqPlot: add(p.sqPlot, d.sqPlot, g * g), lnD: add(p.lnD, d.lnD, g) };
}

// Monte Carlo (IPCC 2006 Vol. 1 Ch. 3, approach 2) of Σ W_h ȳ_h, y = CF·value (or CF·((1+R_p)·value + dead)), with sampling, per-tree and shared model errors — docs/methods.md#carbon-uncertainty
export function carbonUncertainty(strata: readonly CarbonStratum[], settings: CarbonUncertaintySettings = {}): CarbonUncertainty | null {
  const draws = settings.draws ?? DEFAULT_CARBON_DRAWS;
  const seed = settings.seed ?? 1;
  const confidence = settings.confidence ?? 0.95;
  const cf = settings.carbonFraction ?? 0.47;
  const rseA = settings.allometryRse ?? CHAVE_2014_EQ4_RSE;
  const rseA0 = settings.allometryRseNoHeight ?? rseA;
  const wdSd = settings.woodDensityTreeSd ?? DEFAULT_WOOD_DENSITY_TREE_SD;
  const pool = settings.pool ?? 'aboveGround';
  if (!Number.isInteger(draws) || draws < 100) fail(`draws must be an integer >= 100 (got ${draws})`);
  if (!Number.isFinite(seed)) fail(`seed must be a finite number (got ${seed})`);
  if (!(confidence > 0 && confidence < 1)) fail(`confidence must be in (0, 1) (got ${confidence})`);
  if (!(cf > 0 && cf <= 1)) fail(`carbon fraction must be in (0, 1] (got ${cf})`);
  if (pool !== 'aboveGround' && pool !== 'trees' && pool !== 'treesChange') fail(`pool must be 'aboveGround', 'trees' or 'treesChange' (got ${String(pool)})`);
  for (const [name, v] of [['allometryRse', rseA], ['allometryRseNoHeight', rseA0], ['woodDensityTreeSd', wdSd]] as const) {
    if (!(v >= 0) || !Number.isFinite(v)) fail(`${name} must be finite and >= 0 (got ${v})`);
  }
  if (pool === 'trees') {
    for (const s of strata) {
      if (s.plots.some((p) => !hasCarbonSums(p, 'trees'))) fail(`the 'trees' pool needs every plot's root-to-shoot ratio (ratio and sd >= 0, row) and dead-wood sums (stratum ${s.name})`);
    }
  }
  if (pool === 'treesChange') {
    for (const s of strata) {
      if (s.plots.some((p) => !hasCarbonSums(p, 'treesChange'))) fail(`the 'treesChange' pool needs every pair's root-to-shoot parts (ratio and sd >= 0, row, finite biomass) (stratum ${s.name})`);
    }
  }
  const used = strata.filter((s) => s.plots.length > 0);
  if (used.length === 0) return null;
  const scope = settings.treeErrorScope ?? (used.every((s) => s.size !== null && s.size > 0) ? 'forest' : 'plots');
  if (scope === 'forest' && used.some((s) => !(s.size !== null && s.size > 0))) fail("treeErrorScope 'forest' needs every stratum's forest area");

  const heightModels = settings.heightModels ?? new Map<string, HeightModelError>();
  const sums = used.map((s) => s.plots.map((p) => poolSums(p, pool)));
  // The sampling interval is the stratified estimator's on the plots' carbon figures themselves.
  const est = stratifiedEstimate(
    used.map((s, h) => ({ name: s.name, size: s.size, values: sums[h].map((p) => cf * p.value) })),
    { ...settings.stratified, confidence },
  );
  if (est.mean === null || est.se === null || est.df === null || est.ciLow === null || est.ciHigh === null) return null;
  const plans: StratumPlan[] = used.map((s, h) => {
    const hm = heightModels.get(s.forestType);
    const bw = CHAVE_2014_EXPONENT * wdSd;
    // Per-tree log variances by height source: (allometry, height residual, wood density).
    const logVars: [number, number, number][] = [
      [rseA * rseA, 0, bw * bw],
      [rseA * rseA, hm ? (CHAVE_2014_EXPONENT * hm.rse) ** 2 : 0, bw * bw],
      [rseA0 * rseA0, 0, wdSd * wdSd], // the no-height models are linear in ρ
    ];
    const rootShoot = new Map<string, { effect: number; zMin: number }>();
    for (const p of s.plots) {
      for (const r of rootShootParts(p, pool)) {
        if (!(r.sd > 0)) continue;
        const at = rootShoot.get(r.row) ?? { effect: 0, zMin: -Infinity };
        // R + sd·z >= 0 (a negative ratio has no meaning): z >= −R/sd, the same for every plot of a row (R/sd fixed per row);
        // a change's two visits on one row share its z, so their parts add (sd₂·S₂ − sd₁·S₁)/t
        rootShoot.set(r.row, { effect: at.effect + (r.sd * r.agb) / s.plots.length, zMin: Math.max(at.zMin, -r.ratio / r.sd) });
      }
    }
    return {
      weight: est.strata[h].weight as number,
      forestType: s.forestType,
      treeSd: treeErrorSds(sums[h], s.size, scope, logVars),
      lnD: [0, 1, 2, 3, 4].map((k) => sums[h].reduce((acc, p) => acc + p.lnD[k], 0) / sums[h].length),
      rootShoot,
    };
  });

  // Height models by forest type, root-to-shoot rows by name, each in a fixed (sorted) order, so the
  // stream of draws does not depend on the input order. Everything a draw needs is linear in the strata
  // that share a draw, so the strata are summed first and a draw costs a few normals per forest type and row.
  const types = [...new Set(plans.map((p) => p.forestType))].sort();
  const typeIndex = new Map(types.map((t, i) => [t, i]));
  const chol = types.map((t) => {
    const cov = heightModels.get(t)?.covariance ?? null;
    return cov === null ? null : cholesky3(cov, 'carbonUncertainty');
  });
  const rows = [...new Set(plans.flatMap((p) => [...p.rootShoot.keys()]))].sort();
  const rowEffect = new Float64Array(rows.length);
  const rowZMin = new Float64Array(rows.length).fill(-Infinity);
  const lnDSum = types.map(() => new Float64Array(5));
  // Variance of the per-tree part by source, in carbon: Σ_h (CF W_h sd_{h,k})².
  const sourceVar = [0, 0, 0];
  for (const p of plans) {
    const t = typeIndex.get(p.forestType) as number;
    for (let k = 0; k < 3; k += 1) sourceVar[k] += (cf * p.weight * p.treeSd[k]) ** 2;
    for (let k = 0; k < 5; k += 1) lnDSum[t][k] += p.weight * p.lnD[k];
    rows.forEach((row, j) => {
      const r = p.rootShoot.get(row);
      if (r === undefined) return;
      rowEffect[j] += cf * p.weight * r.effect;
      rowZMin[j] = Math.max(rowZMin[j], r.zMin);
    });
  }
  const treeSd = Math.sqrt(sourceVar[0] + sourceVar[1] + sourceVar[2]);

  const rng = createRng(seed);
  const sampling = latinHypercubeT(rng, draws, est.df);
  for (let i = 0; i < draws; i += 1) sampling[i] *= est.se;
  const normal = normalSampler(rng);
  const totalDraws = new Float64Array(draws);
  // Parts of each draw besides sampling: per-tree errors together, height parameters, root-to-shoot ratios.
  const parts = [new Float64Array(draws), new Float64Array(draws), new Float64Array(draws)];
  const delta = new Float64Array(3);
  for (let i = 0; i < draws; i += 1) {
    let height = 0;
    for (let t = 0; t < types.length; t += 1) {
      const l = chol[t];
      if (l === null) continue;
      const z0 = normal();
      const z1 = normal();
      const z2 = normal();
      delta[0] = l[0] * z0;
      delta[1] = l[3] * z0 + l[4] * z1;
      delta[2] = l[6] * z0 + l[7] * z1 + l[8] * z2;
      height += cf * heightShiftEffect(lnDSum[t], delta);
    }
    let root = 0;
    for (let j = 0; j < rows.length; j += 1) {
      const z = normal();
      root += rowEffect[j] * (z > rowZMin[j] ? z : rowZMin[j]); // a ratio below 0 has no meaning: truncated at 0
    }
    const tree = treeSd > 0 ? treeSd * normal() : 0;
    totalDraws[i] = est.mean + sampling[i] + tree + height + root;
    parts[0][i] = tree;
    parts[1][i] = height;
    parts[2][i] = root;
  }

  const variance = (x: Float64Array): number => {
    let m = 0;
    for (const v of x) m += v;
    m /= x.length;
    let s = 0;
    for (const v of x) s += (v - m) * (v - m);
    return s / (x.length - 1);
  };
  // The per-tree part is one normal; its variance is split among its three sources by their known variances.
  const vSampling = variance(sampling);
  const [vTree, vHeight, vRoot] = parts.map(variance);
  const sourceVarSum = sourceVar[0] + sourceVar[1] + sourceVar[2];
  const split = (k: number): number => (sourceVarSum > 0 ? (vTree * sourceVar[k]) / sourceVarSum : 0);
  const vars: Record<CarbonErrorSource, number> = { sampling: vSampling, allometry: split(0), heightResidual: split(1), woodDensity: split(2), heightParameters: vHeight, rootShoot: vRoot };
  const sumVars = vSampling + vTree + vHeight + vRoot;
  const shares = Object.fromEntries(CARBON_ERROR_SOURCES.map((k) => [k, sumVars > 0 ? vars[k] / sumVars : 0])) as Record<CarbonErrorSource, number>;
  const interval = percentileInterval(totalDraws, 1 - confidence);
  let drawsMean = 0;
  for (const v of totalDraws) drawsMean += v;
  drawsMean /= draws;

  const area = est.size;
  return {
    n: est.n,
    mean: est.mean,
    total: area === null ? null : est.mean * area,
    area,
    samplingSe: est.se,
    sampling: { low: est.ciLow, high: est.ciHigh },
    wholeSe: Math.sqrt(variance(totalDraws)),
    // Never inside the sampling interval (see CarbonUncertainty.whole).
    whole: { low: Math.min(interval.low, est.ciLow), high: Math.max(interval.high, est.ciHigh) },
    drawsMean,
    shares,
    draws,
    seed,
    confidence,
    treeErrorScope: scope,
  };
}

/** The interval of a total: the per-hectare interval times the forest area. */
export function scaleInterval(i: CarbonInterval, area: number): CarbonInterval {
  return { low: i.low * area, high: i.high * area };
}
