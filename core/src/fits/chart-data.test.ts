import { describe, expect, it } from 'vitest';
import { simulateCurve } from '../../test/random-test-data';
import { buildFitChartSpec, regionChartPoints, renderFitChartSvg } from '../charts/fit-chart';
import { chartSpecKey } from '../charts/render';
import { fitCurves } from '../science/verdict';
import { asStoredFitChart, CURVE_STEPS, fitChartData, fitChartPoints, type StoredFitChart } from './chart-data';

// Simulated hump data (invented); the checks are about storage, not about the science.
const points = simulateCurve(200, (x) => 10 + 8 * x - 8 * x * x, 1, 71).map((p, i) => ({ ...p, region: ['Brenmoor', 'Calloway Fen', 'Ashgrove'][i % 3] }));
const fit = fitCurves(points.map(({ x, y }) => ({ x, y })), { bootstrapN: 0 });
const stored: StoredFitChart = { ...fitChartData(fit), points: fitChartPoints(points) };
const labels = { forestType: 'Lowland moist', metric: 'fisher_alpha', axis: 'disturbance_index' };

describe('stored fit charts', () => {
  it('keep each region name once and every point in order', () => {
    expect(stored.points.regions).toEqual(['Brenmoor', 'Calloway Fen', 'Ashgrove']);
    expect(stored.points.x).toEqual(points.map((p) => p.x));
    expect(regionChartPoints(stored.points, 'Calloway Fen').filter((p) => p.highlight)).toHaveLength(points.filter((p) => p.region === 'Calloway Fen').length);
    expect(regionChartPoints(stored.points, 'Nowhere').some((p) => p.highlight)).toBe(false);
  });

  it('hold the curve at CURVE_STEPS + 1 positions over the observed range, and the turning point of a hump', () => {
    expect(fit.verdict).toBe('hump');
    expect(stored.curve.x).toHaveLength(CURVE_STEPS + 1);
    expect(stored.curve.x[0]).toBe(fit.xMin);
    expect(stored.model).toEqual({ name: 'quadratic', r2: fit.quadratic!.r2 });
    expect(stored.peak).toEqual({ x: fit.peak!.x, ciLow: fit.peak!.ciLow, ciHigh: fit.peak!.ciHigh });
  });

  it('draw the same SVG after a trip through JSON (as stored in jsonb) as from the fit in memory', async () => {
    const back = asStoredFitChart(JSON.parse(JSON.stringify(stored)));
    expect(back).not.toBeNull();
    const input = (c: StoredFitChart) => ({ ...labels, points: regionChartPoints(c.points, 'Ashgrove'), chart: c });
    expect(await renderFitChartSvg(input(back!))).toBe(await renderFitChartSvg(input(stored)));
    expect(chartSpecKey(buildFitChartSpec(input(back!)))).toBe(chartSpecKey(buildFitChartSpec(input(stored))));
  });

  it('key a chart by what it draws: another highlighted region is another key', () => {
    const key = (region: string) => chartSpecKey(buildFitChartSpec({ ...labels, points: regionChartPoints(stored.points, region), chart: stored }));
    expect(key('Ashgrove')).toBe(key('Ashgrove'));
    expect(key('Ashgrove')).not.toBe(key('Brenmoor'));
  });

  it('link the highlighted region\'s points to their plot pages when the plot keys are stored', async () => {
    const keyed = fitChartPoints(points.map((p, i) => ({ ...p, plot: `P-${i}` })));
    expect(keyed.plots).toHaveLength(points.length);
    expect(stored.points.plots).toBeUndefined(); // points without keys store none
    const drawn = regionChartPoints(keyed, 'Ashgrove', (k) => `/plots/${k}`);
    const mine = drawn.filter((p) => p.highlight);
    expect(mine.every((p) => p.href?.startsWith('/plots/P-'))).toBe(true);
    expect(drawn.filter((p) => !p.highlight).some((p) => p.href !== undefined)).toBe(false); // other regions' plots are not links
    const svg = await renderFitChartSvg({ ...labels, points: drawn, chart: stored });
    expect((svg.match(/<a [^>]*href="\/plots\/P-\d+"/g) ?? []).length).toBe(mine.length);
    expect(asStoredFitChart(JSON.parse(JSON.stringify({ ...stored, points: keyed })))?.points.plots).toEqual(keyed.plots);
    expect(asStoredFitChart({ ...stored, points: { ...keyed, plots: ['only one'] } })).toBeNull();
  });

  it('refuse a stored value that is not a chart', () => {
    expect(asStoredFitChart(null)).toBeNull();
    expect(asStoredFitChart({ ...stored, curve: { ...stored.curve, low: [1] } })).toBeNull();
    expect(asStoredFitChart({ ...stored, points: { ...stored.points, region: ['a'] } })).toBeNull();
    expect(asStoredFitChart({ ...stored, verdict: 3 })).toBeNull();
  });
});
