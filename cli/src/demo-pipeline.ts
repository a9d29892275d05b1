import fs from 'node:fs';
import path from 'node:path';
import { InProcessQueue, loadConfig, type Config, type Logger } from '@stemwise/platform';
import { migrateDatabase, openDatabase, syncForestTypes } from '@stemwise/db';
import { filesInDir, NATIONAL, submitBatch, type ServiceDeps } from '@stemwise/core';
import { checkOwnFolder, claimOwnFolder } from './own-folder';
import { allProcessors } from './processors';
import type { CarbonUncertaintySection } from '@stemwise/report';

export interface DemoOptions {
  /** Folder holding plots.csv(.gz), trees.csv(.gz), optionally strata and species. */
  inputDir: string;
  /** Folders of later visits (plots and trees of re-measured plots), uploaded in order after the first batch. */
  laterDirs?: readonly string[];
  /** Report folder to write: missing, empty, or one stemwise made (emptied first); any other is refused. */
  outDir: string;
  /** Folder of the demo's own embedded database (recreated each run; the same rule as outDir). */
  workDir: string;
  log: Logger;
  /** Settings other than the database and queue (taken from the caller's configuration). */
  base?: Config;
  step?: (message: string) => void;
}

export interface DemoFit {
  forestType: string;
  n: number;
  verdict: string;
  peakX: number | null;
  peakLow: number | null;
  peakHigh: number | null;
  r2: number | null;
}

/** One forest type's national estimate of a change variable (docs/methods.md#change-between-visits). */
export interface DemoChange {
  forestType: string;
  variable: string;
  n: number;
  mean: number | null;
  ciLow: number | null;
  ciHigh: number | null;
}

/** The change variables the demo reports per forest type. */
export const DEMO_CHANGE_VARIABLES = ['mortality_annual', 'recruitment_annual', 'carbon_net_change_mg_ha_yr'] as const;

export interface DemoResult {
  batchId: string;
  state: string;
  plots: number;
  stems: number;
  regions: number;
  fits: DemoFit[];
  /** National estimates per forest type of the change variables; empty when no plot was measured twice. */
  change: DemoChange[];
  /** Batches uploaded (the first and one per later visit). */
  batches: number;
  outDir: string;
  index: string;
  seconds: number;
  /** The national carbon sections' whole uncertainty (printed by demoCarbonLines): above-ground stock, carbon in trees, net change of each. */
  carbon: CarbonUncertaintySection | null;
  treeCarbon: CarbonUncertaintySection | null;
  carbonChange: CarbonUncertaintySection | null;
  treeCarbonChange: CarbonUncertaintySection | null;
}

/**
 * The whole pipeline on one folder of tallies, on a fresh embedded database with in-process jobs:
 * species, upload, validation, load, plot metrics, fits, summaries, then the report folder.
 */
export async function runDemo(o: DemoOptions): Promise<DemoResult> {
  const started = Date.now();
  const step = o.step ?? (() => {});
  // Refused before any work: a folder with someone's files in it is never emptied.
  checkOwnFolder(o.outDir);
  claimOwnFolder(o.workDir, ['pgdata', 'uploads']);
  const config: Config = {
    ...(o.base ?? loadConfig({})),
    databaseUrl: undefined,
    redisUrl: undefined,
    dataDir: o.workDir,
    storageDir: path.join(o.workDir, 'uploads'),
  };
  step('opening an embedded database');
  const db = await openDatabase(config);
  const queue = new InProcessQueue(o.log);
  try {
    await migrateDatabase(db);
    await syncForestTypes(db, config.forestTypes);
    const deps: ServiceDeps = { config, db, log: o.log, queue };
    const { processors, ...work } = await allProcessors(deps);
    await queue.work(processors, work);
    const nationalCarbon = async (): Promise<Pick<DemoResult, 'carbon' | 'treeCarbon' | 'carbonChange' | 'treeCarbonChange'>> => {
      const p = (await report.readNationalSnapshot(db))?.payload;
      return { carbon: p?.carbon_uncertainty ?? null, treeCarbon: p?.tree_carbon_uncertainty ?? null, carbonChange: p?.carbon_change_uncertainty ?? null, treeCarbonChange: p?.tree_carbon_change_uncertainty ?? null };
    };

    let batch = { state: '', plots_loaded: 0, stems_loaded: 0, n_errors: 0 };
    let batchId = '';
    for (const dir of [o.inputDir, ...(o.laterDirs ?? [])]) {
      step(`submitting the batch in ${dir}`);
      const submitted = await submitBatch(deps, filesInDir(dir), {}, 'demo');
      step('validating, loading, computing plot metrics and change, fitting curves, assembling summaries');
      const failures = await queue.drain();
      if (failures.length) throw new Error(`a job failed: ${failures[0].name}: ${failures[0].error}`);
      const [loaded] = await db.query<typeof batch>(
        `select state, plots_loaded, stems_loaded, n_errors from batches where id = $1`,
        [submitted.batchId],
      );
      if (loaded.state !== 'computed') throw new Error(`the demo batch in ${dir} ended ${loaded.state} with ${loaded.n_errors} error(s)`);
      // The figures of the first batch: its plots and stems (a later visit re-measures the same plots).
      if (batchId === '') [batch, batchId] = [loaded, submitted.batchId];
    }

    step(`writing the report folder ${o.outDir}`);
    claimOwnFolder(o.outDir);
    const report = await import('@stemwise/report');
    const compute = await import('@stemwise/compute');
    const pages = await report.writeRegionPages(deps, o.outDir);
    const exportsDir = path.join(o.outDir, 'exports');
    fs.mkdirSync(exportsDir, { recursive: true });
    await compute.exportPlots(db, { format: 'csv' }, { file: path.join(exportsDir, 'plots.csv') });
    await compute.exportPlots(db, { format: 'geojson' }, { file: path.join(exportsDir, 'plots.geojson') });
    await compute.exportFits(deps, { format: 'csv' }, { file: path.join(exportsDir, 'fits.csv') });
    await report.exportRegions(deps, { format: 'csv' }, { file: path.join(exportsDir, 'regions.csv') });
    await compute.exportChange(db, { format: 'csv' }, { file: path.join(exportsDir, 'change.csv') });

    const chartsDir = path.join(o.outDir, 'charts');
    fs.mkdirSync(chartsDir, { recursive: true });
    const fitRows = await db.query<{ forest_type: string; n: number; verdict: string; peak_x: number | null; peak_ci_low: number | null; peak_ci_high: number | null; r2: number | null }>(
      `select forest_type, n, verdict, peak_x, peak_ci_low, peak_ci_high, r2
         from curve_fits where scope_kind = 'forest_type' and model = 'quadratic' and metric = $1 and axis = $2 order by forest_type`,
      [config.fitMetric, config.fitAxis],
    );
    for (const f of fitRows) {
      const svg = await report.forestTypeFitChartSvg(deps, f.forest_type);
      if (svg) fs.writeFileSync(path.join(chartsDir, `fit-${f.forest_type}.svg`), svg);
    }
    const [{ regions }] = await db.query<{ regions: number }>(`select count(*)::int as regions from regions`);
    const national = await report.listRegionExportRows(db, NATIONAL);
    const change = national
      .filter((r) => r.forest_type !== 'all' && (DEMO_CHANGE_VARIABLES as readonly string[]).includes(r.variable) && r.n_plots > 0)
      .map((r) => ({ forestType: r.forest_type, variable: r.variable, n: r.n_plots, mean: r.mean, ciLow: r.ci_low, ciHigh: r.ci_high }));
    return {
      batchId,
      batches: 1 + (o.laterDirs?.length ?? 0),
      change,
      state: batch.state,
      plots: batch.plots_loaded,
      stems: batch.stems_loaded,
      regions,
      fits: fitRows.map((f) => ({ forestType: f.forest_type, n: f.n, verdict: f.verdict, peakX: f.peak_x, peakLow: f.peak_ci_low, peakHigh: f.peak_ci_high, r2: f.r2 })),
      outDir: o.outDir,
      index: pages.index,
      seconds: (Date.now() - started) / 1000,
      ...(await nationalCarbon()),
    };
  } finally {
    await queue.close();
    await db.close();
  }
}
