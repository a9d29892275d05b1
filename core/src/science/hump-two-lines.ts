// The two-lines test of a hump (Simonsohn 2018, Advances in Methods and Practices in Psychological
// Science 1:538–555): fit two separate lines, before and after a breakpoint chosen near the top of
// a flexible fit, and ask whether the first rises and the second falls, both significantly.
//
// It follows the published steps below, but differs from the author's procedure in the flexible fit
// (a cubic polynomial, a quadratic for 3 distinct x or 5 points or fewer, instead of a smoothing spline),
// the range the breakpoint may take, the shape being fixed beforehand by the parabola's b₂, one
// interrupted regression instead of two, and Student t instead of normal p-values; each difference
// is listed in docs/methods.md#where-it-differs-from-the-published-procedure (effects not yet measured).
//  1. flat region = the observed x whose fitted value is within 1 SE of the highest fitted value
//     (ŷᵢ + SEᵢ ≥ max ŷ; for a U, ŷᵢ − SEᵢ ≤ min ŷ);
//  2. interrupted regression at the median of the flat region: y = a + b₁·x_low + b₂·x_high + c·high,
//     x_low = x − x_c for x ≤ x_c (else 0), x_high = x − x_c for x > x_c (else 0), high = [x > x_c];
//  3. "Robin Hood": move the breakpoint to the q-quantile of the flat region, q = |t₂|/(|t₁| + |t₂|) from the slopes' t values,
//     which gives more data to the line whose slope is the less significant;
//  4. refit there with HC3 robust standard errors; a hump needs b₁ > 0 and b₂ < 0 with both
//     two-sided p < α (a U the mirror).
// Each line needs at least MIN_POINTS_PER_LINE points with two distinct x and some residual scatter,
// else the test is not testable: `reason` says why and `passes` is false (never an exception).
import { quantileSorted } from './bootstrap';
import type { CurveShape } from './hump';
import { fitOls, fitPolynomial, predictPolynomial, RegressionError } from './regression';

export const MIN_POINTS_PER_LINE = 3;

export interface LineSegment {
  readonly n: number;
  readonly slope: number;
  /** HC3 robust standard error. */
  readonly se: number;
  readonly t: number;
  readonly p: number;
}

export interface TwoLinesResult {
  readonly shape: CurveShape;
  readonly breakpoint: number | null;
  /** The x range of the flat region of the flexible fit. */
  readonly flatLow: number | null;
  readonly flatHigh: number | null;
  readonly first: LineSegment | null;
  readonly second: LineSegment | null;
  readonly passes: boolean;
  /** Why the test could not be run; null when it ran. */
  readonly reason: string | null;
}

// Interrupted regression y = a + b₁x_low + b₂x_high + c·high with HC3 SEs (Simonsohn 2018, eq. for "two lines"); null if a line is not estimable.
export function interruptedRegression(x: readonly number[], y: readonly number[], breakpoint: number): { first: LineSegment; second: LineSegment } | null {
  const out = splitLines(x, y, breakpoint);
  return 'reason' in out ? null : out;
}

// The interrupted regression, or why it cannot be tested at this breakpoint (too few points or distinct x on a side, a singular design, no residual scatter).
function splitLines(x: readonly number[], y: readonly number[], breakpoint: number): { first: LineSegment; second: LineSegment } | { reason: string } {
  const n = x.length;
  const xLow = new Array<number>(n);
  const xHigh = new Array<number>(n);
  const high = new Array<number>(n);
  const lowXs = new Set<number>();
  const highXs = new Set<number>();
  let nLow = 0;
  for (let i = 0; i < n; i++) {
    const isHigh = x[i] > breakpoint;
    xLow[i] = isHigh ? 0 : x[i] - breakpoint;
    xHigh[i] = isHigh ? x[i] - breakpoint : 0;
    high[i] = isHigh ? 1 : 0;
    if (isHigh) highXs.add(x[i]);
    else {
      lowXs.add(x[i]);
      nLow++;
    }
  }
  const nHigh = n - nLow;
  if (nLow < MIN_POINTS_PER_LINE || nHigh < MIN_POINTS_PER_LINE || lowXs.size < 2 || highXs.size < 2) {
    return { reason: `too few points on one side of the breakpoint (a line needs ${MIN_POINTS_PER_LINE} points at 2 distinct x or more)` };
  }
  let fit;
  try {
    fit = fitOls(y, [xLow, xHigh, high], { hc3: true });
  } catch (e) {
    if (e instanceof RegressionError) return { reason: e.message };
    throw e;
  }
  const hc3 = fit.hc3!;
  const segment = (k: number, count: number): LineSegment => ({
    n: count,
    slope: fit.coefficients[k],
    se: hc3.standardErrors[k],
    t: hc3.tValues[k],
    p: hc3.pValues[k],
  });
  return { first: segment(1, nLow), second: segment(2, nHigh) };
}

// Two-lines test with the Robin Hood breakpoint (Simonsohn 2018, with the differences listed in the header).
export function twoLinesTest(x: readonly number[], y: readonly number[], shape: CurveShape, alpha = 0.05): TwoLinesResult {
  const fn = 'twoLinesTest';
  if (x.length !== y.length) throw new RangeError(`${fn}: x has ${x.length} values, y has ${y.length}`);
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`${fn}: alpha must be in (0, 1), got ${alpha}`);
  const none = (reason: string, extra: Partial<TwoLinesResult> = {}): TwoLinesResult => ({
    shape,
    breakpoint: null,
    flatLow: null,
    flatHigh: null,
    first: null,
    second: null,
    passes: false,
    reason,
    ...extra,
  });
  const distinct = new Set(x).size;
  if (distinct < 3) return none('fewer than 3 distinct x values');
  let smooth;
  try {
    smooth = fitPolynomial(x, y, distinct >= 4 && x.length > 5 ? 3 : 2);
  } catch (e) {
    if (e instanceof RegressionError) return none(`flexible fit failed: ${e.message}`);
    throw e;
  }
  const n = x.length;
  const fitted = new Float64Array(n);
  const ses = new Float64Array(n);
  let extreme = shape === 'hump' ? -Infinity : Infinity;
  for (let i = 0; i < n; i++) {
    const { mean, se } = predictPolynomial(smooth, x[i]);
    fitted[i] = mean;
    ses[i] = se;
    extreme = shape === 'hump' ? Math.max(extreme, mean) : Math.min(extreme, mean);
  }
  const flat: number[] = [];
  for (let i = 0; i < n; i++) {
    const within = shape === 'hump' ? fitted[i] + ses[i] >= extreme : fitted[i] - ses[i] <= extreme;
    if (within) flat.push(x[i]);
  }
  const flatSorted = Float64Array.from(flat).sort();
  const flatLow = flatSorted[0];
  const flatHigh = flatSorted[flatSorted.length - 1];
  const median = quantileSorted(flatSorted, 0.5);
  const first = splitLines(x, y, median);
  if ('reason' in first) return none(`${first.reason} (the median breakpoint)`, { flatLow, flatHigh, breakpoint: median });
  const z1 = Math.abs(first.first.t);
  const z2 = Math.abs(first.second.t);
  const q = z1 + z2 > 0 ? z2 / (z1 + z2) : 0.5;
  const breakpoint = quantileSorted(flatSorted, q);
  const lines = splitLines(x, y, breakpoint);
  if ('reason' in lines) return none(`${lines.reason} (the Robin Hood breakpoint)`, { flatLow, flatHigh, breakpoint });
  const sign = shape === 'hump' ? 1 : -1;
  const passes =
    sign * lines.first.slope > 0 && sign * lines.second.slope < 0 && lines.first.p < alpha && lines.second.p < alpha;
  return { shape, breakpoint, flatLow, flatHigh, first: lines.first, second: lines.second, passes, reason: null };
}
