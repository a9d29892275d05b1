import crypto from 'node:crypto';
import * as vega from 'vega';
import { compile, version as vegaLiteVersion, type TopLevelSpec } from 'vega-lite';

// vega exports its version at run time; its typings do not declare it.
const VEGA_VERSION = (vega as unknown as { version: string }).version;

// Without a canvas vega estimates a text's width as 0.8 × font size per character, about half again as
// wide as common sans-serif faces draw it: long titles and labels then widen a chart's layout with empty
// space. A width per character class is closer (common practice for headless text layout; the classes
// and their factors are ours, from the advance widths of common sans-serif faces, from memory).
const NARROW = /[ijlt.,:;'|!()[\]{}\s·-]/;
const WIDE = /[A-Zmw%@]/;
/** Estimated width in pixels of a text at a font size: 0.3, 0.56 or 0.75 em per character by class. */
export function textWidthEstimate(text: string, fontSize: number): number {
  let em = 0;
  for (const c of text) em += NARROW.test(c) ? 0.3 : WIDE.test(c) ? 0.75 : 0.56;
  return em * fontSize;
}
type TextItem = { fontSize?: number; text?: unknown };
const metrics = (vega as unknown as { textMetrics: { width: (item: TextItem, text?: unknown) => number } }).textMetrics;
metrics.width = (item, text) => {
  const t = text ?? item.text;
  return textWidthEstimate(Array.isArray(t) ? t.join(' ') : t === null || t === undefined ? '' : String(t), item.fontSize ?? 11);
};

/** Every report chart is drawn this wide and (single views) this high, in SVG pixels, so the charts of a page line up. */
export const REPORT_CHART_SIZE = { width: 640, height: 360 } as const;

/** A single (or layered) view filling exactly REPORT_CHART_SIZE, padding and legends included. */
export const REPORT_CHART_FRAME = { ...REPORT_CHART_SIZE, autosize: { type: 'fit', contains: 'padding' } } as const;

/**
 * Renders a vega-lite specification to an SVG string, headless (no canvas), at the report's width: a
 * chart whose layout came out wider or narrower (a concatenation of panels cannot be fitted by vega) is
 * scaled to REPORT_CHART_SIZE.width through its viewBox, so every chart of a page has the same width.
 */
export async function renderVegaLiteSvg(spec: TopLevelSpec): Promise<string> {
  const view = new vega.View(vega.parse(compile(spec).spec), { renderer: 'none' });
  try {
    return atReportWidth(await view.toSVG());
  } finally {
    view.finalize();
  }
}

/** The SVG with its root width set to REPORT_CHART_SIZE.width and its height scaled alike (the viewBox keeps the drawing). */
export function atReportWidth(svg: string): string {
  const m = /^<svg\b[^>]*?\swidth="([\d.]+)"\s+height="([\d.]+)"/.exec(svg);
  if (!m) return svg;
  const [w, h] = [Number(m[1]), Number(m[2])];
  const width = REPORT_CHART_SIZE.width;
  if (!(w > 0) || w === width) return svg;
  const height = Math.round((h * width) / w);
  return svg.replace(/^(<svg\b[^>]*?\s)width="[\d.]+"\s+height="[\d.]+"/, `$1width="${width}" height="${height}"`);
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
