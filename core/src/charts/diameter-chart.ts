// The diameter distribution of one plot visit: live stems per hectare and basal area per hectare by
// diameter class (the stand-table classes), two panels of equal size.
import type { TopLevelSpec } from 'vega-lite';
import { classWords } from '../region-summary/stand-table';
import { variableLabel } from '../region-summary/variables';
import { REPORT_CHART_CONFIG, REPORT_COLOURS, renderVegaLiteSvg } from './render';

/** One diameter class of a plot: lowerCm ≤ D < upperCm (null: open), with its figures per hectare. */
export interface DiameterClassFigures {
  readonly lowerCm: number;
  readonly upperCm: number | null;
  readonly stemsHa: number;
  readonly basalAreaM2Ha: number;
}

const titled = (variable: string): string => {
  const l = variableLabel(variable);
  return l.unit ? `${l.name} (${l.unit})` : l.name;
};

/** Bars by diameter class: stem density and basal area (catalogue labels and units); null without classes. */
export function buildDiameterChartSpec(classes: readonly DiameterClassFigures[], title: string): TopLevelSpec | null {
  if (!classes.length) return null;
  const values = classes.map((c) => ({ cls: classWords(c.lowerCm, c.upperCm), stems: c.stemsHa, ba: c.basalAreaM2Ha }));
  const order = values.map((v) => v.cls);
  const x = { field: 'cls', type: 'ordinal', sort: order, title: 'Diameter class at breast height', axis: { labelAngle: -40 } };
  const panel = (field: string, variable: string) => ({
    width: 300,
    height: 200,
    mark: { type: 'bar', color: REPORT_COLOURS.region, aria: false },
    encoding: { x, y: { field, type: 'quantitative', title: titled(variable) } },
  });
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    background: 'white',
    padding: 8,
    title: { text: title, subtitle: 'live stems, each expanded by the area it was measured on' },
    data: { values },
    hconcat: [panel('stems', 'stems_ha'), panel('ba', 'basal_area_m2_ha')],
    spacing: 30,
    config: REPORT_CHART_CONFIG,
  } as unknown as TopLevelSpec;
}

export async function renderDiameterChartSvg(classes: readonly DiameterClassFigures[], title: string): Promise<string | null> {
  const spec = buildDiameterChartSpec(classes, title);
  return spec ? renderVegaLiteSvg(spec) : null;
}
