import { clearProblems, listVisitsForChange, loadStemsWithTreeIds, PLOT_CHANGE_DB_COLUMNS, recordProblems, replacePlotChanges, type ChangeStemRow, type ChangeVisitRow, type PlotChangeWrite, type Queryable } from '@stemwise/db';
import { computePlotMetrics, type ConfiguredRootShoot, PLOT_CHANGE_COLUMNS, plotChange, rootShootRelationOf, type ChangeVisit, type HeightDiameterModel, type HeightSource, type PlotChange, type SpeciesIndex } from '@stemwise/core';
import { isInfrastructureError, type Logger } from '@stemwise/platform';

// The science's change columns and the stored ones must be the same columns in the same order.
const CHANGE_KEYS: ReadonlyArray<keyof PlotChange> = PLOT_CHANGE_COLUMNS.map((c, i) => {
  if (PLOT_CHANGE_DB_COLUMNS[i]?.[0] !== c.column) throw new Error(`plot-change: change column ${i} is ${c.column} in the science but ${PLOT_CHANGE_DB_COLUMNS[i]?.[0]} in the database`);
  return c.key;
});
if (PLOT_CHANGE_DB_COLUMNS.length !== CHANGE_KEYS.length) throw new Error('plot-change: the science and the database list different change columns');

export interface PlotChangeContext {
  index: SpeciesIndex;
  models: ReadonlyMap<string, HeightDiameterModel>;
  defaultWoodDensity: number;
  speciesVersionId: number | null;
  /** As in the plot metrics: docs/methods.md#below-ground-biomass, #standing-dead-wood. */
  rootShoot: readonly ConfiguredRootShoot[];
  standingDeadShare: number;
  runId: string;
  log?: Logger;
}

/** One visit's trees with the biomass of each live (and dead) stem, from the same models and settings as its plot metrics. */
function changeVisit(visit: ChangeVisitRow, stems: readonly ChangeStemRow[], ctx: PlotChangeContext): ChangeVisit {
  const { metrics, stemAgbKg, stemDeadKg, stemHeightSource, rootShoot } = computePlotMetrics(visit, stems, ctx.index, {
    heightModel: ctx.models.get(visit.forestType) ?? null,
    defaultWoodDensity: ctx.defaultWoodDensity,
    rootShoot: rootShootRelationOf(visit.forestType, visit.climate, ctx.rootShoot),
    standingDeadShare: ctx.standingDeadShare,
    stemAgb: true,
  });
  const agb = stemAgbKg as (number | null)[];
  const dead = stemDeadKg as (number | null)[];
  const source = stemHeightSource as (HeightSource | null)[];
  return {
    surveyDate: visit.surveyDate,
    areaHa: visit.areaHa,
    dbhMinCm: visit.dbhMinCm,
    rootShootRatio: metrics.rootShootRatio,
    ...(rootShoot ? { rootShootError: { sd: rootShoot.sd, row: rootShoot.row } } : {}),
    trees: stems.map((s, i) => ({ treeId: s.treeId, dbhCm: s.dbhCm, status: s.status, stumpCause: s.stumpCause, inSubplot: s.inSubplot, agbKg: agb[i], deadKg: dead[i], heightSource: source[i] })),
  };
}

/**
 * The pair's carbon_moments JSON: the above-ground change's sums, with the tree pool change's under `trees`
 * (docs/methods.md#carbon-uncertainty); null without the above-ground sums (the tree pool's need them too).
 */
function storedCarbonMoments(change: PlotChange): unknown {
  const above = change.carbonMoments ?? null;
  if (above === null) return null;
  return change.treeCarbonMoments ? { ...above, trees: change.treeCarbonMoments } : above;
}

/**
 * Rewrites the change of the given plots (locked by lockPlotsForChange): one row per pair of
 * consecutive visits, from every visit's stems, in the caller's transaction. A plot that cannot be
 * computed keeps no pair and a `change` problem; the others are written. Returns the pairs written
 * and the plots that failed.
 */
export async function writePlotChanges(tx: Queryable, plotIds: readonly number[], ctx: PlotChangeContext): Promise<{ pairs: number; failed: number }> {
  const visits = await listVisitsForChange(tx, plotIds);
  const stemsOf = await loadStemsWithTreeIds(tx, visits.map((v) => v.visitId));
  const byPlot = new Map<number, ChangeVisitRow[]>();
  for (const v of visits) {
    const list = byPlot.get(v.plotId);
    if (list) list.push(v);
    else byPlot.set(v.plotId, [v]);
  }
  const writes: PlotChangeWrite[] = [];
  const done: string[] = [];
  const failed: Parameters<typeof recordProblems>[2][number][] = [];
  for (const list of byPlot.values()) {
    const plot = list[0];
    try {
      const cv = list.map((v) => changeVisit(v, stemsOf.get(v.visitId) ?? [], ctx));
      const rows: PlotChangeWrite[] = [];
      for (let i = 1; i < cv.length; i++) {
        const change = plotChange(cv[i - 1], cv[i], undefined, { carbonMoments: true });
        const c = change as unknown as Record<string, number | null>;
        rows.push({ plotId: plot.plotId, visitFromId: list[i - 1].visitId, visitToId: list[i].visitId, speciesVersionId: ctx.speciesVersionId, values: CHANGE_KEYS.map((k) => c[k]), carbonMoments: storedCarbonMoments(change) });
      }
      writes.push(...rows);
      done.push(plot.plotKey);
    } catch (err) {
      if (isInfrastructureError(err)) throw err;
      const reason = (err as Error).message;
      ctx.log?.error({ runId: ctx.runId, plotKey: plot.plotKey, reason }, 'change between visits could not be computed; the other plots go on');
      failed.push({ stage: 'change', forestType: plot.forestType, region: plot.region, visitId: null, plotKey: plot.plotKey, reason });
    }
  }
  await replacePlotChanges(tx, plotIds, writes);
  await clearProblems(tx, 'change', done);
  await recordProblems(tx, ctx.runId, failed);
  return { pairs: writes.length, failed: failed.length };
}
