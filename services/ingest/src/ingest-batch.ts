import path from 'node:path';
import fs from 'node:fs';
import { currentSpeciesVersion, findPlotsAtCoordinates, findPreviousVisits, findStoredPlots, findStoredVisits, finishBatch, insertBatchIssues, loadSpeciesReference, stemTreeIdsOfVisits, type BatchCounts, type BatchFile, type BatchRow, type Queryable } from '@stemwise/db';
import { CROSS, crossMessages, PLAUSIBILITY, PLAUSIBILITY_DEFAULTS, plausibilityMessages, SpeciesIndex, STRUCTURE, structureMessages, type PlausibilityOptions, type ServiceDeps, type SpeciesReference } from '@stemwise/core';
import { PermanentError, type JobContext } from '@stemwise/platform';
import { IssueLog } from './issues';
import { dataRefused, isDataError } from './load/data-refused';
import { finishLoad, loadPlotsAndVisits, type LoadPlan, type LoadingFile } from './load/load-batch';
import { copySink, unnestSink } from './load/stem-sink';
import { ProgressReporter } from './progress';
import type { TableSource, TableStats } from './read/table';
import { latestAllowedDate, type ValidationContext } from './validate/context';
import { validatePlots, type PlotEntry } from './validate/plots';
import { validateSpecies, type SpeciesResult } from './validate/species';
import { validateStrata, type StratumEntry } from './validate/strata';
import { validateTrees, type TreesResult } from './validate/trees';

export interface IngestOutcome {
  state: 'loaded' | 'rejected';
  counts: BatchCounts;
}

export interface IngestOptions {
  plausibility?: Partial<PlausibilityOptions>;
  job?: JobContext;
  /** Check duplicate tree ids in memory even while loading (always so with skip_invalid). */
  checkDuplicates?: boolean;
  /** The batch is known to be rejected: check every file (duplicates included) and load nothing. */
  checkOnly?: boolean;
}

/** The load met a duplicate (visit, tree) the in-memory checks were told to leave to the database. */
function isDuplicateStem(err: unknown): boolean {
  const e = err as { code?: string; constraint?: string };
  return e?.code === '23505' && e.constraint === 'stems_pkey';
}

/** Thrown inside the load transaction to roll it back when the batch turns out to be rejected. */
class Rejected extends Error {}

const EMPTY_STATS: TableStats = { rows: 0, badRows: 0, fatal: false };

function sourceOf(storageDir: string, batchId: string, f: BatchFile): TableSource {
  return { file: `${f.kind}.csv`, path: path.join(storageDir, batchId, f.stored), gzip: f.gzip };
}

/** Stored plots and their stored tree ids, for stems of plots that are not in the batch. */
async function lookupStored(q: Queryable, keys: string[]) {
  const plots = await findStoredPlots(q, keys);
  const byVisit = new Map(plots.map((p) => [p.visitId, p.plotKey]));
  const trees = await stemTreeIdsOfVisits(q, [...byVisit.keys()]);
  return { plots, treeIds: trees.map((t) => ({ plotKey: byVisit.get(t.visitId)!, treeId: t.treeId })) };
}

async function speciesIndexOf(db: Queryable, fromBatch: SpeciesResult | null): Promise<SpeciesIndex | null> {
  let rows: SpeciesReference[];
  if (fromBatch && fromBatch.rows.length) rows = fromBatch.rows;
  else {
    const version = await currentSpeciesVersion(db);
    if (version === null) return null;
    rows = await loadSpeciesReference(db, version);
  }
  try {
    return new SpeciesIndex(rows);
  } catch {
    return null; // a stored list the resolver cannot use: names are reported as not checked
  }
}

/**
 * Validates a stored batch and, unless it is rejected, loads it in one transaction. The batch row
 * must be in state `validating`; the final state, counts and issues are written atomically.
 */
export async function ingestBatch(deps: ServiceDeps, batch: BatchRow, options: IngestOptions = {}): Promise<IngestOutcome> {
  const { db, config } = deps;
  const log = new IssueLog();
  const reporter = new ProgressReporter(db, batch.id, batch.bytesTotal, deps.log, options.job);
  const ctx: ValidationContext = {
    log,
    options: batch.options,
    forestTypes: config.forestTypes.map((t) => t.code),
    maxUnpackedBytes: config.maxUnpackedBytes,
    today: latestAllowedDate(),
    plausibility: { ...PLAUSIBILITY_DEFAULTS, ...options.plausibility },
    progress: reporter.counters,
    tick: () => reporter.tick(),
  };
  const fileOf = (kind: BatchFile['kind']) => batch.files.find((f) => f.kind === kind);
  for (const f of batch.files) {
    const p = path.join(config.storageDir, batch.id, f.stored);
    if (!fs.existsSync(p)) throw new PermanentError('ingest_files_missing', `the stored file ${f.stored} of batch ${batch.id} is missing from ${path.dirname(p)}`);
  }
  let fatal = false;
  for (const kind of ['plots', 'trees'] as const) {
    if (!fileOf(kind)) {
      log.add(STRUCTURE.fileMissing, `${kind}.csv`, null, null, null, structureMessages.fileMissing(`${kind}.csv`));
      fatal = true;
    }
  }

  // Small files first, held in memory: species, strata, plots.
  const speciesFile = fileOf('species');
  const species = speciesFile ? await validateSpecies(ctx, sourceOf(config.storageDir, batch.id, speciesFile)) : null;
  const strataFile = fileOf('strata');
  const strata = strataFile ? await validateStrata(ctx, sourceOf(config.storageDir, batch.id, strataFile)) : { strata: [] as StratumEntry[], stats: EMPTY_STATS };
  const plotsFile = fileOf('plots');
  const plotsResult = plotsFile ? await validatePlots(ctx, sourceOf(config.storageDir, batch.id, plotsFile)) : { plots: new Map<string, PlotEntry>(), stats: EMPTY_STATS };
  fatal ||= (species?.stats.fatal ?? false) || strata.stats.fatal || plotsResult.stats.fatal;
  const plots = plotsResult.plots;
  const speciesOk = species !== null && !species.stats.fatal && (batch.options.skip_invalid || species.stats.badRows === 0);
  const index = await speciesIndexOf(db, speciesOk ? species : null);

  // What is stored already: visits of the same plot and date, and plots at the same coordinates.
  const okPlots = [...plots.values()].filter((p) => p.ok);
  const replaces: LoadPlan['replaces'] = [];
  const existing = await findStoredVisits(db, okPlots.map((p) => p.key), okPlots.map((p) => p.surveyDate));
  for (const v of existing) {
    const p = plots.get(v.plotKey)!;
    if (batch.options.replace) replaces.push({ visitId: v.visitId, plotKey: v.plotKey, surveyDate: v.surveyDate, batchId: v.batchId, region: v.region });
    else {
      log.add(CROSS.visitExists, 'plots.csv', p.line, 'survey_date', p.surveyDate, crossMessages.visitExists(p.key, p.surveyDate, v.batchId));
      p.ok = false;
      plotsResult.stats.badRows++;
    }
  }
  // A re-measurement comes after the visits stored: an earlier date is refused unless --replace says so
  // (its plot's change between visits is then recomputed with the visit in its place).
  if (!batch.options.replace) {
    for (const stored of await findStoredPlots(db, okPlots.filter((p) => p.ok).map((p) => p.key))) {
      const p = plots.get(stored.plotKey)!;
      if (!p.ok || p.surveyDate >= stored.surveyDate) continue;
      log.add(CROSS.visitBeforeLatest, 'plots.csv', p.line, 'survey_date', p.surveyDate, crossMessages.visitBeforeLatest(p.key, p.surveyDate, stored.surveyDate));
      p.ok = false;
      plotsResult.stats.badRows++;
    }
  }
  const coords = await findPlotsAtCoordinates(db, okPlots.map((p) => p.latitude), okPlots.map((p) => p.longitude), okPlots.map((p) => p.key));
  if (coords.length) {
    const byPlace = new Map(coords.map((c) => [`${c.latitude},${c.longitude}`, c.plotKey]));
    for (const p of okPlots) {
      const other = byPlace.get(`${p.latitude},${p.longitude}`);
      if (other) log.add(PLAUSIBILITY.sameCoordinates, 'plots.csv', p.line, 'latitude', `${p.latitude},${p.longitude}`, plausibilityMessages.sameCoordinates(p.key, other));
    }
  }

  const treesFile = fileOf('trees');
  const treesSource = treesFile ? sourceOf(config.storageDir, batch.id, treesFile) : null;
  const blocked = () => fatal || (!batch.options.skip_invalid && log.errors > 0);
  const counts = (trees: TreesResult | null, loaded: boolean): BatchCounts => ({
    plotsRows: plotsResult.stats.rows,
    treesRows: trees?.stats.rows ?? 0,
    plotsLoaded: loaded ? [...plots.values()].filter((p) => p.ok).length : 0,
    stemsLoaded: loaded ? (trees?.stemsLoaded ?? 0) : 0,
    rowsSkipped: plotsResult.stats.badRows + strata.stats.badRows + (species?.stats.badRows ?? 0) + (trees?.stats.badRows ?? 0),
    nErrors: log.errors,
    nWarnings: log.warnings,
    bytesRead: reporter.counters.bytesRead,
    rowsChecked: reporter.counters.rowsChecked,
  });

  const reject = async (trees: TreesResult | null): Promise<IngestOutcome> => {
    const c = counts(trees, false);
    await reporter.settle();
    await db.transaction(async (tx) => {
      await insertBatchIssues(tx, batch.id, log.rows());
      await finishBatch(tx, batch.id, 'rejected', c);
    });
    return { state: 'rejected', counts: c };
  };

  if (options.checkOnly || blocked() || !treesSource) {
    // Rejected already: check the trees anyway (nothing is loaded), so every problem is reported at once.
    const trees = treesSource ? await validateTrees(ctx, treesSource, { plots, lookupStored: (k) => lookupStored(db, k), lookupPrevious: (ps) => findPreviousVisits(db, ps.map((p) => p.key), ps.map((p) => p.surveyDate)), sink: null, species: index, plotsReadable: !plotsResult.stats.fatal && !!plotsFile, checkDuplicates: true }) : null;
    reporter.phase = 'done';
    reporter.tick(true);
    return reject(trees);
  }

  const plan: LoadPlan = {
    batchId: batch.id,
    actor: batch.submittedBy,
    plots: [...plots.values()].filter((p) => p.ok),
    replaces,
    strata: strata.strata,
    species: speciesOk ? species : null,
    speciesSource: `batch ${batch.id}`,
  };
  // Duplicate tree ids: under the default policy the unique constraint finds them during COPY at no
  // memory cost. A batch that turns out to be rejected (a duplicate met by the load, or any other
  // error of trees.csv) stops loading at once and is checked again from the start without loading,
  // duplicates included with the in-memory set, so its one report names every problem.
  const checkDuplicates = batch.options.skip_invalid || options.checkDuplicates === true;
  const recheck = () => ingestBatch(deps, batch, { ...options, checkDuplicates: true, checkOnly: true });
  let trees: TreesResult | null = null;
  const loading: LoadingFile = { file: 'plots.csv' };
  try {
    const result = await db.transaction(async (tx) => {
      reporter.inTransaction = true;
      const { regionIds, movedFrom } = await loadPlotsAndVisits(tx, plan, loading);
      reporter.phase = 'loading';
      const sink = tx.kind === 'postgres' ? copySink(tx) : unnestSink(tx);
      // On PostgreSQL the transaction's connection is busy with COPY: look up stored plots on another one.
      const lookup = tx.kind === 'postgres' ? db : tx;
      loading.file = 'trees.csv';
      try {
        trees = await validateTrees(ctx, treesSource, {
          plots,
          lookupStored: (k) => lookupStored(lookup, k),
          lookupPrevious: (ps) => findPreviousVisits(lookup, ps.map((p) => p.key), ps.map((p) => p.surveyDate)),
          sink,
          species: index,
          plotsReadable: true,
          checkDuplicates,
          stopWhenRejected: !checkDuplicates,
        });
      } finally {
        await sink.finish();
      }
      reporter.tick(true);
      if (trees.stats.fatal || blocked()) throw new Rejected();
      await finishLoad(tx, plan, regionIds, { storedPlots: trees.storedPlots, movedFrom }, loading);
      loading.file = 'the issues of the batch';
      const c = counts(trees, true);
      await insertBatchIssues(tx, batch.id, log.rows());
      reporter.phase = 'done';
      await reporter.settle();
      await finishBatch(tx, batch.id, 'loaded', c);
      return c;
    });
    reporter.inTransaction = false;
    return { state: 'loaded', counts: result };
  } catch (err) {
    reporter.inTransaction = false;
    if (err instanceof Rejected) return checkDuplicates ? reject(trees) : recheck();
    if (isDuplicateStem(err) && !checkDuplicates) {
      deps.log.info({ batchId: batch.id }, 'duplicate tree ids met during the load; checking again to report their lines');
      return recheck();
    }
    if (isDataError(err)) throw dataRefused(err, loading.file);
    throw err;
  }
}
