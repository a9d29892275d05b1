import type { Queryable } from '@stemwise/db';

// What a fault test compares with an undisturbed run: row counts and an MD5 per result table, over
// content only. Rows are keyed by what the user knows (plot key, survey date, tree id, region name),
// never by generated ids or timestamps, so two databases that loaded the same data in a different
// order or at a different time give the same digests when their results are the same.

export interface ResultsDigest {
  counts: {
    plots: number;
    visits: number;
    stems: number;
    plotMetrics: number;
    heightModels: number;
    curveFits: number;
    /** Regions with a summary. */
    summaryRegions: number;
    /** All stored summary versions (a doubled or disturbed run that changed content would add some). */
    summaryVersions: number;
    staleVisits: number;
    staleWork: number;
  };
  digests: {
    stems: string;
    plotMetrics: string;
    heightModels: string;
    curveFits: string;
    /** Payload of the latest summary of each region. */
    latestSummaries: string;
  };
}

const COUNTS_SQL = `select
  (select count(*)::int from plots) plots,
  (select count(*)::int from plot_visits) visits,
  (select count(*)::int from stems) stems,
  (select count(*)::int from plot_metrics) "plotMetrics",
  (select count(*)::int from height_models) "heightModels",
  (select count(*)::int from curve_fits) "curveFits",
  (select count(distinct region_id)::int from region_summaries) "summaryRegions",
  (select count(*)::int from region_summaries) "summaryVersions",
  (select count(*)::int from plot_visits where stale) "staleVisits",
  (select count(*)::int from stale_work) "staleWork"`;

// One line per row, ordered by its natural key; md5 of the whole text ('' when the table is empty).
const DIGEST_SQL: Record<keyof ResultsDigest['digests'], string> = {
  stems: `select coalesce(md5(string_agg(line, E'\\n' order by k1, k2, k3)), '') d from (
            select p.plot_key k1, v.survey_date::text k2, s.tree_id k3,
                   concat_ws('|', p.plot_key, v.survey_date, s.tree_id, s.species, s.dbh_cm, s.height_m, s.status, s.stump_cause, s.fire_damage, s.in_subplot) line
              from stems s join plot_visits v on v.id = s.visit_id join plots p on p.id = v.plot_id) t`,
  plotMetrics: `select coalesce(md5(string_agg(line, E'\\n' order by k1, k2)), '') d from (
            select p.plot_key k1, v.survey_date::text k2,
                   p.plot_key || '|' || v.survey_date || '|' || (to_jsonb(m) - 'visit_id' - 'computed_at')::text line
              from plot_metrics m join plot_visits v on v.id = m.visit_id join plots p on p.id = v.plot_id) t`,
  heightModels: `select coalesce(md5(string_agg((to_jsonb(h) - 'fitted_at')::text, E'\\n' order by h.forest_type)), '') d from height_models h`,
  curveFits: `select coalesce(md5(string_agg((to_jsonb(f) - 'computed_at')::text, E'\\n' order by f.scope, f.forest_type, f.metric, f.axis, f.model)), '') d from curve_fits f`,
  latestSummaries: `select coalesce(md5(string_agg(r.name || '|' || s.etag || '|' || s.payload::text, E'\\n' order by r.name)), '') d
              from regions r
              join lateral (select etag, payload from region_summaries x where x.region_id = r.id order by x.version desc limit 1) s on true`,
};

/** Row counts and content digests of the pipeline's results in this database. */
export async function resultsDigest(db: Queryable): Promise<ResultsDigest> {
  const [counts] = await db.query<ResultsDigest['counts']>(COUNTS_SQL);
  const digests = {} as ResultsDigest['digests'];
  for (const [name, sql] of Object.entries(DIGEST_SQL) as Array<[keyof ResultsDigest['digests'], string]>) {
    digests[name] = (await db.query<{ d: string }>(sql))[0].d;
  }
  return { counts, digests };
}
