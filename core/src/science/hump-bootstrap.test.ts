import { describe, expect, it } from 'vitest';
import { drawCaseCounts, percentileInterval } from './bootstrap';
import { vertexDeltaInterval } from './hump';
import { bootstrapVertexInterval } from './hump-bootstrap';
import { createRng } from './random';
import { simulateCurve } from '../../test/random-test-data';
import { fitPolynomial } from './regression';

const hump = (x: number) => 10 + 8 * x - 8 * x * x;

describe('bootstrapVertexInterval', () => {
  it('equals a slow bootstrap that refits each resample by QR (same seed and draws; 1e-9)', () => {
    const pts = simulateCurve(120, hump, 1, 17);
    const x = pts.map((p) => p.x);
    const y = pts.map((p) => p.y);
    const replicates = 200;
    const fast = bootstrapVertexInterval(x, y, { replicates, seed: 4, alpha: 0.1 });
    const rng = createRng(4);
    const counts = new Uint32Array(x.length);
    const slow: number[] = [];
    for (let b = 0; b < replicates; b++) {
      drawCaseCounts(rng, counts);
      const xs: number[] = [];
      const ys: number[] = [];
      counts.forEach((c, i) => {
        for (let k = 0; k < c; k++) {
          xs.push(x[i]);
          ys.push(y[i]);
        }
      });
      const f = fitPolynomial(xs, ys, 2);
      slow.push(-f.coefficients[1] / (2 * f.coefficients[2]));
    }
    const ref = percentileInterval(slow, 0.1);
    expect(fast.replicates).toBe(replicates);
    expect(fast.failed).toBe(0);
    expect(Math.abs(fast.low! - ref.low)).toBeLessThan(1e-9);
    expect(Math.abs(fast.high! - ref.high)).toBeLessThan(1e-9);
  });

  it('is deterministic for a seed and covers the planted vertex 0.5', () => {
    const pts = simulateCurve(800, hump, 1, 23);
    const x = pts.map((p) => p.x);
    const y = pts.map((p) => p.y);
    const a = bootstrapVertexInterval(x, y, { replicates: 1000, seed: 1 });
    const b = bootstrapVertexInterval(x, y, { replicates: 1000, seed: 1 });
    expect(a).toEqual(b);
    expect(a.low!).toBeLessThan(0.5);
    expect(a.high!).toBeGreaterThan(0.5);
    expect(a.curvatureSignAgreement).toBe(1);
  });

  it('has about the width of the delta-method interval when the curvature is clear (ratio 0.8–1.25)', () => {
    const pts = simulateCurve(800, hump, 1, 29);
    const x = pts.map((p) => p.x);
    const y = pts.map((p) => p.y);
    const boot = bootstrapVertexInterval(x, y, { replicates: 2000, seed: 2 });
    const delta = vertexDeltaInterval(fitPolynomial(x, y, 2))!;
    const ratio = (boot.high! - boot.low!) / (delta.high - delta.low);
    console.log(`bootstrap/delta interval width ratio: ${ratio.toFixed(3)}`);
    expect(ratio).toBeGreaterThan(0.8);
    expect(ratio).toBeLessThan(1.25);
  });

  it('reports an unbounded end as null when the curvature is weak', () => {
    // straight line plus noise: many resamples have b2 near 0 and the vertex runs off to ±∞
    const pts = simulateCurve(40, (x) => 1 + 0.1 * x, 1, 31);
    const boot = bootstrapVertexInterval(pts.map((p) => p.x), pts.map((p) => p.y), { replicates: 500, seed: 3 });
    expect(boot.curvatureSignAgreement).toBeLessThan(0.95);
    const width = (boot.high ?? Infinity) - (boot.low ?? -Infinity);
    expect(width).toBeGreaterThan(1);
  });

  it('rejects a bad call by name', () => {
    expect(() => bootstrapVertexInterval([1, 2, 3, 4], [1, 2, 3, 4], { replicates: 0, seed: 1 })).toThrow(/bootstrapVertexInterval/);
    expect(() => bootstrapVertexInterval([1, 2, 3, 4], [1, 2, 3], { replicates: 10, seed: 1 })).toThrow(/bootstrapVertexInterval/);
  });

  // Degenerate data are not testable, never an exception: no interval, and the reason. (A vertex
  // needs a parabola, i.e. 3 distinct x, and a resample of at least 4 points: by definition.)
  it.each([
    ['n below the minimum', [1, 2, 3], [1, 2, 3], /at least 4 points/],
    ['all x equal', [1, 1, 1, 1], [1, 2, 3, 4], /same on every point/],
    ['two distinct x', [1, 1, 2, 2, 1, 2], [1, 2, 3, 4, 1, 3], /fewer than 3 distinct/],
  ])('gives no interval with a reason on degenerate data: %s', (_label, x, y, reason) => {
    const boot = bootstrapVertexInterval(x, y, { replicates: 10, seed: 1 });
    expect(boot).toMatchObject({ replicates: 0, low: null, high: null });
    expect(boot.reason).toMatch(reason);
  });
});
