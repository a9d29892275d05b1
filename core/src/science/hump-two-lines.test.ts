import { describe, expect, it } from 'vitest';
import { quantileSorted } from './bootstrap';
import { interruptedRegression, PUBLISHED_TWO_LINES, twoLinesTest } from './hump-two-lines';
import { normalTwoSidedP } from './normal';
import { simulateCurve } from '../../test/random-test-data';
import { R_CHECK_X, R_CHECK_Y } from '../../test/regression-fixture';

const relErr = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const xy = (pts: { x: number; y: number }[]) => [pts.map((p) => p.x), pts.map((p) => p.y)] as const;

describe('interruptedRegression', () => {
  // Reference: R 4.2.2 with sandwich 3.0-2 on this machine, data in core/test/regression-fixture.ts, x_c = 0.4:
  // lm(y ~ xlow + xhigh + high) with xlow = ifelse(x <= xc, x − xc, 0), xhigh = ifelse(x > xc, x − xc, 0),
  // high = ifelse(x > xc, 1, 0); sqrt(diag(vcovHC(m, type = "HC3"))). Tolerance 1e-9 relative.
  it('matches R lm() slopes and sandwich::vcovHC HC3 standard errors', () => {
    const r = interruptedRegression(R_CHECK_X, R_CHECK_Y, 0.4)!;
    expect(relErr(r.first.slope, 1.9204552759856834)).toBeLessThan(1e-9);
    expect(relErr(r.second.slope, -2.7123516242374359)).toBeLessThan(1e-9);
    expect(relErr(r.first.se, 0.71665238798721)).toBeLessThan(1e-9);
    expect(relErr(r.second.se, 0.347896739509366)).toBeLessThan(1e-9);
    expect(r.first.n).toBe(12);
    expect(r.second.n).toBe(18);
  });

  it('returns null when a line has fewer than 3 points or a single x value', () => {
    expect(interruptedRegression(R_CHECK_X, R_CHECK_Y, 0.05)).toBeNull();
    expect(interruptedRegression(R_CHECK_X, R_CHECK_Y, 0.95)).toBeNull();
    const x = [0, 0, 0, 1, 2, 3, 4, 5];
    expect(interruptedRegression(x, x.map((v) => v * v + (v % 2)), 0)).toBeNull();
  });
});

describe('twoLinesTest', () => {
  it('finds a planted hump: a rising then a falling line, breakpoint in the flat region near the top', () => {
    const [x, y] = xy(simulateCurve(300, (v) => 10 + 8 * v - 8 * v * v, 1, 41));
    const t = twoLinesTest(x, y, 'hump');
    expect(t.reason).toBeNull();
    expect(t.passes).toBe(true);
    expect(t.first!.slope).toBeGreaterThan(0);
    expect(t.second!.slope).toBeLessThan(0);
    expect(t.breakpoint!).toBeGreaterThanOrEqual(t.flatLow!);
    expect(t.breakpoint!).toBeLessThanOrEqual(t.flatHigh!);
    expect(Math.abs(t.breakpoint! - 0.5)).toBeLessThan(0.15);
  });

  it('does not find a hump in a straight rising line', () => {
    const [x, y] = xy(simulateCurve(300, (v) => 1 + 2 * v, 1, 43));
    const t = twoLinesTest(x, y, 'hump');
    expect(t.passes).toBe(false);
  });

  it('does not find a hump in a curve that rises and levels off (where a parabola alone is fooled)', () => {
    const [x, y] = xy(simulateCurve(300, (v) => 5 + 3 * (1 - Math.exp(-6 * v)), 0.5, 47));
    const t = twoLinesTest(x, y, 'hump');
    expect(t.passes).toBe(false);
  });

  it('tests the mirror for a U shape', () => {
    const [x, y] = xy(simulateCurve(300, (v) => 10 - 8 * v + 8 * v * v, 1, 53));
    expect(twoLinesTest(x, y, 'u_shape').passes).toBe(true);
    expect(twoLinesTest(x, y, 'hump').passes).toBe(false);
  });

  it('places the final breakpoint by the Robin Hood rule: the q-quantile of the flat region, q = |z2|/(|z1| + |z2|) at the median split', () => {
    const [x, y] = xy(simulateCurve(300, (v) => 10 + 6 * v - 8 * v * v, 1, 59));
    const t = twoLinesTest(x, y, 'hump');
    const flat = Float64Array.from(x.filter((v) => v >= t.flatLow! && v <= t.flatHigh!)).sort();
    // the flat region is the set of x whose fit is within 1 SE of the top; on a smooth single-peaked
    // fit that set is an interval of x, so every x in [flatLow, flatHigh] belongs to it
    const first = interruptedRegression(x, y, quantileSorted(flat, 0.5))!;
    const q = Math.abs(first.second.t) / (Math.abs(first.first.t) + Math.abs(first.second.t));
    expect(t.breakpoint).toBeCloseTo(quantileSorted(flat, q), 12);
  });

  it('says why it cannot run with too few distinct x values', () => {
    const x = [0, 0, 0, 0.5, 0.5, 0.5, 1, 1, 1, 1];
    const t = twoLinesTest(x, [1, 1.2, 0.9, 2, 2.1, 1.9, 1, 1.1, 0.8, 1], 'hump');
    expect(t.passes).toBe(false);
    expect(t.reason).toMatch(/too few points/);
  });
});

// A line through two x values, each repeated with the same y, has zero residuals: its HC3 variance is
// zero by construction (MacKinnon & White 1985: the sandwich sums squared residuals), so the split is
// not testable. Old behaviour: t = 0/0 and an exception. Data invented for the test.
describe('two lines on repeated points', () => {
  const low = [0.05, 0.1, 0.15, 0.2, 0.25, 0.3, 0.35];
  const lowY = [1.1, 1.9, 2.2, 3.4, 3.6, 4.9, 5.1];
  const x = [...low, 0.8, 0.8, 0.8, 0.9, 0.9, 0.9];
  const y = [...lowY, 5, 5, 5, 4, 4, 4];

  it('the interrupted regression is not estimable there', () => {
    expect(interruptedRegression(x, y, 0.5)).toBeNull();
  });

  it('the two-lines test on plots entered three times, breakpoint allowed to the edge, is not testable, with a reason, never an exception', () => {
    const [sx, sy] = xy(simulateCurve(20, (v) => 10 + 3 * v, 1, 1));
    const t = twoLinesTest([...sx, ...sx, ...sx], [...sy, ...sy, ...sy], 'hump', { range: 'flat' });
    expect(t.passes).toBe(false);
    expect(t.reason).toMatch(/no sampling variance|too few points/);
  });
});

describe('twoLinesTest options (docs/methods.md#where-it-differs-from-the-published-procedure)', () => {
  const quantile = (v: readonly number[], p: number): number => quantileSorted(Float64Array.from(v).sort(), p);

  it('keeps the top and the breakpoint between the 10th and 90th percentiles of x by default, and not with range "flat"', () => {
    // a straight rise: the top of the flexible fit is at the highest x, outside the middle 80 %
    const [x, y] = xy(simulateCurve(200, (v) => 1 + 2 * v, 1, 61));
    const inner = twoLinesTest(x, y, 'hump');
    expect(inner.flatHigh!).toBeLessThanOrEqual(quantile(x, 0.9));
    expect(inner.flatLow!).toBeGreaterThanOrEqual(quantile(x, 0.1));
    expect(inner.breakpoint!).toBeLessThanOrEqual(quantile(x, 0.9));
    const edge = twoLinesTest(x, y, 'hump', { range: 'flat' });
    expect(edge.flatHigh!).toBeGreaterThan(quantile(x, 0.9));
  });

  it('split "each" takes the second slope from the run that puts the points at the breakpoint in the second line', () => {
    // x in steps of 0.05 with three plots at each x: the breakpoint falls on observed x
    const x = Array.from({ length: 63 }, (_, i) => Math.floor(i / 3) * 0.05);
    const y = x.map((v, i) => 10 + 8 * v - 8 * v * v + ((i * 7919) % 13) / 13 - 0.5);
    const t = twoLinesTest(x, y, 'hump', { split: 'each' });
    const xc = t.breakpoint!;
    expect(x).toContain(xc);
    const below = Math.max(...x.filter((v) => v < xc));
    expect(t.first!.slope).toBeCloseTo(interruptedRegression(x, y, xc)!.first.slope, 12);
    expect(t.second!.slope).toBeCloseTo(interruptedRegression(x, y, below)!.second.slope, 12);
    expect(t.second!.n).toBe(x.filter((v) => v >= xc).length);
  });

  it('pValues "normal" gives each slope p = 2(1 − Φ(|t|)) from the same t', () => {
    const [x, y] = xy(simulateCurve(40, (v) => 10 + 8 * v - 8 * v * v, 1, 67));
    const t = twoLinesTest(x, y, 'hump');
    const z = twoLinesTest(x, y, 'hump', { pValues: 'normal' });
    expect(z.first!.t).toBe(t.first!.t);
    expect(z.first!.p).toBeCloseTo(normalTwoSidedP(t.first!.t), 15);
    // normal tails are thinner than Student t's: a smaller p from the same t
    expect(z.first!.p).toBeLessThan(t.first!.p);
  });

  it('smooth "spline" still finds a planted hump and not a straight rise', () => {
    const [x, y] = xy(simulateCurve(300, (v) => 10 + 8 * v - 8 * v * v, 1, 71));
    expect(twoLinesTest(x, y, 'hump', PUBLISHED_TWO_LINES).passes).toBe(true);
    const [lx, ly] = xy(simulateCurve(300, (v) => 1 + 2 * v, 1, 73));
    expect(twoLinesTest(lx, ly, 'hump', PUBLISHED_TWO_LINES).passes).toBe(false);
  });
});
