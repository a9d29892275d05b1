import { getFitChart, type Queryable } from '@stemwise/db';
import { asStoredFitChart } from '@stemwise/core';
import { chartSpecKey, regionChartPoints, renderFitChartSvg, renderVegaLiteSvg, type TopLevelSpec } from '@stemwise/core/charts';
import type { Config, Logger } from '@stemwise/platform';
import type { NationalPayload, NationalSnapshot } from './national-snapshot';
import type { ChartSource, DrawnCharts, FitChart, Snapshot } from './snapshot-payload';

// The SVG of the pages' charts and maps, drawn when a page is first served: the compute jobs store what
// a chart shows (snapshots keep each chart's vega-lite specification), and the SVG drawn from it is kept
// in memory by a key of what it draws, least recently used dropped beyond a count and a size, so a page
// seen again costs no drawing and the jobs draw nothing.

/** SVG drawings kept by key, least recently used dropped beyond `maxEntries` or `maxChars` characters of SVG in all. */
export class SvgCache {
  private readonly entries = new Map<string, { svg: Promise<string | null>; chars: number }>();
  private chars = 0;

  constructor(
    readonly maxEntries: number,
    readonly maxChars: number,
  ) {}

  /** The drawing kept under `key`, else `draw()` kept under it (a failed drawing is not kept). Callers at the same time share one drawing. */
  get(key: string, draw: () => Promise<string | null>): Promise<string | null> {
    const hit = this.entries.get(key);
    if (hit) {
      this.entries.delete(key); // re-inserted: most recently used last
      this.entries.set(key, hit);
      return hit.svg;
    }
    const entry = { svg: Promise.resolve().then(draw), chars: 0 };
    this.entries.set(key, entry);
    entry.svg.then(
      (svg) => {
        if (this.entries.get(key) !== entry) return;
        entry.chars = svg?.length ?? 0;
        this.chars += entry.chars;
        this.trim();
      },
      () => {
        if (this.entries.get(key) === entry) this.entries.delete(key);
      },
    );
    this.trim();
    return entry.svg;
  }

  /** Drawings kept, and their characters of SVG. */
  get size(): { entries: number; chars: number } {
    return { entries: this.entries.size, chars: this.chars };
  }

  private trim(): void {
    for (const [key, entry] of this.entries) {
      if (this.entries.size <= this.maxEntries && this.chars <= this.maxChars) return;
      this.entries.delete(key);
      this.chars -= entry.chars;
    }
  }
}

/**
 * The drawings of this process: the charts of about twenty region pages (a region page has up to six
 * charts and a map, a fit chart with every plot of its forest type a few hundred kB of SVG at 8,000
 * plots), and never more than 64 MB of SVG text (stemwise's choice).
 */
export const drawnSvgs = new SvgCache(160, 64 * 1024 * 1024);

// The key of a specification object, worked out once: a snapshot kept in memory serves its page again
// with the same objects, and hashing a fit chart's specification (thousands of points) is not free.
const keys = new WeakMap<object, string>();

/** The key under which a chart's SVG is kept: chartSpecKey of its specification (equal keys draw equal SVG). */
export function chartKey(spec: TopLevelSpec): string {
  let key = keys.get(spec);
  if (key === undefined) keys.set(spec, (key = `chart:${chartSpecKey(spec)}`));
  return key;
}

/** The SVG of a chart's specification, drawn now or kept from an earlier page. */
export async function chartSvg(spec: TopLevelSpec): Promise<string> {
  return (await drawnSvgs.get(chartKey(spec), () => renderVegaLiteSvg(spec))) as string;
}

/** The SVG of a stored chart, or null (with the reason logged) when it cannot be drawn. */
export async function sourceSvg(source: ChartSource | null | undefined, what: string, log?: Pick<Logger, 'error'>): Promise<string | null> {
  if (source === null || source === undefined) return null;
  if (typeof source === 'string') return source;
  try {
    return await chartSvg(source);
  } catch (err) {
    log?.error({ err, chart: what }, 'chart could not be drawn');
    return null;
  }
}

type DrawnFitChart = DrawnCharts['fits'][number];

async function fitSvg(chart: FitChart, log?: Pick<Logger, 'error'>): Promise<DrawnFitChart> {
  const { spec, svg: kept, ...rest } = chart;
  if (!spec) return { ...rest, svg: kept ?? null };
  try {
    return { ...rest, svg: await chartSvg(spec) };
  } catch (err) {
    // The numbers stand without their picture: the page says why the chart is missing.
    log?.error({ err, forestType: chart.forest_type }, 'fit chart could not be drawn');
    return { ...rest, svg: null, missing: `the chart could not be drawn (${(err as Error).message})` };
  }
}

/** A region's snapshot with its charts drawn, as its page shows it. */
export async function drawnSnapshot(s: Snapshot, log?: Pick<Logger, 'error'>): Promise<Snapshot<DrawnCharts>> {
  const c = s.payload.charts;
  const means = await sourceSvg(c.means, 'means', log);
  const guilds = await sourceSvg(c.guilds, 'guilds', log);
  const change = await sourceSvg(c.change, 'change', log);
  const fits: DrawnFitChart[] = [];
  for (const f of c.fits) fits.push(await fitSvg(f, log));
  return { ...s, payload: { ...s.payload, charts: { means, guilds, change, fits } } };
}

/** The national snapshot with its charts drawn, as its page shows it. */
export type DrawnNationalSnapshot = NationalSnapshot & { readonly payload: NationalPayload & { readonly charts: { readonly means: string | null; readonly change?: string | null } } };

export async function drawnNationalSnapshot(s: NationalSnapshot, log?: Pick<Logger, 'error'>): Promise<DrawnNationalSnapshot> {
  const c = s.payload.charts;
  const means = await sourceSvg(c.means, 'national means', log);
  const change = await sourceSvg(c.change, 'national change', log);
  return { ...s, payload: { ...s.payload, charts: { means, change } } };
}

/**
 * The chart of a forest type as a whole (every plot alike, no region highlighted) from what the fits
 * job stored, drawn now (the demo's report folder); null when no chart is stored.
 */
export async function forestTypeFitChartSvg(deps: { db: Queryable; config: Pick<Config, 'fitMetric' | 'fitAxis'> }, forestType: string): Promise<string | null> {
  const { fitMetric: metric, fitAxis: axis } = deps.config;
  const stored = asStoredFitChart(await getFitChart(deps.db, forestType, metric, axis));
  return stored && renderFitChartSvg({ forestType, metric, axis, points: regionChartPoints(stored.points, null), chart: stored });
}
