import { describe, expect, it } from 'vitest';
import { simulateCurve } from '../../test/random-test-data';
import { FIT_COLUMNS, fitCurves, fitRows, MIN_POINTS, type Verdict } from './verdict';

// The planted and null curves below are invented for these tests (x on [0, 1], Gaussian scatter).
const hump = (x: number) => 10 + 8 * x - 8 * x * x; // vertex at 0.5 (computed by hand)

describe('fitCurves on a planted hump', () => {
  const points = simulateCurve(800, hump, 1, 101);
  const result = fitCurves(points, { seed: 7, bootstrapN: 500 });

  it('calls it a hump and recovers the vertex within ±0.05 of 0.5', () => {
    const err = Math.abs(result.peak!.x - 0.5);
    console.log(`planted hump (n = 800): vertex ${result.peak!.x.toFixed(4)}, error ${err.toFixed(4)}, ` +
      `delta CI [${result.peak!.ciLow.toFixed(3)}, ${result.peak!.ciHigh.toFixed(3)}], ` +
      `bootstrap [${result.peak!.bootstrapLow!.toFixed(3)}, ${result.peak!.bootstrapHigh!.toFixed(3)}]`);
    expect(result.verdict).toBe('hump');
    expect(err).toBeLessThan(0.05);
    expect(result.peak!.method).toBe('delta');
    expect(result.peak!.ciLow).toBeLessThan(0.5);
    expect(result.peak!.ciHigh).toBeGreaterThan(0.5);
    expect(result.peak!.bootstrapLow!).toBeLessThan(result.peak!.x);
    expect(result.peak!.bootstrapHigh!).toBeGreaterThan(result.peak!.x);
    expect(result.peak!.bootstrapReplicates).toBe(500);
  });

  it('records every check that led there', () => {
    expect(result.tests.quadraticPreferred).toBe(true);
    expect(result.tests.mitchellOldsShaw!.passes).toBe(true);
    expect(result.tests.twoLines!.passes).toBe(true);
    expect(result.reasons.join('\n')).toMatch(/two lines split/);
    expect(result.reasons.at(-1)).toMatch(/verdict hump/);
  });

  it('is reproducible: same data and seed, same result', () => {
    expect(fitCurves(points, { seed: 7, bootstrapN: 500 }).peak).toEqual(result.peak);
  });
});

describe('fitCurves on other shapes', () => {
  const verdictOf = (f: (x: number) => number, sd: number, seed: number): Verdict =>
    fitCurves(simulateCurve(300, f, sd, seed), { bootstrapN: 0 }).verdict;

  it('u_shape for a planted trough', () => {
    expect(verdictOf((x) => 20 - hump(x), 1, 3)).toBe('u_shape');
  });

  it('increasing and decreasing for straight lines', () => {
    expect(verdictOf((x) => 1 + 2 * x, 1, 5)).toBe('increasing');
    expect(verdictOf((x) => 1 - 2 * x, 1, 6)).toBe('decreasing');
  });

  it('increasing, not hump, for a curve that rises and levels off', () => {
    expect(verdictOf((x) => 5 + 3 * (1 - Math.exp(-6 * x)), 0.5, 8)).toBe('increasing');
  });

  it('leaves the peak empty unless the verdict is a hump or a U', () => {
    const r = fitCurves(simulateCurve(300, (x) => 1 + 2 * x, 1, 5), { bootstrapN: 0 });
    expect(r.peak).toBeNull();
    expect(r.quadratic).not.toBeNull();
  });
});

// Statistical behaviour: how often does a curve WITHOUT a hump get called one? 200 seeded data
// sets of 150 plots for each null shape; at most 5 % (α) may be called `hump`. The parabola test alone
// (Mitchell-Olds & Shaw) is logged beside it, to show why the two-lines test is required.
describe('false hump rate on data without a hump', () => {
  const nulls: Array<[string, (x: number) => number, number]> = [
    ['flat', () => 5, 1],
    ['straight rise', (x) => 5 + 2 * x, 1],
    ['rise that levels off', (x) => 5 + 3 * (1 - Math.exp(-4 * x)), 1],
  ];
  it.each(nulls)('%s: verdict hump in at most 5 % of 200 data sets', (name, f, sd) => {
    const sets = 200;
    let humps = 0;
    let parabolaOnly = 0;
    for (let s = 0; s < sets; s++) {
      const r = fitCurves(simulateCurve(150, f, sd, 5000 + s), { bootstrapN: 0 });
      if (r.verdict === 'hump') humps++;
      if (r.tests.shape === 'hump' && r.tests.quadraticPreferred && r.tests.mitchellOldsShaw?.passes) parabolaOnly++;
    }
    console.log(`null "${name}": hump verdict ${((100 * humps) / sets).toFixed(1)} %, parabola test alone ${((100 * parabolaOnly) / sets).toFixed(1)} %`);
    expect(humps / sets).toBeLessThanOrEqual(0.05);
    if (name === 'rise that levels off') expect(parabolaOnly / sets).toBeGreaterThan(0.5);
  });
});

describe('fitCurves with too little or degenerate data', () => {
  it(`answers none with a reason below ${MIN_POINTS} points, and fits nothing`, () => {
    const r = fitCurves(simulateCurve(MIN_POINTS - 1, hump, 0.1, 1));
    expect(r.verdict).toBe('none');
    expect(r.linear).toBeNull();
    expect(r.quadratic).toBeNull();
    expect(r.reasons[0]).toMatch(/at least 10/);
  });

  it('answers none when the metric never varies', () => {
    const r = fitCurves(Array.from({ length: 20 }, (_, i) => ({ x: i, y: 3 })));
    expect(r.verdict).toBe('none');
    expect(r.reasons[0]).toMatch(/same value/);
  });

  it('fits only the straight line when x has two distinct values', () => {
    const pts = Array.from({ length: 20 }, (_, i) => ({ x: i % 2, y: (i % 2) * 3 + (i % 5) * 0.1 }));
    const r = fitCurves(pts);
    expect(r.quadratic).toBeNull();
    expect(r.linear).not.toBeNull();
    expect(r.verdict).toBe('increasing');
  });

  it('rejects non-finite points by name and index, and a bad alpha', () => {
    const pts = simulateCurve(20, hump, 1, 1);
    expect(() => fitCurves([...pts, { x: Number.NaN, y: 1 }])).toThrow(/fitCurves: point 20/);
    expect(() => fitCurves(pts, { alpha: 0 })).toThrow(/fitCurves/);
  });
});

describe('fitRows', () => {
  it('lists the columns of `export fits` in the order of docs/exports.md', () => {
    expect(FIT_COLUMNS.join(', ')).toBe(
      'forest_type, metric, axis, n, model, b0, b1, b2, se_b0, se_b1, se_b2, p_b1, p_b2, r2, adj_r2, aicc, peak_x, peak_ci_low, peak_ci_high, verdict, ' +
        'plots_left_out, left_out_reasons, delta_aicc, curvature_p, mos_turn_x, mos_turn_inside, mos_result, two_lines_break_x, two_lines_slope_1, ' +
        'two_lines_p_1, two_lines_slope_2, two_lines_p_2, two_lines_result, peak_boot_low, peak_boot_high',
    );
  });

  it('puts the evidence behind the verdict on the quadratic row only, from the tests that decided it', () => {
    const r = fitCurves(simulateCurve(300, hump, 1, 9), { bootstrapN: 200, seed: 3 });
    const [lin, quad] = fitRows(r, { forestType: 'lowland moist', metric: 'fisher_alpha', axis: 'disturbance_index' }, { total: 2, reasons: 'fisher_alpha:all_singletons=2' });
    expect(r.verdict).toBe('hump');
    const mos = r.tests.mitchellOldsShaw!;
    const two = r.tests.twoLines!;
    expect(quad).toMatchObject({
      delta_aicc: r.linear!.aicc! - r.quadratic!.aicc!,
      curvature_p: mos.pB2,
      mos_turn_x: mos.vertex, mos_turn_inside: 'yes', mos_result: 'pass',
      two_lines_break_x: two.breakpoint, two_lines_slope_1: two.first!.slope, two_lines_p_1: two.first!.p,
      two_lines_slope_2: two.second!.slope, two_lines_p_2: two.second!.p, two_lines_result: 'pass',
      peak_boot_low: r.peak!.bootstrapLow, peak_boot_high: r.peak!.bootstrapHigh,
    });
    // the test's p of b2 is the parabola's p_b2, computed on centred x (equal up to rounding)
    expect(Math.abs((quad.curvature_p as number) - (quad.p_b2 as number))).toBeLessThanOrEqual(1e-9 * (quad.p_b2 as number) + 1e-300);
    expect(quad.two_lines_slope_1 as number).toBeGreaterThan(0); // a rise, then
    expect(quad.two_lines_slope_2 as number).toBeLessThan(0); // a fall
    for (const k of ['delta_aicc', 'curvature_p', 'mos_turn_x', 'mos_result', 'two_lines_slope_1', 'two_lines_result', 'peak_boot_low'] as const) expect(lin[k], k).toBeNull();
    expect([lin.plots_left_out, quad.plots_left_out, quad.left_out_reasons]).toEqual([2, 2, 'fisher_alpha:all_singletons=2']);
  });

  it('says a test failed, or could not be run, rather than leaving it blank', () => {
    const flat = fitCurves(simulateCurve(200, (x) => 10 + 0 * x, 1, 4), { bootstrapN: 0 });
    const [, quad] = fitRows(flat, { forestType: 'ridge', metric: 'richness', axis: 'fire_score' });
    expect(quad.mos_result === 'fail' || quad.two_lines_result === 'fail').toBe(true);
    expect(quad.peak_boot_low).toBeNull();
    const [, tiny] = fitRows(fitCurves(simulateCurve(4, hump, 1, 2)), { forestType: 'ridge', metric: 'richness', axis: 'fire_score' });
    expect(tiny.mos_result).toBeNull(); // too few plots: no test was attempted at all
  });

  it('gives a linear and a quadratic row; b2 and the peak only on the quadratic row', () => {
    const r = fitCurves(simulateCurve(300, hump, 1, 9), { bootstrapN: 0 });
    const [lin, quad] = fitRows(r, { forestType: 'lowland moist', metric: 'fisher_alpha', axis: 'disturbance_index' });
    expect(Object.keys(lin)).toEqual([...FIT_COLUMNS]);
    expect(lin.model).toBe('linear');
    expect(lin.b2).toBeNull();
    expect(lin.peak_x).toBeNull();
    expect(lin.b1).toBe(r.linear!.b1);
    expect(quad.model).toBe('quadratic');
    expect(quad.b2).toBe(r.quadratic!.b2);
    expect(quad.peak_x).toBe(r.peak!.x);
    expect(quad.verdict).toBe('hump');
    expect(lin.verdict).toBe('hump');
    expect(quad.forest_type).toBe('lowland moist');
  });

  it('writes empty cells (null) for everything that could not be computed', () => {
    const [lin, quad] = fitRows(fitCurves(simulateCurve(4, hump, 1, 2)), { forestType: 'ridge', metric: 'richness', axis: 'fire_score' });
    for (const k of ['b0', 'b1', 'se_b0', 'p_b1', 'r2', 'aicc', 'peak_x'] as const) {
      expect(lin[k]).toBeNull();
      expect(quad[k]).toBeNull();
    }
    expect(lin.n).toBe(4);
    expect(quad.verdict).toBe('none');
  });
});

// Degenerate data give a defined "not testable" result, never an exception. The expected outcomes are
// definitional (no slope without two distinct x, no curvature without three, no test without residual
// scatter: any regression text, e.g. Seber & Lee 2003, Linear Regression Analysis, ch. 3); the data are
// invented for these tests.
describe('fitCurves on degenerate data', () => {
  const rising = (x: number) => 10 + 3 * x;

  it('exact duplicated points (each plot entered three times) judge the shape without an exception', () => {
    const pts = simulateCurve(20, rising, 1, 1);
    const tripled = [...pts, ...pts, ...pts];
    const r = fitCurves(tripled, { bootstrapN: 200 });
    expect(r.n).toBe(60);
    expect(VERDICTS_OF_ALL).toContain(r.verdict);
    expect(r.untestable).toBeNull();
    const twoLines = r.tests.twoLines!;
    // the breakpoint stays inside the middle 80 % of x, so no side is left with two repeated x: the test runs
    expect(twoLines.reason).toBeNull();
    expect(r.verdict).not.toBe('hump');
  });

  it('constant y: not testable, verdict none', () => {
    const r = fitCurves(Array.from({ length: 20 }, (_, i) => ({ x: i / 19, y: 4.2 })));
    expect(r).toMatchObject({ verdict: 'none', linear: null, quadratic: null });
    expect(r.untestable).toMatch(/same value on every plot/);
  });

  it('all x equal: not testable, verdict none', () => {
    const r = fitCurves(Array.from({ length: 20 }, (_, i) => ({ x: 0.3, y: i % 7 })));
    expect(r.verdict).toBe('none');
    expect(r.untestable).toMatch(/x has the same value/);
  });

  it('two distinct x: the straight line is judged, the curvature is not testable', () => {
    const r = fitCurves(Array.from({ length: 20 }, (_, i) => ({ x: i % 2, y: (i % 2) * 3 + (i % 5) * 0.1 })));
    expect(r.untestable).toBeNull();
    expect(r.quadratic).toBeNull();
    expect(r.tests.twoLines).toBeNull();
    expect(r.reasons.join('\n')).toMatch(/only 2 distinct values, so no curvature/);
    expect(r.verdict).toBe('increasing');
  });

  it('n below the minimum: not testable, verdict none', () => {
    const r = fitCurves(simulateCurve(MIN_POINTS - 1, rising, 1, 2));
    expect(r.verdict).toBe('none');
    expect(r.untestable).toMatch(new RegExp(`only ${MIN_POINTS - 1} plots`));
  });

  it('an exact straight line (zero residual variance): not testable, verdict none', () => {
    const r = fitCurves(Array.from({ length: 20 }, (_, i) => ({ x: i, y: 2 + 0.5 * i })));
    expect(r).toMatchObject({ verdict: 'none', linear: null, quadratic: null });
    expect(r.untestable).toMatch(/neither the straight line nor the parabola/);
    expect(r.reasons.join('\n')).toMatch(/fit is exact/);
  });
});

const VERDICTS_OF_ALL: readonly Verdict[] = ['hump', 'increasing', 'decreasing', 'u_shape', 'none'];
