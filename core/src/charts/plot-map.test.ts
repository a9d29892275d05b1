import { describe, expect, it } from 'vitest';
import { buildPlotMapSpec, mapFrame, renderPlotMapSvg } from './plot-map';

// Invented plot positions; the checks are about the drawing, not about data.
const plots = [
  { plot: 'A-1', longitude: 30, latitude: 60, value: 120, href: '/p/A-1' },
  { plot: 'A-2', longitude: 32, latitude: 61, value: 80, href: '/p/A-2' },
  { plot: 'A-3', longitude: 31, latitude: 60.5, value: null, href: '/p/A-3' },
];

describe('plot map', () => {
  it('keeps distances equal east–west and north–south at the middle latitude (x = λ cos φ₀)', () => {
    const f = mapFrame(plots, 600);
    const degPerPxX = ((f.lon[1] - f.lon[0]) * Math.cos((60.5 * Math.PI) / 180)) / f.width;
    const degPerPxY = (f.lat[1] - f.lat[0]) / f.height;
    expect(degPerPxX / degPerPxY).toBeCloseTo(1, 2); // the height is rounded to whole pixels
    expect(f.lon[0]).toBeLessThan(30);
    expect(f.lat[1]).toBeGreaterThan(61);
  });

  it('widens a narrow extent instead of drawing a sliver, and keeps the scale equal', () => {
    const f = mapFrame([{ longitude: 10, latitude: 0 }, { longitude: 10.001, latitude: 5 }], 600);
    expect(f.height).toBeLessThanOrEqual(660);
    expect(((f.lon[1] - f.lon[0]) * Math.cos((2.5 * Math.PI) / 180)) / f.width).toBeCloseTo((f.lat[1] - f.lat[0]) / f.height, 5);
  });

  it('titles the legend with the catalogue label and unit, links every point, draws plots without a value hollow', async () => {
    const spec = JSON.stringify(buildPlotMapSpec({ plots, variable: 'agb_mg_ha', title: 'Plots of Ashgrove' }));
    expect(spec).toContain('Above-ground biomass (Mg/ha)');
    expect(spec).toContain('Longitude (WGS 84)');
    const svg = (await renderPlotMapSvg({ plots, variable: 'agb_mg_ha', title: 'Plots of Ashgrove' }))!;
    expect((svg.match(/<a [^>]*href="\/p\/A-\d"/g) ?? []).length).toBe(3);
    expect(svg).toContain('no value');
    expect(svg).toContain('Latitude (WGS 84)');
    expect(svg).toMatch(/60\.\d+° N/);
    expect(buildPlotMapSpec({ plots: [], variable: 'agb_mg_ha', title: 'x' })).toBeNull();
  });
});
