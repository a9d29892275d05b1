import { listRegionLatestPlots, PLOT_METRIC_DB_COLUMNS, type Queryable } from '@stemwise/db';
import { encodeFeatureCollection, type Row } from '@stemwise/core';

/** Properties of each plot feature: identity, then the `export plots` metric columns. */
export const PLOT_PROPERTY_COLUMNS = ['plot_id', 'survey_date', 'region', 'forest_type', 'elevation_m', ...PLOT_METRIC_DB_COLUMNS.map(([c]) => c)];

/** GeoJSON (RFC 7946) text of a region's plots: the latest computed visit of each, WGS 84 lon/lat. */
export async function regionPlotsGeoJson(db: Queryable, region: string): Promise<string> {
  const plots = await listRegionLatestPlots(db, region);
  const features = plots.map((p) => ({
    row: { plot_id: p.plotKey, survey_date: p.surveyDate, region, forest_type: p.forestType, elevation_m: p.elevationM, ...p.metrics } as Row,
    longitude: p.longitude,
    latitude: p.latitude,
  }));
  let out = '';
  for await (const part of encodeFeatureCollection(PLOT_PROPERTY_COLUMNS, features)) out += part;
  return out;
}
