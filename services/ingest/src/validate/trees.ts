import type { PreviousVisit, StoredPlot } from '@stemwise/db';
import { CROSS, crossMessages, normaliseName, PLAUSIBILITY, plausibilityMessages, ROW, rowMessages, type SpeciesIndex } from '@stemwise/core';
import type { StemSink } from '../load/stem-sink';
import { TREE_COLUMNS } from '../rules/columns';
import { readTable, type TableSource, type TableStats } from '../read/table';
import { tableOptions, type ValidationContext } from './context';
import { KeySet } from './key-set';
import type { PlotEntry } from './plots';

export interface TreesInput {
  plots: Map<string, PlotEntry>;
  /** Stored plots (with their latest visit) and the tree ids already stored on those visits. */
  lookupStored(keys: string[]): Promise<{ plots: StoredPlot[]; treeIds: Array<{ plotKey: string; treeId: string }> }>;
  /** Of plots of the batch, their latest stored visit before the batch's date (re-measurement checks); absent: no checks. */
  lookupPrevious?(plots: Array<{ key: string; surveyDate: string }>): Promise<PreviousVisit[]>;
  /** Where loadable stems go; null when the batch is rejected already (check only). */
  sink: StemSink | null;
  /** The species reference to check names against; null when none is loaded. */
  species: SpeciesIndex | null;
  /** False when plots.csv could not be read: stems are then not checked against plots at all. */
  plotsReadable: boolean;
  /**
   * Check duplicate tree ids here (a 12-byte hash per stem). When false, the database's unique
   * constraint on (visit, tree) catches them during the load, and the caller checks again with this on.
   */
  checkDuplicates: boolean;
  /**
   * Stop reading once the batch is sure to be rejected (under the default policy, the first error):
   * the caller then checks the whole batch again without loading, duplicates included.
   */
  stopWhenRejected?: boolean;
}

export interface NameTally {
  /**
   * By the resolver's level (the compute service's resolution): `genus` a species not in the list
   * whose genus is, `unresolved` neither known — these two make the batch's unresolved-names list —
   * and `unidentified` a name given only to a genus or family the list knows (`Genus sp.`). A name
   * given only to a genus of which the list knows nothing (`Zzz sp.`, one unknown word) is
   * `unresolved` here too, but not in that list: its stems declare themselves unidentified.
   */
  level: 'unresolved' | 'genus' | 'unidentified';
  /** Genus or family the list knows for the name, or null. */
  known: { rank: 'genus' | 'family'; name: string } | null;
  stems: number;
  firstLine: number;
}

export interface TreesResult {
  stats: TableStats;
  stemsLoaded: number;
  /** Stored plots whose latest visit received stems of this batch. */
  storedPlots: PlotEntry[];
  /** Names that did not resolve to a species of the reference list, with stem counts. */
  names: Map<string, NameTally>;
}

const UNIDENTIFIED_WORD = /^(indet|indeterminate|unknown|unidentified)\b/i;

/**
 * Streams trees.csv through the field, row, cross-row and plausibility rules and hands every loadable
 * stem to the sink. Under the default policy the first error stops loading (the batch will be
 * rejected) but checking goes on, so the uploader sees every problem at once.
 */
export async function validateTrees(ctx: ValidationContext, src: TableSource, input: TreesInput): Promise<TreesResult> {
  const { log, plausibility: pl } = ctx;
  const file = src.file;
  const stats: TableStats = { rows: 0, badRows: 0, fatal: false };
  const { plots, sink } = input;
  const stored = new Map<string, PlotEntry | null>();
  const seen = input.checkDuplicates ? new KeySet(1 << 16) : null;
  const names = new Map<string, NameTally | null>();
  const skipInvalid = ctx.options.skip_invalid;
  let stemsLoaded = 0;
  const touchedStored = new Set<string>();
  const MAX_NAMES = 50_000;

  const plotOf = (key: string): PlotEntry | null => plots.get(key) ?? stored.get(key) ?? null;
  // The previous visit of each re-measured plot of the batch, looked up chunk by chunk (null: none).
  const previous = new Map<string, PreviousVisit | null>();
  const remeasured = new Map<string, Set<string>>(); // tree ids of this batch on plots with a previous visit

  const resolveStored = async (keys: string[]) => {
    const found = await input.lookupStored(keys);
    for (const k of keys) stored.set(k, null);
    for (const p of found.plots) {
      stored.set(p.plotKey, {
        key: p.plotKey,
        inBatch: false,
        ok: true,
        line: 0,
        region: p.region,
        forestType: '',
        latitude: 0,
        longitude: 0,
        elevationM: null,
        areaHa: 0,
        dbhMinCm: p.dbhMinCm,
        subplotAreaHa: p.subplotAreaHa,
        subplotDbhMinCm: p.subplotDbhMinCm,
        surveyDate: p.surveyDate,
        loggingClass: 0,
        fireClass: 0,
        visitId: p.visitId,
        stems: 0,
        stemsOverMm: 0,
      });
    }
    if (seen) for (const t of found.treeIds) seen.add(`${t.plotKey}\u0000${t.treeId}`, -1);
  };

  const read = readTable(src, tableOptions(ctx, TREE_COLUMNS, true), stats);

  for await (const batch of read) {
    // Plots named by this chunk that are neither in the batch nor looked up yet: one query for all.
    let unknown: Set<string> | null = null;
    for (const r of batch) {
      const k = r.values[0];
      if (typeof k === 'string' && !plots.has(k) && !stored.has(k)) (unknown ??= new Set()).add(k);
    }
    if (unknown && input.plotsReadable) await resolveStored([...unknown]);
    if (input.lookupPrevious) {
      const ask = new Map<string, string>();
      for (const r of batch) {
        const k = r.values[0];
        const p = typeof k === 'string' ? plots.get(k) : undefined;
        if (p && p.ok && typeof p.surveyDate === 'string' && !previous.has(p.key)) ask.set(p.key, p.surveyDate);
      }
      if (ask.size) {
        for (const k of ask.keys()) previous.set(k, null);
        for (const v of await input.lookupPrevious([...ask].map(([key, surveyDate]) => ({ key, surveyDate })))) previous.set(v.plotKey, v);
      }
    }

    for (const row of batch) {
      ctx.progress.rowsChecked++;
      const { line } = row;
      let ok = row.ok;
      const bad = () => {
        if (ok) stats.badRows++;
        ok = false;
      };
      const v = row.values;
      const plotKey = v[0];
      const treeId = v[1];
      const species = v[2] as string | null;
      const dbh = v[3];
      const height = v[4];
      const status = v[5];
      const cause = v[6] as string | null;
      const subplot = v[8];

      let plot: PlotEntry | null = null;
      if (typeof plotKey === 'string') {
        plot = plotOf(plotKey);
        if (plot === null && !input.plotsReadable) {
          // plots.csv itself is reported; one error per stem would only bury that
        } else if (plot === null) {
          log.add(CROSS.unknownPlot, file, line, 'plot_id', plotKey, crossMessages.unknownPlot(plotKey));
          bad();
        } else {
          plot.stems++;
          if (!plot.ok) {
            log.add(CROSS.plotRejected, file, line, 'plot_id', plotKey, crossMessages.plotRejected(plotKey, plot.line));
            bad();
          }
        }
      }
      if (status === 'stump' && cause === null) {
        log.add(ROW.stumpCauseMissing, file, line, 'stump_cause', '', rowMessages.stumpCauseMissing());
        bad();
      } else if (typeof status === 'string' && status !== 'stump' && typeof cause === 'string') {
        log.add(ROW.stumpCauseNotStump, file, line, 'stump_cause', cause, rowMessages.stumpCauseNotStump(status, cause));
        bad();
      }
      if (typeof dbh === 'number') {
        if (plot) {
          if (dbh > pl.mmMedianCm) plot.stemsOverMm++;
          if (typeof plot.dbhMinCm === 'number' && typeof plot.subplotAreaHa === 'number' && typeof subplot === 'string') {
            if (subplot === '1') {
              if (!(plot.subplotAreaHa > 0)) {
                log.add(CROSS.subplotMissing, file, line, 'in_subplot', '1', crossMessages.subplotMissing(plot.key));
                bad();
              } else if (dbh >= plot.dbhMinCm) {
                log.add(CROSS.subplotStemTooBig, file, line, 'dbh_cm', String(dbh), crossMessages.subplotStemTooBig(dbh, plot.dbhMinCm));
                bad();
              }
            } else if (dbh < plot.dbhMinCm) {
              log.add(CROSS.mainStemBelowMin, file, line, 'dbh_cm', String(dbh), crossMessages.mainStemBelowMin(dbh, plot.dbhMinCm));
            }
          }
        }
        if (dbh > pl.largeDbhCm) log.add(PLAUSIBILITY.dbhLarge, file, line, 'dbh_cm', String(dbh), plausibilityMessages.dbhLarge(dbh, pl.largeDbhCm));
        if (typeof height === 'number' && status === 'live') {
          const ratio = height / (dbh / 100);
          if (ratio < pl.hdRatioMin || ratio > pl.hdRatioMax) {
            log.add(PLAUSIBILITY.heightForDiameter, file, line, 'height_m', String(height), plausibilityMessages.heightForDiameter(height, dbh, ratio, pl.hdRatioMin, pl.hdRatioMax));
          }
        }
      }
      if (typeof height === 'number' && height > pl.tallHeightM) {
        log.add(PLAUSIBILITY.heightTall, file, line, 'height_m', String(height), plausibilityMessages.heightTall(height, pl.tallHeightM));
      }
      // Re-measured plots: the same tree at the previous visit (docs/methods.md#change-between-visits).
      const before = typeof plotKey === 'string' && typeof treeId === 'string' && plot?.inBatch ? previous.get(plotKey)?.stems.get(treeId) : undefined;
      if (plot?.inBatch && typeof treeId === 'string' && previous.get(plot.key)) {
        let ids = remeasured.get(plot.key);
        if (!ids) remeasured.set(plot.key, (ids = new Set()));
        ids.add(treeId);
      }
      if (before && plot) {
        const prev = previous.get(plot.key)!;
        if (status === 'live' && before.status !== 'live') {
          const was = before.status === 'stump' ? `a stump (${before.stumpCause})` : before.status;
          log.add(CROSS.treeRevived, file, line, 'status', 'live', crossMessages.treeRevived(plot.key, treeId as string, was, prev.surveyDate, prev.batchId));
          bad();
        }
        if (status === 'live' && before.status === 'live' && typeof dbh === 'number') {
          const years = (Date.parse(plot.surveyDate as string) - Date.parse(prev.surveyDate)) / 86_400_000 / 365.25;
          if (before.dbhCm - dbh > pl.dbhShrinkCm) {
            log.add(PLAUSIBILITY.dbhShrank, file, line, 'dbh_cm', String(dbh), plausibilityMessages.dbhShrank(treeId as string, dbh, before.dbhCm, prev.surveyDate, pl.dbhShrinkCm));
          } else if (years > 0 && (dbh - before.dbhCm) / years > pl.dbhGrowthMaxCmYr) {
            log.add(PLAUSIBILITY.dbhGrowthFast, file, line, 'dbh_cm', String(dbh), plausibilityMessages.dbhGrowthFast(treeId as string, dbh, before.dbhCm, prev.surveyDate, (dbh - before.dbhCm) / years, pl.dbhGrowthMaxCmYr));
          }
        }
        if (typeof species === 'string' && before.species !== null && normaliseName(species) !== normaliseName(before.species)) {
          log.add(PLAUSIBILITY.speciesChanged, file, line, 'species', species, plausibilityMessages.speciesChanged(treeId as string, species, before.species, prev.surveyDate));
        }
      }
      if (seen && typeof plotKey === 'string' && typeof treeId === 'string') {
        const first = seen.add(`${plotKey}\u0000${treeId}`, line);
        if (first !== 0) {
          log.add(
            CROSS.duplicateTree,
            file,
            line,
            'tree_id',
            treeId,
            first < 0 ? `tree_id ${treeId} of plot ${plotKey} is already stored on the plot's latest visit (${plot?.surveyDate})` : crossMessages.duplicateTree(plotKey, treeId, first),
          );
          bad();
        }
      }
      // Names are counted over the rows without errors, the stems a loaded batch holds: the same
      // stems the batch's unresolved-names list counts once its plots are computed.
      if (ok && typeof species === 'string') {
        let tally = names.get(species);
        if (tally === undefined) {
          tally = nameTally(input.species, species, line);
          if (names.size < MAX_NAMES) names.set(species, tally);
        }
        if (tally !== null) tally.stems++;
      }
      if (ok && sink && !sink.stopped && plot) {
        const wait = sink.add(plot.visitId, treeId as string, species, dbh as number, (height as number | null) ?? null, status as string, cause, v[7] as number, subplot === '1');
        stemsLoaded++;
        ctx.progress.rowsLoaded++;
        if (!plot.inBatch) touchedStored.add(plot.key);
        if (wait) await wait;
      }
    }
    if (sink && !sink.stopped && !skipInvalid && log.errors > 0) sink.stop();
    ctx.tick();
    if (sink?.stopped && input.stopWhenRejected) break;
  }
  if (sink && !sink.stopped && (stats.fatal || (!skipInvalid && log.errors > 0))) sink.stop();

  // Per-plot checks once every stem is seen.
  for (const p of plots.values()) {
    if (!p.ok || stats.fatal) continue;
    if (p.stems === 0) log.add(CROSS.plotWithoutStems, 'plots.csv', p.line, 'plot_id', p.key, crossMessages.plotWithoutStems(p.key));
    else if (p.stemsOverMm * 2 > p.stems) {
      log.add(PLAUSIBILITY.dbhLooksMm, file, null, 'dbh_cm', p.key, plausibilityMessages.dbhLooksMm(p.key, p.stemsOverMm, p.stems, pl.mmMedianCm));
    }
  }
  // Re-measured plots: trees live at the previous visit and absent now (counted as died), one warning per plot.
  for (const [key, prev] of previous) {
    const p = plots.get(key);
    if (!prev || !p || !p.ok || stats.fatal) continue;
    const ids = remeasured.get(key);
    const absent = [...prev.stems.values()].filter((t) => t.status === 'live' && !ids?.has(t.treeId)).map((t) => t.treeId);
    if (absent.length) {
      const examples = absent.slice(0, 5).join(', ') + (absent.length > 5 ? ', …' : '');
      log.add(PLAUSIBILITY.treesAbsent, 'plots.csv', p.line, 'plot_id', key, plausibilityMessages.treesAbsent(key, absent.length, prev.surveyDate, examples));
    }
  }
  // Species: one warning per distinct name, with its stem count and first line.
  const unresolved = new Map<string, NameTally>();
  if (input.species === null && names.size > 0) {
    log.add(PLAUSIBILITY.speciesNoReference, file, null, 'species', null, plausibilityMessages.speciesNoReference());
  }
  for (const [name, t] of names) {
    if (t === null) continue;
    unresolved.set(name, t);
    if (input.species === null) continue;
    const m = plausibilityMessages;
    if (t.level === 'unresolved') log.add(PLAUSIBILITY.speciesUnknown, file, t.firstLine, 'species', name, m.speciesUnknown(name, t.stems));
    else if (t.level === 'genus') log.add(PLAUSIBILITY.speciesGenusKnown, file, t.firstLine, 'species', name, m.speciesGenusKnown(name, t.known!.name, t.stems));
    else log.add(PLAUSIBILITY.speciesGenusOnly, file, t.firstLine, 'species', name, m.speciesGenusOnly(name, t.known!, t.stems));
  }
  const storedPlots = [...stored.values()].filter((p): p is PlotEntry => p !== null && touchedStored.has(p.key));
  return { stats, stemsLoaded: sink && !sink.stopped ? stemsLoaded : 0, storedPlots, names: unresolved };
}

/**
 * How a recorded name stands against the reference list, by the resolution the compute service uses:
 * null when it names a species of the list (or declares the stem unidentified: indet, unknown,
 * empty); otherwise a tally of the resolver's level and what the list knows of the name.
 */
function nameTally(index: SpeciesIndex | null, name: string, line: number): NameTally | null {
  const n = normaliseName(name);
  if (n === '' || UNIDENTIFIED_WORD.test(n)) return null;
  if (index === null) return { level: 'unresolved', known: null, stems: 0, firstLine: line };
  const r = index.resolve(name);
  if (r.species !== null || r.level === 'exact' || r.level === 'synonym' || r.level === 'normalised') return null;
  const known = r.genus !== null ? ({ rank: 'genus', name: r.genus } as const) : r.family !== null ? ({ rank: 'family', name: r.family } as const) : null;
  return { level: r.level === 'unidentified' && known === null ? 'unresolved' : r.level, known, stems: 0, firstLine: line };
}
