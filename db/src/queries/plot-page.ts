import type { Queryable } from '../connection';
import type { plotMetrics } from '../schema/metrics';
import type { plots, plotVisits, stems } from '../schema/plots';
import { PLOT_CHANGE_DB_COLUMNS, type PlotChangeDbColumn } from './change';
import { METRIC_NAMES, METRIC_SELECT, numericColumns, type MetricColumns } from './metrics';
import { int8, int8Row, type Wire } from './rows';

type Plot = typeof plots.$inferSelect;
type Visit = typeof plotVisits.$inferSelect;
type Stem = typeof stems.$inferSelect;
type Metrics = typeof plotMetrics.$inferSelect;

// What the page of one plot reads: the plot (only within its region, so a region-scoped token never
// opens another region's plot), its visits with their metrics and diagnostics, the stems of one visit,
// and its change between visits.

const CHANGE_NAMES = PLOT_CHANGE_DB_COLUMNS.map(([c]) => c);

export type RegionPlot = Pick<Plot, 'id' | 'plotKey' | 'forestType' | 'latitude' | 'longitude' | 'elevationM'>;
const regionPlot = int8Row<RegionPlot, 'id'>('id');

/** The plot of this key when it lies in this region; null otherwise. */
export async function findRegionPlot(db: Queryable, region: string, plotKey: string): Promise<RegionPlot | null> {
  const rows = await db.query<Wire<RegionPlot, 'id'>>(
    `select p.id, p.plot_key "plotKey", p.forest_type "forestType", p.latitude, p.longitude, p.elevation_m "elevationM"
       from plots p join regions r on r.id = p.region_id
      where r.name = $1 and p.plot_key = $2`,
    [region, plotKey],
  );
  return rows.length ? regionPlot(rows[0]) : null;
}

export interface PlotVisitRow extends Pick<Visit, 'surveyDate' | 'areaHa' | 'dbhMinCm' | 'subplotAreaHa' | 'subplotDbhMinCm' | 'loggingClass' | 'fireClass' | 'stale'> {
  visitId: Visit['id'];
  /** Stored stems by status. */
  stems: { live: number; dead: number; stump: number };
  /** null until the visit is computed. */
  metrics: MetricColumns | null;
  diagnostics: Metrics['diagnostics'] | null;
  computedAt: Metrics['computedAt'] | null;
}

type VisitWire = Wire<Omit<PlotVisitRow, 'stems' | 'metrics'>, 'visitId'> & MetricColumns & { live: number; dead: number; stump: number; computed: boolean };

/** Every visit of a plot, oldest first, with its stem counts and (when computed) its metrics. */
export async function listPlotVisits(db: Queryable, plotId: number): Promise<PlotVisitRow[]> {
  const rows = await db.query<VisitWire>(
    `select v.id "visitId", v.survey_date::text "surveyDate", v.area_ha "areaHa", v.dbh_min_cm "dbhMinCm", v.subplot_area_ha "subplotAreaHa",
            v.subplot_dbh_min_cm "subplotDbhMinCm", v.logging_class "loggingClass", v.fire_class "fireClass", v.stale,
            (m.visit_id is not null) computed, m.diagnostics, m.computed_at "computedAt", ${METRIC_SELECT},
            (select count(*)::int from stems s where s.visit_id = v.id and s.status = 'live') live,
            (select count(*)::int from stems s where s.visit_id = v.id and s.status = 'dead') dead,
            (select count(*)::int from stems s where s.visit_id = v.id and s.status = 'stump') stump
       from plot_visits v left join plot_metrics m on m.visit_id = v.id
      where v.plot_id = $1
      order by v.survey_date`,
    [plotId],
  );
  return rows.map((r) => ({
    visitId: int8(r.visitId),
    surveyDate: r.surveyDate,
    areaHa: r.areaHa,
    dbhMinCm: r.dbhMinCm,
    subplotAreaHa: r.subplotAreaHa,
    subplotDbhMinCm: r.subplotDbhMinCm,
    loggingClass: r.loggingClass,
    fireClass: r.fireClass,
    stale: r.stale,
    stems: { live: r.live, dead: r.dead, stump: r.stump },
    metrics: r.computed ? numericColumns(r, METRIC_NAMES) : null,
    diagnostics: r.computed ? r.diagnostics : null,
    computedAt: r.computed ? r.computedAt : null,
  }));
}

export type PlotStemRow = Pick<Stem, 'treeId' | 'species' | 'dbhCm' | 'heightM' | 'status' | 'inSubplot'>;

/** The stems of one visit, by tree id. */
export async function listVisitStems(db: Queryable, visitId: number): Promise<PlotStemRow[]> {
  return db.query<PlotStemRow>(
    `select tree_id "treeId", species, dbh_cm "dbhCm", height_m "heightM", status, in_subplot "inSubplot" from stems where visit_id = $1 order by tree_id collate "C"`,
    [visitId],
  );
}

export interface PlotChangeRow {
  dateFrom: Visit['surveyDate'];
  dateTo: Visit['surveyDate'];
  values: Record<PlotChangeDbColumn, number | null>;
}

/** The plot's change between consecutive visits (plot_change), oldest pair first. */
export async function listPlotChanges(db: Queryable, plotId: number): Promise<PlotChangeRow[]> {
  const rows = await db.query<{ dateFrom: string; dateTo: string } & Partial<Record<PlotChangeDbColumn, number | null>>>(
    `select a.survey_date::text "dateFrom", b.survey_date::text "dateTo", ${CHANGE_NAMES.map((c) => `c.${c}`).join(', ')}
       from plot_change c
       join plot_visits a on a.id = c.visit_from_id
       join plot_visits b on b.id = c.visit_to_id
      where c.plot_id = $1
      order by a.survey_date`,
    [plotId],
  );
  return rows.map((r) => ({ dateFrom: r.dateFrom, dateTo: r.dateTo, values: numericColumns(r, CHANGE_NAMES) }));
}
