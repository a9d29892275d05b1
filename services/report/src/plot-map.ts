import crypto from 'node:crypto';
import { listRegionLatestPlots, PLOT_METRICS, type Queryable, type RegionPlotRow } from '@stemwise/db';
import { renderPlotMapSvg, type MapPlot } from '@stemwise/core/charts';
import { drawnSvgs } from './chart-svgs';

// The plot maps of the pages: the latest computed visit of each plot at its coordinates, coloured by a
// variable the reader picks among the `export plots` columns. Drawn when a page is asked for; the SVG
// of equal inputs is kept with the pages' charts (chart-svgs.ts, least recently used dropped), so a page
// seen again costs one query, not a drawing.

/** Address of a plot's page on the server. */
export const plotPagePath = (region: string, plotKey: string): string => `/regions/${encodeURIComponent(region)}/plots/${encodeURIComponent(plotKey)}`;

/** Columns a map may be coloured by: every numeric column of `export plots` (the catalogue). */
export const MAP_VARIABLES: readonly string[] = PLOT_METRICS.map((m) => m.column);
/** What a map shows unless the reader picks another: above-ground biomass. */
export const DEFAULT_MAP_VARIABLE = 'agb_mg_ha';

export interface RegionPlots {
  readonly region: string;
  readonly plots: readonly RegionPlotRow[];
}

/** The latest computed plots of each region, in the order given. */
export async function readRegionPlots(db: Queryable, regions: readonly string[]): Promise<RegionPlots[]> {
  const out: RegionPlots[] = [];
  for (const region of regions) out.push({ region, plots: await listRegionLatestPlots(db, region) });
  return out;
}

/**
 * The SVG map of these plots coloured by `variable`; `href` gives each plot's page (null: no links).
 * Inputs that draw the same picture share one drawing.
 */
export function plotMapSvg(groups: readonly RegionPlots[], variable: string, title: string, href: ((region: string, plotKey: string) => string) | null): Promise<string | null> {
  const column = variable as keyof RegionPlotRow['metrics'];
  const plots: MapPlot[] = groups.flatMap((g) =>
    g.plots.map((p) => ({ plot: p.plotKey, longitude: p.longitude, latitude: p.latitude, value: p.metrics[column] ?? null, href: href ? href(g.region, p.plotKey) : null, region: g.region })),
  );
  const key = crypto.createHash('sha256').update(JSON.stringify([variable, title, plots])).digest('base64url');
  return drawnSvgs.get(`map:${key}`, () => renderPlotMapSvg({ plots, variable, title }));
}
