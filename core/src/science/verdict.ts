// Does tree diversity peak at intermediate disturbance? One forest type's plots in, a fitted
// straight line and parabola, the hump tests and a plain verdict out.
// Rules, sources and check values: docs/methods.md#verdict-rules.
//
// HOW THE VERDICT IS REACHED (for readers who are not statisticians)
// Each plot gives one point: x = its disturbance (or another chosen column), y = its diversity.
// We fit two curves through the points: a straight line, and a parabola (a curve that can bend once).
//  - "hump" (diversity highest at intermediate disturbance) is claimed only when ALL of these hold:
//     1. the parabola describes the data better than the line, after the penalty for its extra
//        parameter (lower AICc, a standard score for comparing models);
//     2. the parabola bends downwards, and the bend is statistically clear (its curvature b2 is
//        negative with p < alpha, 0.05 unless set otherwise);
//     3. the top of the parabola lies inside the range of disturbance actually observed
//        (Mitchell-Olds & Shaw test) — a parabola whose top lies outside the data only says the
//        curve flattens, not that it turns;
//     4. splitting the data near the top into two straight lines, the first line rises and the
//        second falls, each clearly (p < alpha, with standard errors that tolerate unequal
//        scatter): the "two-lines" test of Simonsohn (2018). This guards against the well-known
//        trap that a parabola fitted to a curve that merely levels off looks like a hump.
//  - "u_shape" is the mirror: lowest diversity at intermediate disturbance, same four checks.
//  - Otherwise, "increasing" or "decreasing" when the straight line's slope is clearly different
//    from zero (p < alpha), by its sign.
//  - Otherwise "none": the data do not show a clear relation. This is a common, honest answer.
// With fewer than MIN_POINTS plots (10), no verdict is attempted ("none", with the reason).
// Degenerate data never throw: when the data cannot answer at all (too few plots, the metric or x the
// same everywhere, no model fits) the result is "none" with `untestable` set to the reason; a single
// test that cannot be run (no residual scatter, too few distinct x on a side, a singular design) says
// why in its own `reason` and does not pass.
// The peak (or trough) position is reported only with a hump or U verdict, with a 95 % interval
// (delta method; a bootstrap interval from resampled plots is given beside it). A verdict is a
// statistical summary of survey plots, not proof of cause: other differences between the plots
// (soil, altitude, history) can produce or hide a pattern.
import { bootstrapVertexInterval, type VertexBootstrap } from './hump-bootstrap';
import {
  lindMehlumTest,
  mitchellOldsShawTest,
  vertexDeltaInterval,
  vertexFiellerInterval,
  type CurveShape,
  type LindMehlumResult,
  type MitchellOldsShawResult,
} from './hump';
import { twoLinesTest, type TwoLinesResult } from './hump-two-lines';
import { fitPolynomial, RegressionError, type PolynomialFit } from './regression';

/** Fewer plots than this get verdict `none` (common practice; a parabola and its tests need room). */
export const MIN_POINTS = 10;
/** Default number of bootstrap resamples for the peak interval (common practice for percentile intervals). */
export const DEFAULT_BOOTSTRAP_N = 1000;
/** Default seed of the resampling generator, so a result is reproducible. */
export const DEFAULT_SEED = 1;

export type Verdict = 'hump' | 'increasing' | 'decreasing' | 'u_shape' | 'none';

export interface CurveOptions {
  /** Significance level of every test. Default 0.05. */
  readonly alpha?: number;
  /** Bootstrap resamples for the peak interval; 0 skips the bootstrap. Default DEFAULT_BOOTSTRAP_N (1000). */
  readonly bootstrapN?: number;
  /** Seed of the resampling generator. Default DEFAULT_SEED (1). */
  readonly seed?: number;
}

export interface ModelFit {
  readonly model: 'linear' | 'quadratic';
  readonly n: number;
  readonly df: number;
  readonly b0: number;
  readonly b1: number;
  readonly b2: number | null;
  readonly seB0: number;
  readonly seB1: number;
  readonly seB2: number | null;
  readonly pB1: number;
  readonly pB2: number | null;
  readonly r2: number;
  readonly adjR2: number;
  readonly residualSd: number;
  readonly logLik: number;
  readonly aic: number;
  readonly aicc: number | null;
  /** The full fit, for predictions and confidence bands. */
  readonly fit: PolynomialFit;
}

export interface PeakEstimate {
  /** The turning point: the maximum for a hump, the minimum for a U. */
  readonly x: number;
  readonly se: number;
  /** 1 − alpha interval by the delta method (the `peak_ci_*` columns). */
  readonly ciLow: number;
  readonly ciHigh: number;
  readonly method: 'delta';
  /** Fieller interval, for comparison (it does not assume the vertex estimate is normal). */
  readonly fiellerLow: number | null;
  readonly fiellerHigh: number | null;
  /** Percentile bootstrap interval; null when skipped or unbounded. */
  readonly bootstrapLow: number | null;
  readonly bootstrapHigh: number | null;
  readonly bootstrapReplicates: number;
}

export interface CurveTests {
  /** The turn that was tested, from the sign of the quadratic term; null without a quadratic fit. */
  readonly shape: CurveShape | null;
  /** AICc(linear) − AICc(quadratic); positive favours the parabola. */
  readonly deltaAicc: number | null;
  readonly quadraticPreferred: boolean;
  readonly mitchellOldsShaw: MitchellOldsShawResult | null;
  readonly twoLines: TwoLinesResult | null;
  readonly lindMehlum: LindMehlumResult | null;
  readonly bootstrap: VertexBootstrap | null;
}

export interface CurveResult {
  readonly n: number;
  readonly alpha: number;
  readonly xMin: number | null;
  readonly xMax: number | null;
  readonly linear: ModelFit | null;
  readonly quadratic: ModelFit | null;
  readonly peak: PeakEstimate | null;
  readonly tests: CurveTests;
  readonly verdict: Verdict;
  readonly reasons: readonly string[];
  /**
   * Why the data cannot answer the question at all (too few plots, the metric or x the same on every
   * plot, no model could be fitted); the verdict is then `none`. null when the shape was judged.
   */
  readonly untestable: string | null;
}

export interface CurvePoint {
  readonly x: number;
  readonly y: number;
}

// The export-facing summary of a polynomial fit (b2, its SE and p only for the parabola).
function toModelFit(fit: PolynomialFit): ModelFit {
  const quadratic = fit.degree === 2;
  return {
    model: quadratic ? 'quadratic' : 'linear',
    n: fit.n,
    df: fit.df,
    b0: fit.coefficients[0],
    b1: fit.coefficients[1],
    b2: quadratic ? fit.coefficients[2] : null,
    seB0: fit.standardErrors[0],
    seB1: fit.standardErrors[1],
    seB2: quadratic ? fit.standardErrors[2] : null,
    pB1: fit.pValues[1],
    pB2: quadratic ? fit.pValues[2] : null,
    r2: fit.r2,
    adjR2: fit.adjR2,
    residualSd: fit.residualSd,
    logLik: fit.logLik,
    aic: fit.aic,
    aicc: fit.aicc,
    fit,
  };
}

// Short numbers for the human-readable reasons; the fit results themselves keep full precision.
const fmt = (v: number): string => (Math.abs(v) >= 1e-3 && Math.abs(v) < 1e5 ? v.toPrecision(3) : v.toExponential(2));
const fmtP = (p: number): string => (p < 0.001 ? 'p < 0.001' : `p = ${p.toFixed(3)}`);

// Linear and quadratic least-squares fits of y on x, hump tests (Mitchell-Olds & Shaw 1987; Simonsohn 2018; Lind & Mehlum 2010) and the verdict rules above.
export function fitCurves(points: readonly CurvePoint[], options: CurveOptions = {}): CurveResult {
  const fn = 'fitCurves';
  const alpha = options.alpha ?? 0.05;
  const bootstrapN = options.bootstrapN ?? DEFAULT_BOOTSTRAP_N;
  const seed = options.seed ?? DEFAULT_SEED;
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`${fn}: alpha must be in (0, 1), got ${alpha}`);
  if (!Number.isInteger(bootstrapN) || bootstrapN < 0) throw new RangeError(`${fn}: bootstrapN must be a non-negative integer, got ${bootstrapN}`);
  points.forEach((pt, i) => {
    if (!Number.isFinite(pt.x) || !Number.isFinite(pt.y)) {
      throw new RangeError(`${fn}: point ${i} is not a pair of finite numbers (x=${pt.x}, y=${pt.y}); drop or fix it before fitting`);
    }
  });
  const n = points.length;
  const x = points.map((p) => p.x);
  const y = points.map((p) => p.y);
  // a loop, not Math.min(...x): spreading 100k+ arguments overflows the call stack
  let xMin: number | null = null;
  let xMax: number | null = null;
  for (const v of x) {
    if (xMin === null || v < xMin) xMin = v;
    if (xMax === null || v > xMax) xMax = v;
  }
  const reasons: string[] = [];
  const noTests: CurveTests = {
    shape: null,
    deltaAicc: null,
    quadraticPreferred: false,
    mitchellOldsShaw: null,
    twoLines: null,
    lindMehlum: null,
    bootstrap: null,
  };
  const result = (parts: Partial<CurveResult> & { verdict: Verdict }): CurveResult => ({
    n,
    alpha,
    xMin,
    xMax,
    linear: null,
    quadratic: null,
    peak: null,
    tests: noTests,
    reasons,
    untestable: null,
    ...parts,
  });
  const untestable = (reason: string, parts: Partial<CurveResult> = {}): CurveResult => {
    reasons.push(reason);
    return result({ ...parts, verdict: 'none', untestable: reason });
  };

  if (n < MIN_POINTS) return untestable(`only ${n} plots; at least ${MIN_POINTS} are needed to judge the shape of the curve`);
  if (y.every((v) => v === y[0])) return untestable('the metric has the same value on every plot, so it cannot vary with x');
  const distinct = new Set(x).size;
  if (distinct < 2) return untestable('x has the same value on every plot, so no slope can be estimated');

  const tryFit = (degree: 1 | 2, label: string): ModelFit | null => {
    try {
      return toModelFit(fitPolynomial(x, y, degree));
    } catch (e) {
      if (!(e instanceof RegressionError)) throw e;
      reasons.push(`the ${label} could not be fitted: ${e.message}`);
      return null;
    }
  };
  const linear = tryFit(1, 'straight line');
  const quadratic = distinct >= 3 ? tryFit(2, 'parabola') : null;
  if (distinct < 3) reasons.push('x has only 2 distinct values, so no curvature can be estimated');

  const linearVerdict = (): Verdict => {
    if (!linear) return 'none';
    if (linear.pB1 < alpha) {
      const dir = linear.b1 > 0 ? 'increasing' : 'decreasing';
      reasons.push(`the straight line's slope is ${fmt(linear.b1)} (${fmtP(linear.pB1)} < ${alpha}): ${dir}`);
      return dir;
    }
    reasons.push(`the straight line's slope is not significant (${fmtP(linear.pB1)} ≥ ${alpha})`);
    return 'none';
  };

  if (!linear && !quadratic) return untestable('neither the straight line nor the parabola could be fitted (see the reasons above)');
  if (!quadratic || xMin === null || xMax === null) {
    return result({ linear, verdict: linearVerdict() });
  }

  const shape: CurveShape = (quadratic.b2 as number) < 0 ? 'hump' : 'u_shape';
  const deltaAicc = linear && linear.aicc !== null && quadratic.aicc !== null ? linear.aicc - quadratic.aicc : null;
  const quadraticPreferred = deltaAicc !== null && deltaAicc > 0;
  const range = { min: xMin, max: xMax };
  const mos = mitchellOldsShawTest(quadratic.fit, range, shape, alpha);
  const lm = lindMehlumTest(quadratic.fit, range, shape, alpha);
  const twoLines = twoLinesTest(x, y, shape, alpha);

  const word = shape === 'hump' ? 'hump' : 'U shape';
  reasons.push(
    deltaAicc === null
      ? 'AICc could not be compared'
      : quadraticPreferred
        ? `the parabola fits better than the straight line (AICc lower by ${fmt(deltaAicc)})`
        : `the parabola does not fit better than the straight line (AICc higher by ${fmt(-deltaAicc)})`,
  );
  const bend = shape === 'hump' ? 'downwards' : 'upwards';
  reasons.push(
    mos.curvatureSignificant
      ? `the parabola bends ${bend} clearly (b2 = ${fmt(mos.b2)}, ${fmtP(mos.pB2)})`
      : `the parabola's bend ${bend} is not significant (b2 = ${fmt(mos.b2)}, ${fmtP(mos.pB2)})`,
  );
  if (mos.reason !== null) reasons.push(`Mitchell-Olds & Shaw test not possible: ${mos.reason}`);
  if (lm.reason !== null) reasons.push(`Lind & Mehlum test not possible: ${lm.reason}`);
  if (mos.vertex !== null) {
    reasons.push(
      mos.vertexInside
        ? `its turning point x = ${fmt(mos.vertex)} lies inside the observed range [${fmt(xMin)}, ${fmt(xMax)}]`
        : `its turning point x = ${fmt(mos.vertex)} lies outside the observed range [${fmt(xMin)}, ${fmt(xMax)}]`,
    );
  }
  if (twoLines.reason !== null) reasons.push(`two-lines test not possible: ${twoLines.reason}`);
  else if (twoLines.first && twoLines.second) {
    const lineText = (s: { slope: number; p: number }) => `${fmt(s.slope)} (${fmtP(s.p)})`;
    reasons.push(
      `two lines split at x = ${fmt(twoLines.breakpoint as number)}: slopes ${lineText(twoLines.first)} then ${lineText(twoLines.second)} — ` +
        (twoLines.passes ? `a significant ${word}` : `not a significant ${word}`),
    );
  }

  const isTurn = quadraticPreferred && mos.passes && twoLines.passes;
  let bootstrap: VertexBootstrap | null = null;
  let peak: PeakEstimate | null = null;
  let verdict: Verdict;
  if (isTurn) {
    verdict = shape;
    reasons.push(`all four checks pass: verdict ${shape}`);
    const delta = vertexDeltaInterval(quadratic.fit, alpha);
    const fieller = vertexFiellerInterval(quadratic.fit, alpha);
    if (bootstrapN > 0) bootstrap = bootstrapVertexInterval(x, y, { replicates: bootstrapN, seed, alpha });
    if (bootstrap?.reason) reasons.push(`no bootstrap interval of the turning point: ${bootstrap.reason}`);
    if (!delta) reasons.push('no delta-method interval of the turning point: the curvature is exactly zero');
    if (delta) {
      peak = {
        x: delta.x,
        se: delta.se,
        ciLow: delta.low,
        ciHigh: delta.high,
        method: 'delta',
        fiellerLow: fieller?.low ?? null,
        fiellerHigh: fieller?.high ?? null,
        bootstrapLow: bootstrap?.low ?? null,
        bootstrapHigh: bootstrap?.high ?? null,
        bootstrapReplicates: bootstrap?.replicates ?? 0,
      };
    }
  } else {
    verdict = linearVerdict();
  }
  return result({
    linear,
    quadratic,
    peak,
    tests: { shape, deltaAicc, quadraticPreferred, mitchellOldsShaw: mos, twoLines, lindMehlum: lm, bootstrap },
    verdict,
  });
}

/** The columns of `export fits`, in order (docs/exports.md, "export fits"). */
export const FIT_COLUMNS = [
  'forest_type',
  'metric',
  'axis',
  'n',
  'model',
  'b0',
  'b1',
  'b2',
  'se_b0',
  'se_b1',
  'se_b2',
  'p_b1',
  'p_b2',
  'r2',
  'adj_r2',
  'aicc',
  'peak_x',
  'peak_ci_low',
  'peak_ci_high',
  'verdict',
  'plots_left_out',
  'left_out_reasons',
  'delta_aicc',
  'curvature_p',
  'mos_turn_x',
  'mos_turn_inside',
  'mos_result',
  'two_lines_break_x',
  'two_lines_slope_1',
  'two_lines_p_1',
  'two_lines_slope_2',
  'two_lines_p_2',
  'two_lines_result',
  'peak_boot_low',
  'peak_boot_high',
] as const;

/** The evidence columns of a verdict (docs/exports.md): on the quadratic row, empty on the linear one. */
export const EVIDENCE_COLUMNS = [
  'delta_aicc', 'curvature_p', 'mos_turn_x', 'mos_turn_inside', 'mos_result', 'two_lines_break_x', 'two_lines_slope_1',
  'two_lines_p_1', 'two_lines_slope_2', 'two_lines_p_2', 'two_lines_result', 'peak_boot_low', 'peak_boot_high',
] as const satisfies readonly (typeof FIT_COLUMNS)[number][];

export type EvidenceColumn = (typeof EVIDENCE_COLUMNS)[number];

/** `pass`, `fail`, or `not_testable` (the test could not be run: its reason is in the fit's details). */
export type TestOutcome = 'pass' | 'fail' | 'not_testable';

const outcome = (t: { passes: boolean; reason: string | null } | null | undefined): TestOutcome | null =>
  t ? (t.reason !== null && t.reason !== undefined ? 'not_testable' : t.passes ? 'pass' : 'fail') : null;

// The evidence cells of a verdict from its tests and peak (a CurveResult, or the same stored as JSON in a fit's details).
export function verdictEvidence(tests: Partial<CurveTests> | null | undefined, peak: Partial<PeakEstimate> | null | undefined): { [K in EvidenceColumn]: string | number | null } {
  const mos = tests?.mitchellOldsShaw ?? null;
  const two = tests?.twoLines ?? null;
  return {
    delta_aicc: tests?.deltaAicc ?? null,
    curvature_p: mos && mos.reason === null ? mos.pB2 : null,
    mos_turn_x: mos?.vertex ?? null,
    mos_turn_inside: mos && mos.vertex !== null ? (mos.vertexInside ? 'yes' : 'no') : null,
    mos_result: outcome(mos),
    two_lines_break_x: two?.breakpoint ?? null,
    two_lines_slope_1: two?.first?.slope ?? null,
    two_lines_p_1: two?.first?.p ?? null,
    two_lines_slope_2: two?.second?.slope ?? null,
    two_lines_p_2: two?.second?.p ?? null,
    two_lines_result: outcome(two),
    peak_boot_low: peak?.bootstrapLow ?? null,
    peak_boot_high: peak?.bootstrapHigh ?? null,
  };
}

export type FitColumn = (typeof FIT_COLUMNS)[number];
/** One `export fits` row; null is an empty cell (CSV) or null (JSON). */
export type FitRow = { readonly [K in FitColumn]: string | number | null };

export interface FitLabels {
  readonly forestType: string;
  readonly metric: string;
  readonly axis: string;
}

/** Plots without a value of the metric or the axis, left out of the fit. */
export interface FitLeftOut {
  /** Plots left out in all; null when not known (fits stored before this was counted). */
  readonly total: number | null;
  /** `<column>:<reason>=<count>` joined by `;` (docs/exports.md); null when none or not known. */
  readonly reasons: string | null;
}

const NO_EVIDENCE = verdictEvidence(null, null);

// The two `export fits` rows of a result: linear then quadratic; the peak columns are on the quadratic row only, the verdict and the plots left out on both.
export function fitRows(result: CurveResult, labels: FitLabels, leftOut: FitLeftOut = { total: null, reasons: null }): [FitRow, FitRow] {
  const row = (model: 'linear' | 'quadratic', m: ModelFit | null): FitRow => {
    const peak = model === 'quadratic' ? result.peak : null;
    return {
      forest_type: labels.forestType,
      metric: labels.metric,
      axis: labels.axis,
      n: result.n,
      model,
      b0: m?.b0 ?? null,
      b1: m?.b1 ?? null,
      b2: m?.b2 ?? null,
      se_b0: m?.seB0 ?? null,
      se_b1: m?.seB1 ?? null,
      se_b2: m?.seB2 ?? null,
      p_b1: m?.pB1 ?? null,
      p_b2: m?.pB2 ?? null,
      r2: m?.r2 ?? null,
      adj_r2: m?.adjR2 ?? null,
      aicc: m?.aicc ?? null,
      peak_x: peak?.x ?? null,
      peak_ci_low: peak?.ciLow ?? null,
      peak_ci_high: peak?.ciHigh ?? null,
      verdict: result.verdict,
      plots_left_out: leftOut.total,
      left_out_reasons: leftOut.reasons,
      ...(model === 'quadratic' ? verdictEvidence(result.tests, result.peak) : NO_EVIDENCE),
    };
  };
  return [row('linear', result.linear), row('quadratic', result.quadratic)];
}
