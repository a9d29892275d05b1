import { describe, expect, it } from 'vitest';
import { buildGuildChartSpec, chartSpecKey, renderVegaLiteSvg, type TopLevelSpec } from '@stemwise/core/charts';
import { chartSvg, drawnNationalSnapshot, drawnSnapshot, drawnSvgs, SvgCache } from './chart-svgs';
import type { FitChart, Snapshot, SnapshotPayload } from './snapshot-payload';
import type { NationalSnapshot } from './national-snapshot';

// A drawing that counts its calls and answers after a tick, as a chart renderer does.
function counted(svg: string | Error) {
  const draw = async () => {
    draw.calls++;
    await new Promise((r) => setTimeout(r, 1));
    if (svg instanceof Error) throw svg;
    return svg;
  };
  draw.calls = 0;
  return draw;
}

// Invented guild shares of one region (the chart's input rows).
const guildSpec = (pioneer: number): TopLevelSpec =>
  buildGuildChartSpec([
    { forest_type: 'all', guild: 'pioneer', mean_share: pioneer, se: 0.05, n_plots: 4 },
    { forest_type: 'all', guild: 'shade_tolerant', mean_share: 1 - pioneer, se: 0.05, n_plots: 4 },
  ] as Parameters<typeof buildGuildChartSpec>[0])!;

describe('SvgCache', () => {
  it('draws a key once: callers at the same time and later share the drawing', async () => {
    const cache = new SvgCache(4, 1000);
    const draw = counted('<svg>a</svg>');
    const [a, b] = await Promise.all([cache.get('a', draw), cache.get('a', draw)]);
    expect(await cache.get('a', draw)).toBe('<svg>a</svg>');
    expect([a, b]).toEqual(['<svg>a</svg>', '<svg>a</svg>']);
    expect(draw.calls).toBe(1);
    expect(cache.size).toEqual({ entries: 1, chars: 12 });
  });

  it('drops the least recently used drawing beyond its count', async () => {
    const cache = new SvgCache(2, 1000);
    const [a, b, c] = [counted('<svg>a</svg>'), counted('<svg>b</svg>'), counted('<svg>c</svg>')];
    await cache.get('a', a);
    await cache.get('b', b);
    await cache.get('a', a); // a used last: b is the oldest
    await cache.get('c', c);
    await cache.get('a', a);
    expect(a.calls).toBe(1);
    await cache.get('b', b);
    expect(b.calls).toBe(2); // b was dropped and is drawn again
    expect(cache.size.entries).toBe(2);
  });

  it('drops the least recently used drawings beyond its size in characters', async () => {
    const cache = new SvgCache(10, 30);
    const [a, b, c] = [counted('<svg>aaaaaaaa</svg>'), counted('<svg>bbbbbbbb</svg>'), counted('<svg>c</svg>')];
    await cache.get('a', a); // 19 characters
    await cache.get('b', b); // 38 in all: a goes
    expect(cache.size).toEqual({ entries: 1, chars: 19 });
    await cache.get('c', c); // 31 in all: b goes
    expect(cache.size).toEqual({ entries: 1, chars: 12 });
    await cache.get('a', a);
    expect(a.calls).toBe(2);
  });

  it('keeps no failed drawing: the next caller draws again', async () => {
    const cache = new SvgCache(4, 1000);
    const fails = counted(new Error('no'));
    await expect(cache.get('x', fails)).rejects.toThrow('no');
    await expect(cache.get('x', fails)).rejects.toThrow('no');
    expect(fails.calls).toBe(2);
    expect(cache.size.entries).toBe(0);
  });
});

describe('charts drawn when a page is served', () => {
  it('draw the SVG of the specification, the same as drawing it directly, kept by its key for the next page', async () => {
    const spec = guildSpec(0.3);
    const before = drawnSvgs.size.entries;
    const svg = await chartSvg(spec);
    expect(svg).toBe(await renderVegaLiteSvg(spec));
    expect(drawnSvgs.size.entries).toBe(before + 1);
    // an equal specification read back from storage (another object) is the same chart: no new drawing
    expect(await chartSvg(JSON.parse(JSON.stringify(spec)) as TopLevelSpec)).toBe(svg);
    expect(drawnSvgs.size.entries).toBe(before + 1);
    expect(chartSpecKey(guildSpec(0.4))).not.toBe(chartSpecKey(spec));
  });

  const fit = (over: Partial<FitChart>): FitChart => ({ forest_type: 'wet', metric: 'fisher_alpha', axis: 'disturbance_index', points: 5, highlighted: 2, missing: null, ...over });
  const snapshot = (charts: SnapshotPayload['charts']): Snapshot => ({ region: 'Fernhollow', version: 1, etag: 'e', createdAt: new Date(0), payload: { charts } as SnapshotPayload });

  it('draw a snapshot’s specifications and show the SVG of an older snapshot as it is', async () => {
    const spec = guildSpec(0.3);
    const drawn = await drawnSnapshot(
      snapshot({ means: '<svg>kept means</svg>', guilds: spec, fits: [fit({ spec }), fit({ forest_type: 'dry', svg: '<svg>kept fit</svg>' }), fit({ forest_type: 'moist', spec: null, missing: 'too few plots' })] }),
    );
    const svg = await renderVegaLiteSvg(spec);
    expect(drawn.payload.charts).toEqual({
      means: '<svg>kept means</svg>',
      guilds: svg,
      change: null,
      fits: [fit({ svg }), fit({ forest_type: 'dry', svg: '<svg>kept fit</svg>' }), fit({ forest_type: 'moist', svg: null, missing: 'too few plots' })],
    });
  });

  it('say why a fit chart is missing when its specification cannot be drawn, and leave out another chart that cannot', async () => {
    const broken = { layer: 'not layers' } as unknown as TopLevelSpec;
    const errors: unknown[] = [];
    const drawn = await drawnSnapshot(snapshot({ means: broken, guilds: null, fits: [fit({ spec: broken })] }), { error: (o: unknown) => void errors.push(o) });
    expect(drawn.payload.charts.means).toBeNull();
    expect(drawn.payload.charts.fits[0]).toMatchObject({ svg: null, missing: expect.stringMatching(/^the chart could not be drawn \(.+\)$/) });
    expect(errors).toHaveLength(2);
  });

  it('draw the national charts alike', async () => {
    const spec = guildSpec(0.5);
    const s = { version: 1, etag: 'e', createdAt: new Date(0), payload: { charts: { means: spec, change: '<svg>kept</svg>' } } } as unknown as NationalSnapshot;
    expect((await drawnNationalSnapshot(s)).payload.charts).toEqual({ means: await renderVegaLiteSvg(spec), change: '<svg>kept</svg>' });
  });
});
