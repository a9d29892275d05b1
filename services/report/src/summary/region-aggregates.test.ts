import { describe, expect, it } from 'vitest';
import { DEFAULT_REGION_VARIABLES, diameterClasses, isPerHectare, standTableValues, stratifiedEstimate, type StratifiedEstimate, type StratumValues } from '@stemwise/core';
import { biomassMethodShares, joinBiomassParts, sharesOf, BIOMASS_METHOD_COLUMNS } from './biomass-method';
import { changeCoverage, coverageOf, joinChangeParts, type PlotPair } from './change-coverage';
import { RegionSummaryInputError, type PlotMetrics } from './input';
import { combineNation, summariseNation, type NationalRegionInput } from './national-summary';
import { CHANGE_VARIABLES, summaryVariables, variableList } from './region-summary';
import { asRegionAggregates, regionAggregates, type RegionAggregates } from './region-aggregates';

// Invented scenario: the (invented) Republic of Oskeland with the regions Ardel, Brisk and Corvan and
// the forest types ridge, valley and fen. Values come from a seeded generator, never real data; the
// check is that the national summary from each region's stored aggregates (n_h, ȳ_h, s_h² per region ×
// forest type, through JSON as in region_summaries.aggregates) is the plot-by-plot summary to the last bit.

// A seeded generator (Park & Miller 1988 minimal standard LCG), for data nobody chose by hand.
function lcg(seed: number): () => number {
  let x = seed;
  return () => (x = (x * 48271) % 2147483647) / 2147483647;
}

type Plot = PlotMetrics & PlotPair;
const SHARES = Object.values(BIOMASS_METHOD_COLUMNS);
const CLASSES = diameterClasses(10).length;

function regionPlots(region: string, seed: number, counts: Record<string, number>, opts: { change: boolean; stand: boolean }): Plot[] {
  const rand = lcg(seed);
  const plots: Plot[] = [];
  for (const [type, n] of Object.entries(counts)) {
    for (let j = 0; j < n; j++) {
      const maybe = (x: number) => (rand() < 0.2 ? null : x); // about one value in five missing
      const agb = maybe(80 + 300 * rand());
      const measured = rand();
      const values: Record<string, number | null> = {
        stems_ha: maybe(300 + 900 * rand()),
        carbon_mg_ha: agb === null ? null : 0.47 * agb,
        agb_mg_ha: agb,
        ...Object.fromEntries(SHARES.map((c, k) => [c, k === 0 ? measured : k === 1 ? 1 - measured : k === 3 ? rand() : 0])),
        ...Object.fromEntries(CHANGE_VARIABLES.map((v) => [v, opts.change && j % 2 === 0 ? maybe(-3 + 6 * rand()) : null])),
      };
      const stand = opts.stand ? standTableValues({ thresholdCm: 10, classes: Array.from({ length: CLASSES }, (_, k) => (k < 2 ? [200 * rand(), 10 * rand(), 90 * rand()] : [0, 0, 0])) }) : {};
      const day = String(1 + Math.floor(28 * rand())).padStart(2, '0');
      plots.push({
        plotId: `${region}-${type}-${j}`,
        forestType: type,
        values: { ...values, ...stand },
        surveyDate: `2024-0${1 + (j % 9)}-${day}`,
        pair: opts.change && j % 2 === 0 ? { dateFrom: `2019-0${1 + (j % 9)}-${day}`, years: 4 + rand() * 2 } : null,
      });
    }
  }
  return plots;
}

// Ardel/fen and Corvan/valley have a single plot; Brisk has no change and no stand tables; Dunmore has no plot.
const REGIONS: Array<NationalRegionInput & { plots: readonly Plot[] }> = [
  { region: 'Ardel', plots: regionPlots('Ardel', 11, { ridge: 9, valley: 7, fen: 1 }, { change: true, stand: true }), forestAreas: { ridge: 1200, valley: 800, fen: 90 } },
  { region: 'Brisk', plots: regionPlots('Brisk', 23, { ridge: 12, valley: 5 }, { change: false, stand: true }), forestAreas: { ridge: 2100, valley: 350, fen: 40 } },
  { region: 'Corvan', plots: regionPlots('Corvan', 37, { ridge: 6, valley: 1 }, { change: true, stand: true }), forestAreas: { ridge: 640, valley: 75 } },
  { region: 'Dunmore', plots: [], forestAreas: { ridge: 10 } },
];
const VARIABLES = ['stems_ha', 'carbon_mg_ha', 'agb_net_change_mg_ha_yr', 'stand_10_20_stems_ha'];
// As stored in region_summaries.aggregates (jsonb) and read back.
const stored = (r: { region: string; plots: readonly Plot[] }): RegionAggregates => asRegionAggregates(JSON.parse(JSON.stringify(regionAggregates(r.region, r.plots)))) as RegionAggregates;

// The national estimate as it was made before the aggregates, plot by plot: each region × forest type
// stratum given its plots' values (Cochran 1977 ch. 5 through stratifiedEstimate).
function plotByPlot(regions: readonly NationalRegionInput[], forestType: string | null, variable: string, weighting: 'area' | 'plot_count'): StratifiedEstimate {
  const strata: StratumValues[] = [];
  for (const r of regions) {
    for (const t of [...new Set(r.plots.map((p) => p.forestType))].sort()) {
      if (forestType !== null && t !== forestType) continue;
      strata.push({ name: `${r.region} / ${t}`, size: weighting === 'area' ? r.forestAreas![t] : null, values: r.plots.filter((p) => p.forestType === t).map((p) => p.values[variable] ?? null) });
    }
  }
  return stratifiedEstimate(strata, { weighting });
}

describe('the national summary from the regions’ aggregates (docs/methods.md#national-estimates)', () => {
  it.each([
    ['forest-area weights', REGIONS, 'area'],
    ['plot-count weights (an area missing)', REGIONS.map((r) => (r.region === 'Corvan' ? { ...r, forestAreas: { ridge: 640 } } : r)), 'plot_count'],
  ] as const)('gives exactly (toBe) the plot-by-plot estimates with %s, nulls and single-plot strata', (_, regions, weighting) => {
    const fromAggregates = combineNation({ regions: regions.map((r) => ({ region: r.region, forestAreas: r.forestAreas, strata: stored(r) })), variables: VARIABLES });
    expect(fromAggregates.weighting).toBe(weighting);
    for (const variable of VARIABLES) {
      for (const type of [null, 'fen', 'ridge', 'valley']) {
        const want = plotByPlot(regions, type, variable, weighting);
        const got = fromAggregates.rows.find((r) => r.forest_type === (type ?? 'all') && r.variable === variable)!;
        const at = `${type ?? 'all'} ${variable}`;
        expect(got.n_plots, at).toBe(want.n);
        expect(got.mean, at).toBe(want.mean);
        expect(got.se, at).toBe(want.se);
        expect(got.ci_low, at).toBe(want.ciLow);
        expect(got.ci_high, at).toBe(want.ciHigh);
        expect(got.sampling_error_pct, at).toBe(want.samplingErrorPct);
        expect(got.total, at).toBe(isPerHectare(variable) ? want.total : null);
        expect(fromAggregates.estimate_details.find((d) => d.forest_type === (type ?? 'all') && d.variable === variable)?.df, at).toBe(want.df);
      }
    }
    // Single-plot strata leave the SE empty where they have a value; the figures are still those of the plots.
    expect(fromAggregates.estimate_details.find((d) => d.forest_type === 'all' && d.variable === 'stems_ha')?.single_plot_strata.length).toBeGreaterThan(0);
    // The whole summary (strata, notes, totals) equals the one from the plots.
    expect(fromAggregates).toStrictEqual(summariseNation({ regions, variables: VARIABLES }));
  });

  it('finds the variables, change coverage and biomass method shares of all plots from the regions’ parts', () => {
    const all = REGIONS.flatMap((r) => r.plots);
    const aggregates = REGIONS.map(stored);
    const change = aggregates.some((a) => CHANGE_VARIABLES.some((v) => a.moments[v]?.some((m) => m.n > 0)));
    expect(variableList(change, aggregates.flatMap((a) => Object.keys(a.moments)))).toEqual(summaryVariables(all));
    expect(summaryVariables(all)).toContain('stand_10_20_stems_ha');
    expect(summaryVariables(all)).toContain('agb_net_change_mg_ha_yr');
    // Years between visits are summed in the same order: the mean to the last bit.
    const coverage = coverageOf(joinChangeParts(aggregates.map((a) => a.change)));
    expect(coverage).toStrictEqual(changeCoverage(all));
    expect(coverage?.n_plots_with_pair).toBeGreaterThan(0);
    expect(sharesOf(joinBiomassParts(aggregates.map((a) => a.biomass)), aggregates.flatMap((a) => a.forest_types.map((t) => t.forest_type)))).toStrictEqual(biomassMethodShares(all));
    const dates = (plots: readonly Plot[]) => plots.map((p) => p.surveyDate).sort();
    expect(aggregates.map((a) => [a.first_survey, a.last_survey])).toEqual(REGIONS.map((r) => (r.plots.length ? [dates(r.plots)[0], dates(r.plots).at(-1)] : [null, null])));
  });

  it('refuses, as the plot-by-plot summary does, a variable that no plot of a region with plots has a key for', () => {
    // Brisk's plots have no stand table at all.
    const withoutStand = REGIONS.map((r) => (r.region === 'Brisk' ? { ...r, plots: regionPlots('Brisk', 23, { ridge: 12, valley: 5 }, { change: false, stand: false }) } : r));
    const variables = ['stems_ha', 'stand_10_20_stems_ha'];
    expect(() => summariseNation({ regions: withoutStand, variables })).toThrow(/no plot has a value key for stand_10_20_stems_ha/);
    expect(() => combineNation({ regions: withoutStand.map((r) => ({ region: r.region, forestAreas: r.forestAreas, strata: stored(r) })), variables })).toThrow(/no plot has a value key for stand_10_20_stems_ha/);
    expect(() => combineNation({ regions: [{ region: 'national', strata: stored(REGIONS[0]) }], variables })).toThrow(RegionSummaryInputError);
  });

  it('reads back only aggregates of its own format (older versions have none: the plots are read instead)', () => {
    expect(asRegionAggregates(null)).toBeNull();
    expect(asRegionAggregates({ ...stored(REGIONS[0]), format: 0 })).toBeNull();
    expect(asRegionAggregates(stored(REGIONS[0]))?.forest_types.map((t) => t.forest_type)).toEqual(['fen', 'ridge', 'valley']);
    expect(DEFAULT_REGION_VARIABLES.every((v) => v in stored(REGIONS[0]).moments || !REGIONS[0].plots.some((p) => v in p.values))).toBe(true);
  });
});
