import { upsertCurveFits, upsertFitChart, type CurveFitRow, type Db } from '@stemwise/db';
import { fitChartData, fitChartPoints, fitCurves } from '@stemwise/core';
import { seedForestArea, seedPlots, seedSpecies, type FixturePlot } from './fixture';

// The invented scenario of the report tests. Tessaly has three regions:
//  - Northvale: forest types wet (3 plots, 3000 ha) and dry (2 plots, 1000 ha): area weighting;
//  - Southmere: moist only (5 plots), no forest areas: plot-count weighting;
//  - Ostmark: 2 wet plots, never summarised (no snapshot).
// Values are chosen so every estimate can be worked by hand (see summaries.test.ts).

const guilds = { pioneer_ba_share: 0.1, light_demander_ba_share: 0.3, shade_tolerant_ba_share: 0.5, unassigned_ba_share: 0.1 };

export const NORTHVALE: FixturePlot[] = [
  { key: 'NV-W1', region: 'Northvale', forestType: 'wet', date: '2025-11-04', metrics: { basal_area_m2_ha: 20, stems_ha: 400, agb_mg_ha: 191.5, carbon_mg_ha: 90, fisher_alpha: 8, richness: 12, disturbance_index: 0.05, ...guilds }, species: ['Arborea lucida', 'Arborea splendens', 'Velox primus'] },
  { key: 'NV-W2', region: 'Northvale', forestType: 'wet', date: '2025-11-05', metrics: { basal_area_m2_ha: 24, stems_ha: 500, agb_mg_ha: 234, carbon_mg_ha: 110, fisher_alpha: 10, richness: 14, disturbance_index: 0.2, ...guilds }, species: ['Lumenia alta', 'indet'] },
  { key: 'NV-W3', region: 'Northvale', forestType: 'wet', date: '2026-02-10', metrics: { basal_area_m2_ha: 28, stems_ha: 600, agb_mg_ha: 276.6, carbon_mg_ha: 130, fisher_alpha: 12, richness: 16, disturbance_index: 0.45, ...guilds }, species: ['Quercella tessalica'] },
  { key: 'NV-D1', region: 'Northvale', forestType: 'dry', date: '2025-10-01', metrics: { basal_area_m2_ha: 10, stems_ha: 300, agb_mg_ha: 85.1, carbon_mg_ha: 40, fisher_alpha: 4, richness: 6, disturbance_index: 0.7, ...guilds }, species: ['Velox primus'] },
  { key: 'NV-D2', region: 'Northvale', forestType: 'dry', date: '2025-10-02', metrics: { basal_area_m2_ha: 14, stems_ha: 340, agb_mg_ha: 119.1, carbon_mg_ha: 56, fisher_alpha: 6, richness: 8, disturbance_index: 0.35, ...guilds } },
];

export const SOUTHMERE: FixturePlot[] = [10, 12, 14, 16, 18].map((ba, i) => ({
  key: `SM-${i + 1}`,
  region: 'Southmere',
  forestType: 'moist',
  date: '2026-01-15',
  metrics: { basal_area_m2_ha: ba, stems_ha: 300 + 10 * i, agb_mg_ha: 90 + i, carbon_mg_ha: 42 + i, fisher_alpha: 5 + i, richness: 7 + i, disturbance_index: 0.1 * i, ...guilds },
  species: ['Velox primus'],
}));

export const OSTMARK: FixturePlot[] = [
  { key: 'OM-1', region: 'Ostmark', forestType: 'wet', metrics: { basal_area_m2_ha: 30, fisher_alpha: 9, disturbance_index: 0.3, ...guilds } },
  { key: 'OM-2', region: 'Ostmark', forestType: 'wet', metrics: { basal_area_m2_ha: 26, fisher_alpha: 11, disturbance_index: 0.5, ...guilds } },
];

function fitRow(scope: string, forestType: string, model: 'linear' | 'quadratic', n: number, verdict: string): CurveFitRow {
  return {
    scopeKind: scope === 'all' ? 'forest_type' : 'region', scope, forestType, metric: 'fisher_alpha', axis: 'disturbance_index', model, n,
    b0: 8, b1: 2, b2: model === 'quadratic' ? -1 : null, seB0: 1, seB1: 1, seB2: model === 'quadratic' ? 1 : null,
    pB1: 0.2, pB2: model === 'quadratic' ? 0.4 : null, r2: 0.3, adjR2: 0.1, aicc: 30, peakX: null, peakCiLow: null, peakCiHigh: null, verdict, details: {},
  };
}

/** What a fit stores beside its columns (the shape of fitDetails), invented: a verdict `none` with its evidence. */
export const WET_EVIDENCE = {
  tests: {
    shape: 'hump', deltaAicc: -1.8, quadraticPreferred: false,
    mitchellOldsShaw: { shape: 'hump', b2: -1, pB2: 0.4, curvatureSignificant: false, vertex: 1.2, vertexInside: false, ciInside: false, passes: false, strong: false, reason: null },
    twoLines: { shape: 'hump', breakpoint: 0.35, flatLow: 0.3, flatHigh: 0.4, first: { n: 3, slope: 3.1, se: 2, t: 1.55, p: 0.21 }, second: { n: 2, slope: -0.8, se: 1.6, t: -0.5, p: 0.64 }, passes: false, reason: null },
    lindMehlum: null,
    bootstrap: null,
  },
  peak: null,
  left_out: { 'fisher_alpha:all_singletons': 1 },
};

/** What the fits job stores for a forest type's chart, from the scenario's plots in plot-key order. */
export function scenarioChart(forestType: string): object {
  const plots = [...NORTHVALE, ...SOUTHMERE, ...OSTMARK].filter((p) => p.forestType === forestType).sort((a, b) => (a.key < b.key ? -1 : 1));
  const points = plots.map((p) => ({ x: p.metrics.disturbance_index!, y: p.metrics.fisher_alpha!, region: p.region, plot: p.key }));
  return { ...fitChartData(fitCurves(points.map(({ x, y }) => ({ x, y })))), points: fitChartPoints(points) };
}

export async function seedScenario(db: Db): Promise<void> {
  await seedSpecies(db);
  await seedPlots(db, [...NORTHVALE, ...SOUTHMERE, ...OSTMARK]);
  await seedForestArea(db, 'Northvale', 'wet', 3000);
  await seedForestArea(db, 'Northvale', 'dry', 1000);
  await upsertCurveFits(db, [
    fitRow('all', 'wet', 'linear', 5, 'none'),
    { ...fitRow('all', 'wet', 'quadratic', 5, 'none'), details: WET_EVIDENCE },
    fitRow('all', 'moist', 'linear', 5, 'none'),
    fitRow('Northvale', 'wet', 'linear', 3, 'none'),
    fitRow('Southmere', 'moist', 'linear', 5, 'increasing'),
  ]);
  for (const t of ['wet', 'moist', 'dry']) await upsertFitChart(db, t, 'fisher_alpha', 'disturbance_index', scenarioChart(t));
}
