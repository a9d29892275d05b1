// Where a quadratic diversity–disturbance curve turns, and whether the turn is real: the vertex,
// its confidence intervals, and the Mitchell-Olds & Shaw and Lind & Mehlum tests. All work on a
// degree-2 PolynomialFit, in its shifted basis (powers of x − x̄) for accuracy; results are in x.
// Formulas, sources and check values: docs/methods.md#vertex and the sections after it.
import type { PolynomialFit } from './regression';
import { studentTCdf, studentTQuantile, studentTTwoSidedP } from './student-t';

/** `hump`: a maximum inside the range (b₂ < 0). `u_shape`: a minimum (b₂ > 0). */
export type CurveShape = 'hump' | 'u_shape';

export interface XRange {
  readonly min: number;
  readonly max: number;
}

// Coefficients and covariance of the parabola in powers of (x − x̄), where the vertex arithmetic is best conditioned.
function quadraticParts(fn: string, fit: PolynomialFit) {
  if (fit.degree !== 2) throw new RangeError(`${fn}: needs a degree-2 polynomial fit, got degree ${fit.degree}`);
  const [, a1, a2] = fit.shiftedCoefficients;
  const v = fit.shiftedCovariance;
  return { a1, a2, v11: v[1][1], v12: v[1][2], v22: v[2][2], shift: fit.shift, df: fit.df };
}

// Throws naming the function when the x range is empty or reversed.
function checkRange(fn: string, range: XRange): void {
  if (!(range.min < range.max)) throw new RangeError(`${fn}: the x range must have min < max, got [${range.min}, ${range.max}]`);
}

// Throws naming the function when alpha is not in (0, 1).
function checkAlpha(fn: string, alpha: number): void {
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`${fn}: alpha must be in (0, 1), got ${alpha}`);
}

// x* = −b₁/(2b₂), the turning point of y = b₀ + b₁x + b₂x²; null when b₂ = 0 (no turning point).
export function quadraticVertex(b1: number, b2: number): number | null {
  if (!Number.isFinite(b1) || !Number.isFinite(b2)) throw new RangeError(`quadraticVertex: coefficients must be finite, got ${b1}, ${b2}`);
  return b2 === 0 ? null : -b1 / (2 * b2);
}

export interface VertexInterval {
  readonly x: number;
  readonly se: number;
  readonly low: number;
  readonly high: number;
}

// Delta method: Var(x*) ≈ gᵀVg, g = (−1/(2b₂), b₁/(2b₂²)); CI x* ± t_{1−α/2, n−3}·SE (e.g. Casella & Berger 2002, Statistical Inference, §5.5.4).
export function vertexDeltaInterval(fit: PolynomialFit, alpha = 0.05): VertexInterval | null {
  const fn = 'vertexDeltaInterval';
  checkAlpha(fn, alpha);
  const { a1, a2, v11, v12, v22, shift, df } = quadraticParts(fn, fit);
  if (a2 === 0) return null;
  const theta = -a1 / (2 * a2);
  const g1 = -1 / (2 * a2);
  const g2 = a1 / (2 * a2 * a2);
  const se = Math.sqrt(Math.max(0, g1 * g1 * v11 + 2 * g1 * g2 * v12 + g2 * g2 * v22));
  const t = studentTQuantile(1 - alpha / 2, df);
  const x = shift + theta;
  return { x, se, low: x - t * se, high: x + t * se };
}

// Fieller (1954): {θ : (b₁ + 2θb₂)² ≤ t²·Var(b₁ + 2θb₂)}; bounded only when b₂ is significant at α, else null (the set is unbounded).
export function vertexFiellerInterval(fit: PolynomialFit, alpha = 0.05): { low: number; high: number } | null {
  const fn = 'vertexFiellerInterval';
  checkAlpha(fn, alpha);
  const { a1, a2, v11, v12, v22, shift, df } = quadraticParts(fn, fit);
  const t2 = studentTQuantile(1 - alpha / 2, df) ** 2;
  // Aθ² + Bθ + C ≤ 0
  const A = 4 * (a2 * a2 - t2 * v22);
  const B = 4 * (a1 * a2 - t2 * v12);
  const C = a1 * a1 - t2 * v11;
  if (!(A > 0)) return null;
  const root = Math.sqrt(Math.max(0, B * B - 4 * A * C));
  return { low: shift + (-B - root) / (2 * A), high: shift + (-B + root) / (2 * A) };
}

// Slope of the fitted curve dy/dx = b₁ + 2b₂x and its SE √(V₁₁ + 4xV₁₂ + 4x²V₂₂) (linear combination of coefficients).
export function quadraticSlopeAt(fit: PolynomialFit, x: number): { slope: number; se: number } {
  const { a1, a2, v11, v12, v22, shift } = quadraticParts('quadraticSlopeAt', fit);
  const d = x - shift;
  return { slope: a1 + 2 * a2 * d, se: Math.sqrt(Math.max(0, v11 + 4 * d * v12 + 4 * d * d * v22)) };
}

export interface MitchellOldsShawResult {
  readonly shape: CurveShape;
  readonly b2: number;
  /** Two-sided p-value of b₂ (the `p_b2` column). */
  readonly pB2: number;
  /** b₂ has the sign of the shape and p_b2 < α. */
  readonly curvatureSignificant: boolean;
  readonly vertex: number | null;
  readonly vertexInside: boolean;
  /** The delta-method CI of the vertex lies inside the observed range too. */
  readonly ciInside: boolean;
  /** curvatureSignificant and vertexInside: the test as usually applied. */
  readonly passes: boolean;
  /** passes and ciInside. */
  readonly strong: boolean;
  /** Why the curvature could not be tested (then pB2 is 1 and nothing passes); null when it was. */
  readonly reason: string | null;
}

// Mitchell-Olds & Shaw (1987, Evolution 41:1149–1161): b₂ of the right sign with two-sided p < α, and the vertex inside [min x, max x]; the strong form also needs its delta-method CI inside.
export function mitchellOldsShawTest(fit: PolynomialFit, range: XRange, shape: CurveShape, alpha = 0.05): MitchellOldsShawResult {
  const fn = 'mitchellOldsShawTest';
  checkAlpha(fn, alpha);
  checkRange(fn, range);
  const b2 = fit.coefficients[2];
  const seB2 = Math.sqrt(fit.shiftedCovariance[2][2]);
  if (!(seB2 > 0 && Number.isFinite(seB2))) {
    const reason = 'the curvature b2 has no sampling variance (no residual scatter), so it cannot be tested';
    return { shape, b2, pB2: 1, curvatureSignificant: false, vertex: null, vertexInside: false, ciInside: false, passes: false, strong: false, reason };
  }
  const pB2 = studentTTwoSidedP(fit.shiftedCoefficients[2] / seB2, fit.df);
  const signOk = shape === 'hump' ? b2 < 0 : b2 > 0;
  const curvatureSignificant = signOk && pB2 < alpha;
  const ci = vertexDeltaInterval(fit, alpha);
  const vertex = ci ? ci.x : null;
  const inside = (v: number) => v >= range.min && v <= range.max;
  const vertexInside = vertex !== null && inside(vertex);
  const ciInside = ci !== null && inside(ci.low) && inside(ci.high);
  const passes = curvatureSignificant && vertexInside;
  return { shape, b2, pB2, curvatureSignificant, vertex, vertexInside, ciInside, passes, strong: passes && ciInside, reason: null };
}

export interface LindMehlumResult {
  readonly shape: CurveShape;
  readonly slopeLow: number;
  readonly seLow: number;
  readonly slopeHigh: number;
  readonly seHigh: number;
  /** max of the two one-sided p-values (intersection–union test). */
  readonly p: number;
  readonly passes: boolean;
  /** Why the slopes could not be tested (then p is 1); null when they were. */
  readonly reason: string | null;
}

// Lind & Mehlum (2010, Oxford Bull. Econ. Stat. 72:109–118): H₁ slope(x_min) > 0 > slope(x_max) for a hump (mirrored for a U); p = max of the one-sided t p-values.
export function lindMehlumTest(fit: PolynomialFit, range: XRange, shape: CurveShape, alpha = 0.05): LindMehlumResult {
  const fn = 'lindMehlumTest';
  checkAlpha(fn, alpha);
  checkRange(fn, range);
  const low = quadraticSlopeAt(fit, range.min);
  const high = quadraticSlopeAt(fit, range.max);
  const sign = shape === 'hump' ? 1 : -1;
  if (!(low.se > 0 && high.se > 0)) {
    return { shape, slopeLow: low.slope, seLow: low.se, slopeHigh: high.slope, seHigh: high.se, p: 1, passes: false, reason: 'a slope at the ends of the range has no sampling variance, so it cannot be tested' };
  }
  // one-sided: P(T ≥ t) for the slope that should be positive, P(T ≤ t) for the one that should be negative
  const pLow = studentTCdf((-sign * low.slope) / low.se, fit.df);
  const pHigh = studentTCdf((sign * high.slope) / high.se, fit.df);
  const p = Math.max(pLow, pHigh);
  return { shape, slopeLow: low.slope, seLow: low.se, slopeHigh: high.slope, seHigh: high.se, p, passes: p < alpha, reason: null };
}
