import fs from 'node:fs';
import { getTableColumns } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { plotMetrics } from '../schema/metrics';
import { FITTABLE_METRIC_COLUMNS, HEADLINE_METRIC_COLUMNS, PLOT_METRICS, plotMetricByColumn, REGION_METRIC_COLUMNS, reportingColumnOf } from './plot-metrics';

// The columns of `export plots` (docs/exports.md, a contract): new ones may follow, none moves or goes.
const EXPORT_COLUMNS_V1 = [
  'stems_ha', 'basal_area_m2_ha', 'qmd_cm', 'agb_mg_ha', 'carbon_mg_ha', 'n_identified', 'richness', 'shannon',
  'simpson', 'inv_simpson', 'pielou', 'fisher_alpha', 'rarefied_50', 'chao1', 'pioneer_ba_share',
  'light_demander_ba_share', 'shade_tolerant_ba_share', 'unassigned_ba_share', 'logging_removed_ba_frac',
  'logging_score', 'fire_score', 'disturbance_index',
];
// The variables of `export regions` in row order, and the headline cards, before the catalogue existed.
const REGION_VARIABLES_V1 = [
  'stems_ha', 'basal_area_m2_ha', 'agb_mg_ha', 'carbon_mg_ha', 'fisher_alpha', 'richness', 'disturbance_index',
  'pioneer_ba_share', 'light_demander_ba_share', 'shade_tolerant_ba_share', 'unassigned_ba_share', 'logging_score', 'fire_score',
];
const HEADLINE_V1 = ['stems_ha', 'basal_area_m2_ha', 'agb_mg_ha', 'carbon_mg_ha', 'fisher_alpha', 'richness', 'disturbance_index'];

const camel = (column: string): string => column.replace(/_([a-z0-9])/g, (_, c: string) => c.toUpperCase());

describe('the plot-metric catalogue', () => {
  it('keeps the export columns of version 1 first and in their order', () => {
    expect(PLOT_METRICS.slice(0, EXPORT_COLUMNS_V1.length).map((m) => m.column)).toEqual(EXPORT_COLUMNS_V1);
  });

  it('has one entry per column, keyed by the camelCase of its column', () => {
    expect(new Set(PLOT_METRICS.map((m) => m.column)).size).toBe(PLOT_METRICS.length);
    for (const m of PLOT_METRICS) {
      expect(m.column).toMatch(/^[a-z][a-z0-9_]*$/);
      expect(m.key).toBe(camel(m.column));
      expect(m.label.trim(), m.column).not.toBe('');
      expect(m.short.trim(), m.column).not.toBe('');
      expect(m.description.trim(), m.column).not.toBe('');
      expect(plotMetricByColumn(m.column)).toBe(m);
    }
    expect(plotMetricByColumn('stem_ha')).toBeUndefined();
  });

  it('numbers the region rows 1..n without gaps, keeping the rows and headline cards of version 1 first', () => {
    const rows = PLOT_METRICS.flatMap((m) => (m.regionRow === null ? [] : [m.regionRow])).sort((a, b) => a - b);
    expect(rows).toEqual(rows.map((_, i) => i + 1));
    expect(REGION_METRIC_COLUMNS.slice(0, REGION_VARIABLES_V1.length)).toEqual(REGION_VARIABLES_V1);
    // The cards of version 1 keep their places; the four structure and biomass cards show the same
    // figures at the reporting threshold (docs/methods.md#reporting-threshold).
    const atThreshold: Record<string, string> = { stems_ha: 'reporting_stems_ha', basal_area_m2_ha: 'reporting_basal_area_m2_ha', agb_mg_ha: 'reporting_agb_mg_ha', carbon_mg_ha: 'reporting_carbon_mg_ha' };
    expect(HEADLINE_METRIC_COLUMNS.slice(0, HEADLINE_V1.length)).toEqual(HEADLINE_V1.map((c) => atThreshold[c] ?? c));
    for (const [c, r] of Object.entries(atThreshold)) expect(reportingColumnOf(c)).toBe(r);
    expect(reportingColumnOf('fisher_alpha')).toBe('fisher_alpha');
    for (const m of PLOT_METRICS) if (m.headline) expect(m.regionRow, m.column).not.toBeNull();
  });

  it('gives a total unit to the per-hectare metrics, and only to them', () => {
    const perHa = PLOT_METRICS.filter((m) => m.unit.endsWith('/ha')).map((m) => m.column);
    expect(PLOT_METRICS.filter((m) => 'totalUnit' in m).map((m) => m.column)).toEqual(perHa);
    expect(perHa).toEqual(['stems_ha', 'basal_area_m2_ha', 'agb_mg_ha', 'carbon_mg_ha', 'bgb_mg_ha', 'bgb_carbon_mg_ha', 'standing_dead_mg_ha', 'standing_dead_carbon_mg_ha', 'tree_carbon_mg_ha', 'reporting_stems_ha', 'reporting_basal_area_m2_ha', 'reporting_agb_mg_ha', 'reporting_carbon_mg_ha']);
  });

  it('lets a fit use every metric marked fittable, in export order', () => {
    expect(FITTABLE_METRIC_COLUMNS).toEqual(PLOT_METRICS.filter((m) => m.fittable).map((m) => m.column));
    expect(FITTABLE_METRIC_COLUMNS).toContain('fisher_alpha');
    expect(FITTABLE_METRIC_COLUMNS).toContain('disturbance_index');
  });

  it('is what the drizzle schema of plot_metrics holds: every entry a column of its SQL type, and no other metric column', () => {
    const columns = getTableColumns(plotMetrics) as Record<string, { name: string; getSQLType(): string }>;
    const sqlType = { float8: 'double precision', int: 'integer' } as const;
    for (const m of PLOT_METRICS) {
      expect(columns[m.key]?.name, m.key).toBe(m.column);
      expect(columns[m.key].getSQLType(), m.column).toBe(sqlType[m.sqlType]);
    }
    const others = Object.keys(columns).filter((k) => !PLOT_METRICS.some((m) => m.key === k));
    expect(others).toEqual(['visitId', 'speciesVersionId', 'diagnostics', 'speciesStems', 'computedAt']);
  });

  it('is documented: docs/exports.md names every column in its `export plots` table', () => {
    const doc = fs.readFileSync(new URL('../../../docs/exports.md', import.meta.url), 'utf8');
    const section = doc.slice(doc.indexOf('## export plots'), doc.indexOf('## export fits'));
    const documented = new Set([...section.matchAll(/`([a-z0-9_]+)`/g)].map((x) => x[1]));
    expect(PLOT_METRICS.map((m) => m.column).filter((c) => !documented.has(c))).toEqual([]);
  });
});
