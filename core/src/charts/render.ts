import crypto from 'node:crypto';
import * as vega from 'vega';
import { compile, version as vegaLiteVersion, type TopLevelSpec } from 'vega-lite';

// vega exports its version at run time; its typings do not declare it.
const VEGA_VERSION = (vega as unknown as { version: string }).version;

/** Renders a vega-lite specification to an SVG string, headless (no canvas). */
export async function renderVegaLiteSvg(spec: TopLevelSpec): Promise<string> {
  const view = new vega.View(vega.parse(compile(spec).spec), { renderer: 'none' });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

/**
 * A key of the picture a specification draws: SHA-256 of the spec with the chart libraries' versions.
 * Equal keys draw equal SVG, so a chart whose key is unchanged need not be drawn again.
 */
export function chartSpecKey(spec: TopLevelSpec): string {
  return crypto.createHash('sha256').update(`vega ${VEGA_VERSION} vega-lite ${vegaLiteVersion}\n`).update(JSON.stringify(spec)).digest('base64url');
}

/** Shared look of the report's own charts: plain, our own palette. */
export const REPORT_CHART_CONFIG = {
  font: 'sans-serif',
  view: { stroke: '#d5d2c8' },
  axis: { gridColor: '#ebe8df', domainColor: '#8a877d', tickColor: '#8a877d', labelColor: '#2b2f2a', titleColor: '#2b2f2a', titleFontWeight: 'normal' },
  header: { labelColor: '#2b2f2a', titleColor: '#2b2f2a', labelFontSize: 12 },
  legend: { labelColor: '#2b2f2a', titleColor: '#2b2f2a' },
  title: { color: '#2b2f2a', fontSize: 14, anchor: 'start' },
} as const;

/** Colours of the report: the region estimate in deep spruce, forest types in a lighter tone. */
export const REPORT_COLOURS = {
  region: '#2f5d50',
  forestType: '#93b5a4',
  interval: '#3b2a1a',
  guild: { pioneer: '#d9a441', light_demander: '#8cae72', shade_tolerant: '#2f5d50', unassigned: '#bdbab0' },
} as const;

/** How `forest_type = all` (the stratified whole-region estimate) is labelled for people. */
export const WHOLE_REGION_LABEL = 'whole region';
