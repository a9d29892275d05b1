import { describe, expect, it } from 'vitest';
import { simulateCurve } from '../../test/random-test-data';
import { fitCurves } from '../science/verdict';
import { chartModel, fitChartData } from '../fits/chart-data';
import { buildFitChartSpec, fitChartCaption, fitChartCaptionLines, renderFitChartSvg } from './fit-chart';

// The symbols drawn by one named layer: vega writes a <g class="mark-symbol role-mark NAME_marks">
// holding one <path> per point.
function markPaths(svg: string, layer: string): number {
  const group = new RegExp(`<g class="mark-[a-z]+ role-mark ${layer}_marks"[^>]*>(.*?)</g>`, 's').exec(svg);
  if (!group) return -1;
  return (group[1].match(/<path\b/g) ?? []).length;
}

// Every start tag is closed in order (a well-formedness check without an XML library).
function isBalanced(svg: string): boolean {
  const stack: string[] = [];
  for (const m of svg.matchAll(/<(\/?)([a-zA-Z][\w:-]*)[^>]*?(\/?)>/g)) {
    const [, closing, name, selfClosing] = m;
    if (selfClosing) continue;
    if (closing) {
      if (stack.pop() !== name) return false;
    } else stack.push(name);
  }
  return stack.length === 0;
}

const humpPoints = simulateCurve(300, (x) => 10 + 8 * x - 8 * x * x, 1, 61).map((p, i) => ({ ...p, highlight: i % 10 === 0 }));
const humpFit = fitCurves(humpPoints, { bootstrapN: 100 });

describe('renderFitChartSvg', () => {
  it('returns well-formed SVG with one mark per plot, highlighted plots drawn apart', async () => {
    const svg = await renderFitChartSvg({ forestType: 'Lowland moist', metric: 'fisher_alpha', axis: 'disturbance_index', points: humpPoints, chart: fitChartData(humpFit), highlightLabel: 'plots of Northvale' });
    expect(svg.startsWith('<svg')).toBe(true);
    // the points' legend names both kinds of plots
    expect(svg).toMatch(/aria-label="Symbol legend[^"]*other plots of the forest type, plots of Northvale"/);
    expect(svg.trimEnd().endsWith('</svg>')).toBe(true);
    expect(isBalanced(svg)).toBe(true);
    expect(markPaths(svg, 'plots')).toBe(270);
    expect(markPaths(svg, 'highlighted')).toBe(30);
  });

  it('shows the caption with R², n and verdict, the curve, its band, and the peak with its interval for a hump', async () => {
    const svg = await renderFitChartSvg({ forestType: 'Lowland moist', metric: 'fisher_alpha', axis: 'disturbance_index', points: humpPoints, chart: fitChartData(humpFit) });
    expect(humpFit.verdict).toBe('hump');
    const caption = fitChartCaption(fitChartData(humpFit));
    expect(caption).toMatch(/^R² = 0\.\d+ \(quadratic\) · n = 300 · verdict: hump · band: 95 % CI of the fitted mean · peak at 0\.\d+ \(95 % CI/);
    for (const line of fitChartCaptionLines(fitChartData(humpFit))) expect(svg).toContain(line);
    // Catalogue labels with their units, never the raw column names (docs/exports.md names the columns).
    expect(svg).toContain("Lowland moist: Fisher's alpha against Disturbance index");
    expect(svg).toContain('Disturbance index (0 none – 1 severe)');
    expect(svg).not.toMatch(/fisher_alpha|disturbance_index/);
    expect(svg).toMatch(/role-mark curve_marks/);
    expect(svg).toMatch(/role-mark band_marks/);
    expect(svg).toMatch(/role-mark peak_marks/);
    expect(svg).toMatch(/role-mark peak_interval_marks/);
  });

  it('draws the straight line and no peak when the verdict is not a turn', async () => {
    const pts = simulateCurve(120, (x) => 3 + 2 * x, 1, 62);
    const fit = fitCurves(pts, { bootstrapN: 0 });
    expect(fit.verdict).toBe('increasing');
    expect(chartModel(fit)?.model).toBe('linear');
    const svg = await renderFitChartSvg({ forestType: 'Ridge dry', metric: 'richness', axis: 'fire_score', points: pts, chart: fitChartData(fit) });
    expect(markPaths(svg, 'plots')).toBe(120);
    expect(markPaths(svg, 'highlighted')).toBe(-1);
    expect(svg).toMatch(/role-mark curve_marks/);
    expect(svg).not.toMatch(/peak_marks/);
    expect(svg).toContain('verdict: increasing');
  });

  it('draws only the points when too few plots were fitted', async () => {
    const pts = simulateCurve(6, (x) => x, 1, 63);
    const svg = await renderFitChartSvg({ forestType: 'Swamp', metric: 'shannon', axis: 'logging_score', points: pts, chart: fitChartData(fitCurves(pts)) });
    expect(markPaths(svg, 'plots')).toBe(6);
    expect(svg).not.toMatch(/curve_marks/);
    expect(svg).toContain('no fit · n = 6 · verdict: none');
  });

  it('escapes text from the data', async () => {
    const svg = await renderFitChartSvg({ forestType: 'Dry <ridge> & hills', metric: 'm', axis: 'a', points: humpPoints, chart: fitChartData(humpFit) });
    expect(svg).toContain('Dry &lt;ridge&gt; &amp; hills');
    expect(isBalanced(svg)).toBe(true);
  });
});

describe('buildFitChartSpec', () => {
  it('evaluates the band as ŷ ± t·SE around the curve, and uses the requested size', () => {
    const spec = buildFitChartSpec({ forestType: 'f', metric: 'm', axis: 'a', points: humpPoints, chart: fitChartData(humpFit), width: 300, height: 200 }) as {
      width: number;
      height: number;
      layer: { name: string; data: { values: { x: number; y: number; low: number; high: number }[] } }[];
    };
    expect(spec.width).toBe(300);
    expect(spec.height).toBe(200);
    const band = spec.layer.find((l) => l.name === 'band')!.data.values;
    expect(band[0].x).toBe(humpFit.xMin);
    expect(band.at(-1)!.x).toBeCloseTo(humpFit.xMax!, 12);
    for (const r of band) {
      expect(r.low).toBeLessThan(r.y);
      expect(r.high).toBeGreaterThan(r.y);
      expect(r.y - r.low).toBeCloseTo(r.high - r.y, 10);
    }
    // at the vertex the curve is at its maximum: b0 + b1·x* + b2·x*²
    const q = humpFit.quadratic!;
    const top = Math.max(...band.map((r) => r.y));
    const xs = humpFit.peak!.x;
    expect(top).toBeLessThanOrEqual(q.b0 + q.b1 * xs + q.b2! * xs * xs + 1e-12);
  });
});
