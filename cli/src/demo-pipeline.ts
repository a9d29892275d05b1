import fs from 'node:fs';
import path from 'node:path';
import { InProcessQueue, loadConfig, type Config, type Logger } from '@stemwise/platform';
import { migrateDatabase, openDatabase, syncForestTypes } from '@stemwise/db';
import { filesInDir, submitBatch, type ServiceDeps } from '@stemwise/core';
import { checkOwnFolder, claimOwnFolder } from './own-folder';
import { allProcessors } from './processors';
import type { CarbonUncertaintySection } from '@stemwise/report';

export interface DemoOptions {
  /** Folder holding plots.csv(.gz), trees.csv(.gz), optionally strata and species. */
  inputDir: string;
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

export interface DemoResult {
  batchId: string;
  state: string;
  plots: number;
  stems: number;
  regions: number;
  fits: DemoFit[];
  outDir: string;
  index: string;
  seconds: number;
  /** The national carbon stock's whole uncertainty (printed by demoCarbonLines). */
  carbon: CarbonUncertaintySection | null;
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

    step(`submitting the batch in ${o.inputDir}`);
    const submitted = await submitBatch(deps, filesInDir(o.inputDir), {}, 'demo');
    step('validating, loading, computing plot metrics, fitting curves, assembling summaries');
    const failures = await queue.drain();
    if (failures.length) throw new Error(`a job failed: ${failures[0].name}: ${failures[0].error}`);
    const [batch] = await db.query<{ state: string; plots_loaded: number; stems_loaded: number; n_errors: number }>(
      `select state, plots_loaded, stems_loaded, n_errors from batches where id = $1`,
      [submitted.batchId],
    );
    if (batch.state !== 'computed') throw new Error(`the demo batch ended ${batch.state} with ${batch.n_errors} error(s)`);

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

    const chartsDir = path.join(o.outDir, 'charts');
    fs.mkdirSync(chartsDir, { recursive: true });
    const fitRows = await db.query<{ forest_type: string; n: number; verdict: string; peak_x: number | null; peak_ci_low: number | null; peak_ci_high: number | null; r2: number | null; chart: string | null }>(
      `select forest_type, n, verdict, peak_x, peak_ci_low, peak_ci_high, r2, details->>'chart_svg' as chart
         from curve_fits where scope_kind = 'forest_type' and model = 'quadratic' and metric = $1 and axis = $2 order by forest_type`,
      [config.fitMetric, config.fitAxis],
    );
    for (const f of fitRows) if (f.chart) fs.writeFileSync(path.join(chartsDir, `fit-${f.forest_type}.svg`), f.chart);
    const [{ regions }] = await db.query<{ regions: number }>(`select count(*)::int as regions from regions`);
    return {
      batchId: submitted.batchId,
      state: batch.state,
      plots: batch.plots_loaded,
      stems: batch.stems_loaded,
      regions,
      fits: fitRows.map((f) => ({ forestType: f.forest_type, n: f.n, verdict: f.verdict, peakX: f.peak_x, peakLow: f.peak_ci_low, peakHigh: f.peak_ci_high, r2: f.r2 })),
      outDir: o.outDir,
      index: pages.index,
      seconds: (Date.now() - started) / 1000,
      carbon: (await report.readNationalSnapshot(db))?.payload.carbon_uncertainty ?? null,
    };
  } finally {
    await queue.close();
    await db.close();
  }
}
