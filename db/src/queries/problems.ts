import type { Queryable } from '../connection';

// What a recompute could not compute (compute_problems): one open row per subject, written by the
// stage that met it and removed by the next success of the same subject.

export type ProblemStage = 'plot' | 'fit' | 'summary' | 'change';

export interface ComputeProblem {
  stage: ProblemStage;
  /** The key within the stage (see problemSubject). */
  subject: string;
  runId: string;
  forestType: string | null;
  region: string | null;
  visitId: number | null;
  plotKey: string | null;
  reason: string;
}

/** The subject key of a problem: a visit id, a plot key (change), a forest type, a forest type and a region (unit separator between), a region. */
export function problemSubject(p: Pick<ComputeProblem, 'stage' | 'forestType' | 'region' | 'visitId'> & { plotKey?: string | null }): string {
  if (p.stage === 'plot') return String(p.visitId);
  if (p.stage === 'change') return p.plotKey ?? '';
  if (p.stage === 'summary') return p.region ?? '';
  return p.region === null ? (p.forestType ?? '') : `${p.forestType}\u001f${p.region}`;
}

/** Records problems (a rerun of the same run overwrites them). */
export async function recordProblems(tx: Queryable, runId: string, problems: ReadonlyArray<Omit<ComputeProblem, 'subject' | 'runId'>>): Promise<void> {
  if (!problems.length) return;
  await tx.query(
    `insert into compute_problems (stage, subject, run_id, forest_type, region, visit_id, plot_key, reason)
     select t.stage, t.subject, $1, t.forest_type, t.region, t.visit_id, t.plot_key, t.reason
       from unnest($2::text[], $3::text[], $4::text[], $5::text[], $6::bigint[], $7::text[], $8::text[]) t(stage, subject, forest_type, region, visit_id, plot_key, reason)
     on conflict (stage, subject) do update set run_id = excluded.run_id, forest_type = excluded.forest_type, region = excluded.region,
       visit_id = excluded.visit_id, plot_key = excluded.plot_key, reason = excluded.reason, recorded_at = now()`,
    [
      runId,
      problems.map((p) => p.stage),
      problems.map((p) => problemSubject(p)),
      problems.map((p) => p.forestType),
      problems.map((p) => p.region),
      problems.map((p) => p.visitId),
      problems.map((p) => p.plotKey),
      problems.map((p) => p.reason),
    ],
  );
}

/** Removes the problems of subjects that were computed now. */
export async function clearProblems(tx: Queryable, stage: ProblemStage, subjects: readonly string[]): Promise<void> {
  if (!subjects.length) return;
  await tx.query(`delete from compute_problems where stage = $1 and subject = any($2::text[])`, [stage, subjects]);
}

const SELECT = `select stage, subject, run_id "runId", forest_type "forestType", region, visit_id "visitId", plot_key "plotKey", reason from compute_problems`;
const ORDER = `order by array_position(array['plot','change','fit','summary'], stage), forest_type collate "C" nulls first, region collate "C" nulls first, plot_key collate "C", subject`;

function rows(list: Array<Record<string, unknown>>): ComputeProblem[] {
  return list.map((r) => ({ ...(r as unknown as ComputeProblem), visitId: r.visitId === null ? null : Number(r.visitId) }));
}

/** The open problems a run recorded. */
export async function listRunProblems(db: Queryable, runId: string): Promise<ComputeProblem[]> {
  return rows(await db.query(`${SELECT} where run_id = $1 ${ORDER}`, [runId]));
}

/**
 * The open problems that touch a batch: its visits' metrics, the fits of its plots' forest types (as a
 * whole, or of its regions) and the summaries of its regions.
 */
export async function listBatchProblems(db: Queryable, batchId: string): Promise<ComputeProblem[]> {
  return rows(
    await db.query(
      `with mine as (
         select distinct v.id visit_id, p.plot_key, p.forest_type, r.name region
           from plot_visits v join plots p on p.id = v.plot_id join regions r on r.id = p.region_id
          where v.batch_id = $1)
       ${SELECT} c
        where (c.stage = 'plot' and c.visit_id in (select visit_id from mine))
           or (c.stage = 'change' and c.plot_key in (select plot_key from mine))
           or (c.stage = 'fit' and exists (select 1 from mine m where m.forest_type = c.forest_type and (c.region is null or c.region = m.region)))
           or (c.stage = 'summary' and c.region in (select region from mine))
        ${ORDER}`,
      [batchId],
    ),
  );
}

/** The open problems a region's readers should know of: its plots, its fits and the forest-type-wide fits of its forest types, its summary. */
export async function listRegionProblems(db: Queryable, region: string, forestTypes: readonly string[]): Promise<ComputeProblem[]> {
  return rows(
    await db.query(
      `${SELECT} where region = $1 or (stage = 'fit' and region is null and forest_type = any($2::text[])) ${ORDER}`,
      [region, forestTypes],
    ),
  );
}

/** The open problems of a stage. */
export async function listStageProblems(db: Queryable, stage: ProblemStage): Promise<ComputeProblem[]> {
  return rows(await db.query(`${SELECT} where stage = $1 ${ORDER}`, [stage]));
}

/** A problem as the API, `batch show --format json` and the page show it (snake_case, the plot by its id). */
export interface ProblemView {
  stage: ProblemStage;
  forest_type: string | null;
  region: string | null;
  plot_id: string | null;
  run_id: string;
  reason: string;
}

export function problemView(p: ComputeProblem): ProblemView {
  return { stage: p.stage, forest_type: p.forestType, region: p.region, plot_id: p.plotKey, run_id: p.runId, reason: p.reason };
}

/** One line for people: what could not be computed and why. */
export function problemLine(p: ProblemView): string {
  const what =
    p.stage === 'plot'
      ? `metrics of plot ${p.plot_id ?? '?'}`
      : p.stage === 'change'
        ? `change between visits of plot ${p.plot_id ?? '?'}`
        : p.stage === 'summary'
        ? `summary of region ${p.region}`
        : p.region === null
          ? `fit of forest type ${p.forest_type}`
          : `fit of forest type ${p.forest_type} in region ${p.region}`;
  return `${what} not computed (run ${p.run_id}): ${p.reason}`;
}
