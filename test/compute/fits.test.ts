import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listStale, markStale } from '@stemwise/db';
import { StemwiseError } from '@stemwise/platform';
import { MIN_REGION_PLOTS, storeFits } from '@stemwise/compute';
import { forestTypeFitChartSvg } from '@stemwise/report';
import { asStoredFitChart, EVIDENCE_COLUMNS, fitCurves, fitRows } from '@stemwise/core';
import { fixtureSpecies, generateInventory, loadInventory, loadSpecies, REGIONS } from './fixtures';
import { fitsText, plotsText, recomputeInProcess } from './support';
import { useServices, type TestServices } from '../support/services';

// The columns of `export fits` exactly as in docs/exports.md.
const SPEC_COLUMNS = (
  'forest_type, metric, axis, n, model, b0, b1, b2, se_b0, se_b1, se_b2, p_b1, p_b2, r2, adj_r2, aicc, peak_x, peak_ci_low, peak_ci_high, verdict, plots_left_out, left_out_reasons, ' +
  'delta_aicc, curvature_p, mos_turn_x, mos_turn_inside, mos_result, two_lines_break_x, two_lines_slope_1, two_lines_p_1, two_lines_slope_2, two_lines_p_2, two_lines_result, peak_boot_low, peak_boot_high'
).split(', ');
const VERDICTS = ['hump', 'increasing', 'decreasing', 'u_shape', 'none'];

type PlotRow = Record<string, string | number | null>;

/** The latest visit of each plot, from `export plots`. */
async function latestVisits(s: TestServices): Promise<Map<string, PlotRow>> {
  const plots = JSON.parse(await plotsText(s.db, 'json')) as PlotRow[];
  const latest = new Map<string, PlotRow>();
  for (const p of plots) {
    const have = latest.get(p.plot_id as string);
    if (!have || (have.survey_date as string) < (p.survey_date as string)) latest.set(p.plot_id as string, p);
  }
  return latest;
}

describe('diversity–disturbance fits', () => {
  let s: TestServices;
  // 30 plots per region × forest type: enough for the region fits (MIN_REGION_PLOTS).
  const inventory = generateInventory({ seed: 21, plotsPerCell: MIN_REGION_PLOTS, stemsPerPlot: 30 });

  beforeAll(async () => {
    s = await useServices({ STEMWISE_BOOTSTRAP: '100' });
    await loadSpecies(s.db, fixtureSpecies());
    await loadInventory(s.db, inventory);
    const { failures } = await recomputeInProcess(s.config, s.db);
    expect(failures).toEqual([]);
  });
  afterAll(async () => s?.cleanup());

  it('exports every spec column, linear then quadratic, for each forest type', async () => {
    const lines = (await fitsText(s.config, s.db)).trim().split('\n');
    expect(lines[0]).toBe(SPEC_COLUMNS.join(','));
    const rows = JSON.parse(await fitsText(s.config, s.db, { format: 'json' })) as Array<Record<string, string | number | null>>;
    expect(rows.map((r) => `${r.forest_type}/${r.model}`)).toEqual(['dry/linear', 'dry/quadratic', 'moist/linear', 'moist/quadratic', 'wet/linear', 'wet/quadratic']);
    for (const r of rows) {
      expect(Object.keys(r)).toEqual(SPEC_COLUMNS);
      expect(r.metric).toBe('fisher_alpha');
      expect(r.axis).toBe('disturbance_index');
      expect(VERDICTS).toContain(r.verdict);
      for (const c of ['b0', 'b1', 'se_b0', 'se_b1', 'p_b1', 'r2', 'adj_r2', 'aicc']) expect(typeof r[c], `${r.forest_type} ${r.model} ${c}`).toBe('number');
      if (r.model === 'linear') for (const c of ['b2', 'se_b2', 'p_b2', 'peak_x']) expect(r[c]).toBeNull();
      else for (const c of ['b2', 'se_b2', 'p_b2']) expect(typeof r[c]).toBe('number');
      if (r.verdict !== 'hump' && r.verdict !== 'u_shape') expect(r.peak_x).toBeNull();
    }
  });

  it('fits exactly the latest visit of each plot where both values are known', async () => {
    const latest = await latestVisits(s);
    const rows = JSON.parse(await fitsText(s.config, s.db, { format: 'json' })) as Array<Record<string, number | string | null>>;
    for (const type of ['wet', 'moist', 'dry']) {
      const points = [...latest.values()]
        .filter((p) => p.forest_type === type && p.fisher_alpha !== null && p.disturbance_index !== null)
        .sort((a, b) => ((a.plot_id as string) < (b.plot_id as string) ? -1 : 1))
        .map((p) => ({ x: p.disturbance_index as number, y: p.fisher_alpha as number }));
      const direct = fitCurves(points, { bootstrapN: 100, seed: s.config.seed });
      const quad = rows.find((r) => r.forest_type === type && r.model === 'quadratic')!;
      expect(quad.n).toBe(points.length);
      expect(quad.b2).toBe(direct.quadratic!.b2);
      expect(quad.aicc).toBe(direct.quadratic!.aicc);
      expect(quad.verdict).toBe(direct.verdict);
      // the evidence read back from the stored details is what the fit itself found
      const [, directQuad] = fitRows(direct, { forestType: type, metric: 'fisher_alpha', axis: 'disturbance_index' });
      for (const c of EVIDENCE_COLUMNS) expect(quad[c], `${type} ${c}`).toBe(directQuad[c]);
      expect(quad.mos_result).not.toBeNull();
      // what the region pages' chart shows is stored with the fit: the same points, in order, with their region
      const [row] = await s.db.query<{ chart: unknown }>(`select chart from fit_charts where forest_type = $1 and metric = 'fisher_alpha' and axis = 'disturbance_index'`, [type]);
      const chart = asStoredFitChart(row?.chart)!;
      expect(chart).not.toBeNull();
      expect(chart.points.x).toEqual(points.map((p) => p.x));
      expect(chart.points.y).toEqual(points.map((p) => p.y));
      const regionOf = new Map([...latest.values()].map((p) => [p.plot_id as string, p.region as string]));
      const keys = [...latest.values()].filter((p) => p.forest_type === type && p.fisher_alpha !== null && p.disturbance_index !== null).map((p) => p.plot_id as string).sort((a, b) => (a < b ? -1 : 1));
      expect(chart.points.region.map((i) => chart.points.regions[i])).toEqual(keys.map((k) => regionOf.get(k)));
      expect({ n: chart.n, verdict: chart.verdict }).toEqual({ n: direct.n, verdict: direct.verdict });
      expect(chart.curve.x[0]).toBe(direct.xMin);
    }
  });

  it('says on both rows of each fit how many plots were left out and why (counted here from the plots export)', async () => {
    const latest = await latestVisits(s);
    const rows = JSON.parse(await fitsText(s.config, s.db, { format: 'json' })) as Array<Record<string, number | string | null>>;
    let leftOutAnywhere = 0;
    for (const type of ['wet', 'moist', 'dry']) {
      const mine = [...latest.values()].filter((p) => p.forest_type === type);
      const reasons = new Map<string, number>();
      for (const p of mine) {
        if (p.fisher_alpha !== null) continue;
        // Fisher's alpha is undefined only for N = 0 and S = N (one identified stem is both S = N and below the minimum of 2).
        const n = p.n_identified as number;
        const why = n === 0 ? 'no_identified_stem' : n === 1 ? 'one_identified_stem' : p.richness === n ? 'all_singletons' : 'no_value';
        reasons.set(`fisher_alpha:${why}`, (reasons.get(`fisher_alpha:${why}`) ?? 0) + 1);
      }
      const total = [...reasons.values()].reduce((a, b) => a + b, 0);
      leftOutAnywhere += total;
      const text = [...reasons].sort(([a], [b]) => (a < b ? -1 : 1)).map(([k, v]) => `${k}=${v}`).join(';') || null;
      for (const r of rows.filter((x) => x.forest_type === type)) {
        expect(r.plots_left_out, `${type} ${r.model}`).toBe(total);
        expect(r.left_out_reasons, `${type} ${r.model}`).toBe(text);
        expect((r.n as number) + total).toBe(mine.length);
      }
    }
    expect(leftOutAnywhere).toBeGreaterThan(0);
  });

  it('stores region × forest type fits where a region has enough plots, and a chart for each forest type', async () => {
    const latest = await latestVisits(s);
    const cells = new Map<string, number>();
    for (const p of latest.values()) {
      if (p.fisher_alpha === null || p.disturbance_index === null) continue;
      const key = `${p.region}|${p.forest_type}`;
      cells.set(key, (cells.get(key) ?? 0) + 1);
    }
    const expected = [...cells].filter(([, n]) => n >= MIN_REGION_PLOTS).map(([k]) => k).sort();
    expect(expected.length).toBeGreaterThan(0);
    expect(expected.length).toBeLessThan(cells.size); // some cells fall short: the rule is exercised both ways
    const stored = await s.db.query<{ k: string }>(`select scope || '|' || forest_type k from curve_fits where scope <> 'all' and model = 'linear' order by 1`);
    expect(stored.map((r) => r.k).sort()).toEqual(expected);
    // No chart is drawn in the job: it stores what the chart shows (fit_charts), drawn when a page is served.
    const [{ drawn }] = await s.db.query<{ drawn: number }>(`select count(*)::int drawn from curve_fits where details ? 'chart_svg'`);
    expect(drawn).toBe(0);
    const forestTypes = await s.db.query<{ forest_type: string }>(`select distinct forest_type from curve_fits where scope = 'all' order by 1`);
    expect(forestTypes).toHaveLength(3);
    for (const { forest_type } of forestTypes) {
      const svg = await forestTypeFitChartSvg(s, forest_type);
      // the picture names its axes from the catalogue
      expect(svg).toMatch(/^<svg/);
      expect(svg).toContain('Disturbance index (0 none – 1 severe)');
      expect(svg).not.toMatch(/fisher_alpha|disturbance_index/);
    }
  });

  it('clears the fits marks it served; marks the summaries of the forest type’s regions only when its verdict changed (docs/methods.md#height-model-releases)', async () => {
    await storeFits(s, ['dry']);
    await s.db.query(`delete from stale_work where kind = 'summary'`);
    await markStale(s.db, 'fits', ['dry']);
    const out = await storeFits(s, ['dry']);
    expect(out.map((f) => f.forestType)).toEqual(['dry']);
    expect(await listStale(s.db, 'fits')).toEqual([]);
    expect(await listStale(s.db, 'summary')).toEqual([]); // the same verdict: the regions keep their summaries
    await s.db.query(`update curve_fits set verdict = 'an earlier verdict' where forest_type = 'dry' and scope_kind = 'forest_type'`);
    await markStale(s.db, 'fits', ['dry']);
    await storeFits(s, ['dry']);
    expect((await listStale(s.db, 'summary')).sort()).toEqual([...REGIONS].sort());
  });

  it('fits any numeric plot column on demand without storing it', async () => {
    const rows = JSON.parse(await fitsText(s.config, s.db, { format: 'json', axis: 'logging_score', metric: 'shannon' })) as Array<Record<string, unknown>>;
    expect(rows).toHaveLength(6);
    for (const r of rows) expect([r.axis, r.metric]).toEqual(['logging_score', 'shannon']);
    const [{ n }] = await s.db.query<{ n: number }>(`select count(*)::int n from curve_fits where metric = 'shannon'`);
    expect(n).toBe(0);
  });

  it('refuses an unknown column with a usage error listing the valid ones', async () => {
    const err = await fitsText(s.config, s.db, { axis: 'disturbance' }).catch((e) => e);
    expect(err).toBeInstanceOf(StemwiseError);
    expect(err.code).toBe('usage');
    expect(err.message).toMatch(/unknown axis 'disturbance'; choose one of: stems_ha, .*disturbance_index/);
    await expect(fitsText(s.config, s.db, { metric: 'plot_id' })).rejects.toThrow(/unknown metric 'plot_id'/);
  });
});
