import type { ComputeStemRow, ComputeVisitRow, PlotMetricsWrite } from '@stemwise/db';
import { PLOT_METRICS } from '@stemwise/db/catalogue';
import { computePlotMetrics, type ConfiguredRootShoot, type HeightDiameterModel, type PlotDiagnostics, type PlotMetricOptions, rootShootRelationOf, type SpeciesIndex, type StumpToDbh } from '@stemwise/core/science';

// The CPU-bound part of a plot chunk: the metrics of each visit from its stems. Pure (no I/O, no
// packages beyond the science), so that it runs the same in a worker thread (metrics-worker.ts) as in
// the job's own thread; plot-chunk.ts reads the inputs and writes the outcomes.

/** One chunk's inputs; `stems[i]` are the stems of `visits[i]`. */
export interface ChunkTask {
  visits: readonly ComputeVisitRow[];
  stems: ReadonlyArray<readonly ComputeStemRow[]>;
  species: SpeciesIndex;
  /** Height–diameter model of each forest type that has one. */
  models: ReadonlyArray<readonly [string, HeightDiameterModel]>;
  defaultWoodDensity: number;
  speciesVersionId: number | null;
  /** Configured root-to-shoot relations (the others by climate) and the standing dead share: docs/methods.md#below-ground-biomass. */
  rootShoot: readonly ConfiguredRootShoot[];
  standingDeadShare: number;
  /** The reporting threshold and the stump-to-DBH relation (settings; docs/methods.md). */
  reportingDbhMinCm: number;
  stumpToDbh: StumpToDbh;
}

export type VisitWrite = PlotMetricsWrite & { diagnostics: PlotDiagnostics & { heightModelHeights: number | null } };

/** A visit's metrics row, or why it could not be computed. */
export type VisitOutcome = { write: VisitWrite } | { reason: string };

/** The outcome of every visit of the task, in the order of its visits. */
export function computeVisits(task: ChunkTask): VisitOutcome[] {
  const models = new Map(task.models);
  return task.visits.map((visit, i) => {
    try {
      const options: PlotMetricOptions = {
        heightModel: models.get(visit.forestType) ?? null,
        defaultWoodDensity: task.defaultWoodDensity,
        rootShoot: rootShootRelationOf(visit.forestType, visit.climate, task.rootShoot),
        standingDeadShare: task.standingDeadShare,
        reportingDbhMinCm: task.reportingDbhMinCm,
        stumpToDbh: task.stumpToDbh,
      };
      return { write: computeVisit(visit, task.stems[i], task.species, options, task.speciesVersionId) };
    } catch (err) {
      // Input the science refuses (a RangeError) names the plot; anything else keeps its own message.
      const reason = err instanceof RangeError ? `plot ${visit.plotKey} (visit ${visit.visitId}): ${err.message}` : (err as Error).message;
      return { reason };
    }
  });
}

function computeVisit(
  visit: ComputeVisitRow,
  stems: readonly ComputeStemRow[],
  index: SpeciesIndex,
  options: PlotMetricOptions,
  speciesVersionId: number | null,
): VisitWrite {
  const result = computePlotMetrics(
    {
      areaHa: visit.areaHa,
      dbhMinCm: visit.dbhMinCm,
      subplotAreaHa: visit.subplotAreaHa,
      subplotDbhMinCm: visit.subplotDbhMinCm,
      loggingClass: visit.loggingClass,
      fireClass: visit.fireClass,
      climate: visit.climate,
    },
    stems,
    index,
    options,
  );
  const { metrics } = result;
  return {
    visitId: visit.visitId,
    speciesVersionId,
    // In catalogue order: the order of PLOT_METRIC_DB_COLUMNS, which the upsert's columns follow.
    values: PLOT_METRICS.map((c) => metrics[c.key]),
    diagnostics: { ...result.diagnostics, heightModelHeights: options.heightModel?.n ?? null },
    speciesStems: speciesStems(stems, index),
  };
}

/**
 * Accepted name → live main-plot stems (any diameter) of one visit: synonyms and spelling variants count
 * as their species, genus-only and unresolved names are left out. Stored with the metrics so that the
 * region summaries count species without reading stems.
 */
export function speciesStems(stems: ReadonlyArray<Pick<ComputeStemRow, 'status' | 'inSubplot' | 'species'>>, index: SpeciesIndex): Record<string, number> {
  const out: Record<string, number> = {};
  for (const s of stems) {
    if (s.status !== 'live' || s.inSubplot || s.species === null) continue;
    const hit = index.resolve(s.species).species;
    if (hit) out[hit.name] = (out[hit.name] ?? 0) + 1;
  }
  return out;
}
