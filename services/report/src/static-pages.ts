import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { listLatestSnapshots, listNationalVersions, listRegionHeads, listSummaryVersions } from '@stemwise/db';
import { IPCC_2006_CARBON_FRACTION, type ServiceDeps } from '@stemwise/core';
import { readNationalSnapshot } from './national-snapshot';
import { renderIndexPage } from './page/index-page';
import { renderNationalPage } from './page/national-page';
import { renderRegionPage } from './page/region-page';
import { regionPlotsGeoJson } from './plots-geojson';
import { mapSection } from './page/map-section';
import { DEFAULT_PLOT_SORT, plotTable, plotTableVariables } from './page/plot-table';
import { DEFAULT_MAP_VARIABLE, plotMapSvg, readRegionPlots, type RegionPlots } from './plot-map';
import { readSummaryChanges } from './what-changed';
import { nationalJson, summaryCsv, summaryJson } from './representations';
import type { DrawnCharts, Snapshot, SnapshotPayload } from './snapshot-payload';
import { drawnNationalSnapshot, drawnSnapshot } from './chart-svgs';

/** A file-name-safe, unique-enough name for a region (names may hold any character). */
export function regionSlug(region: string): string {
  const base = region
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60);
  const plain = base === region.toLowerCase();
  return plain && base ? base : `${base || 'region'}-${crypto.createHash('sha256').update(region).digest('hex').slice(0, 6)}`;
}

// The fit charts' points link to plot pages on the server; the files have none, so the links go.
function withoutPlotLinks(payload: SnapshotPayload<DrawnCharts>): SnapshotPayload<DrawnCharts> {
  const unlink = (svg: string | null) => svg && svg.replace(/<a\b[^>]*>|<\/a>/g, '');
  return { ...payload, charts: { ...payload.charts, fits: payload.charts.fits.map((c) => ({ ...c, svg: unlink(c.svg) })) } };
}

export interface WrittenPages {
  index: string;
  /** national.html, when a national summary exists. */
  national: string | null;
  regions: Array<{ region: string; version: number; page: string }>;
  files: string[];
}

/**
 * The report as files (what `stemwise demo` leaves behind): index.html, and per region with a summary
 * regions/<slug>.html with its summary CSV and JSON and its plots GeoJSON beside it, and national.html
 * with national-summary.csv and .json when the national summary exists. Links are relative,
 * so the folder can be opened from disk or copied anywhere. Covers every region (no token applies).
 */
export async function writeRegionPages(deps: Pick<ServiceDeps, 'db'>, outDir: string): Promise<WrittenPages> {
  const { db } = deps;
  const regionsDir = path.join(outDir, 'regions');
  fs.mkdirSync(regionsDir, { recursive: true });
  const files: string[] = [];
  const write = (file: string, text: string) => {
    fs.writeFileSync(file, text);
    files.push(file);
  };
  const written: WrittenPages['regions'] = [];
  const allPlots: RegionPlots[] = [];
  const staticMap = async (what: string) =>
    mapSection({ svg: await plotMapSvg(allPlots, DEFAULT_MAP_VARIABLE, what, null), variable: DEFAULT_MAP_VARIABLE, choices: null, what, linked: false });
  const slugs = new Map<string, string>();
  for (const row of await listLatestSnapshots(db)) {
    // The charts are drawn now, from the specifications the snapshot keeps.
    const drawn = await drawnSnapshot({ region: row.region, version: row.version, etag: row.etag, createdAt: row.createdAt, payload: row.payload as SnapshotPayload });
    const snapshot: Snapshot<DrawnCharts> = { ...drawn, payload: withoutPlotLinks(drawn.payload) };
    let slug = regionSlug(row.region);
    if ([...slugs.values()].includes(slug)) slug = `${slug}-${crypto.createHash('sha256').update(row.region).digest('hex').slice(0, 6)}`;
    slugs.set(row.region, slug);
    write(path.join(regionsDir, `${slug}-summary.csv`), summaryCsv(snapshot));
    write(path.join(regionsDir, `${slug}-summary.json`), summaryJson(snapshot));
    write(path.join(regionsDir, `${slug}-plots.geojson`), await regionPlotsGeoJson(db, row.region));
    const versions = await listSummaryVersions(db, row.region);
    // No server behind the files: the map keeps its default colouring, and plots are not links.
    const groups = await readRegionPlots(db, [row.region]);
    allPlots.push(...groups);
    const what = `Plots of ${row.region}`;
    const map = mapSection({ svg: await plotMapSvg(groups, DEFAULT_MAP_VARIABLE, what, null), variable: DEFAULT_MAP_VARIABLE, choices: null, what, linked: false });
    const table = plotTable({ plots: groups[0].plots, variables: plotTableVariables(null), sort: DEFAULT_PLOT_SORT, sortHref: null, plotHref: null });
    const page = path.join(regionsDir, `${slug}.html`);
    write(
      page,
      renderRegionPage({
        snapshot,
        versions,
        plots: { map, table },
        changes: await readSummaryChanges(db, row.region, snapshot.version),
        links: {
          index: '../index.html',
          summaryJson: `${slug}-summary.json`,
          summaryCsv: `${slug}-summary.csv`,
          plotsGeoJson: `${slug}-plots.geojson`,
          versionPage: null,
          signOut: null,
        },
      }),
    );
    written.push({ region: row.region, version: row.version, page });
  }
  const entries = (await listRegionHeads(db)).map((h) => ({
    region: h.region,
    plots: h.plots,
    version: h.head?.version ?? null,
    updatedAt: h.head?.createdAt ?? null,
    href: slugs.has(h.region) ? `regions/${slugs.get(h.region)}.html` : null,
  }));
  const national = await readNationalSnapshot(db);
  let nationalPage: string | null = null;
  if (national) {
    write(path.join(outDir, 'national-summary.csv'), summaryCsv(national));
    write(path.join(outDir, 'national-summary.json'), nationalJson(national));
    nationalPage = path.join(outDir, 'national.html');
    const links = { index: 'index.html', summaryJson: 'national-summary.json', summaryCsv: 'national-summary.csv', versionPage: null, signOut: null };
    write(nationalPage, renderNationalPage({ snapshot: await drawnNationalSnapshot(national), carbonFraction: IPCC_2006_CARBON_FRACTION, versions: await listNationalVersions(db), links, map: await staticMap('Plots of all regions') }));
  }
  const index = path.join(outDir, 'index.html');
  write(index, renderIndexPage(entries, { carbonFraction: IPCC_2006_CARBON_FRACTION, signOut: null, national: national && { snapshot: national, href: 'national.html' }, map: await staticMap('Plots of the regions listed') }));
  return { index, national: nationalPage, regions: written, files };
}
