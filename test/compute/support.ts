import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { PassThrough } from 'node:stream';
import { clearStale, finishRecomputeRun, listStaleMarks, migrateDatabase, openDatabase, syncForestTypes, type Db } from '@stemwise/db';
import { planRecompute, type RecomputePlan, type RecomputeTrigger, type ServiceDeps } from '@stemwise/core';
import { InProcessQueue, loadConfig, parsePayload, type Config, type JobQueue, type ProcessorMap } from '@stemwise/platform';
import { createProcessors, exportChange, exportFits, exportPlots, type PlotExportFormat } from '@stemwise/compute';
import { testLogger } from '../support/services';

/** Stand-in for the report service's `report.summaries` (tests only): ends the run as the real one does. */
export function standInSummaries(db: Db, ran?: string[]): ProcessorMap {
  return {
    'report.summaries': async (data) => {
      const { runId } = parsePayload('report.summaries', data);
      ran?.push('report.summaries');
      await clearStale(db, 'summary', await listStaleMarks(db, 'summary'));
      await finishRecomputeRun(db, runId);
    },
  };
}

/**
 * Plans a recompute and runs it to the end in this process; returns the plan (null: nothing stale).
 * `report` gives the report service's processors (default: the stand-in summaries).
 */
export async function recomputeInProcess(
  config: Config,
  db: Db,
  all = false,
  report: (deps: ServiceDeps) => ProcessorMap = () => standInSummaries(db),
  trigger: RecomputeTrigger = 'manual',
): Promise<{ plan: RecomputePlan | null; failures: readonly { jobId: string; error: string }[] }> {
  const log = testLogger();
  const queue: JobQueue = new InProcessQueue(log);
  const deps: ServiceDeps = { config, db, log, queue };
  await queue.work({ ...createProcessors(deps), ...report(deps) }, { queues: ['compute', 'report'] });
  const plan = await planRecompute(deps, trigger, all);
  const failures = await queue.drain();
  await queue.close();
  return { plan, failures };
}

/** An embedded PGlite database in a fresh temporary folder, migrated, with the configured forest types. */
export async function openPglite(extraEnv: Record<string, string> = {}): Promise<{ config: Config; db: Db; cleanup(): Promise<void> }> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-compute-'));
  const config = loadConfig({ STEMWISE_DATA_DIR: dir, STEMWISE_LOG_LEVEL: 'warn', ...extraEnv });
  const db = await openDatabase(config);
  await migrateDatabase(db);
  await syncForestTypes(db, config.forestTypes);
  return {
    config,
    db,
    async cleanup() {
      await db.close().catch(() => {});
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

async function collect(write: (stream: PassThrough) => Promise<unknown>): Promise<string> {
  const stream = new PassThrough();
  const parts: Buffer[] = [];
  stream.on('data', (c: Buffer) => parts.push(c));
  await write(stream);
  stream.end();
  return Buffer.concat(parts).toString('utf8');
}

/** `export plots` as text. */
export function plotsText(db: Db, format: PlotExportFormat = 'csv', region?: string, pageSize?: number): Promise<string> {
  return collect((stream) => exportPlots(db, { format, region, pageSize }, { stream }));
}

/** `export change` as text. */
export function changeText(db: Db, format: PlotExportFormat = 'csv'): Promise<string> {
  return collect((stream) => exportChange(db, { format }, { stream }));
}

/** `export fits` as text. */
export function fitsText(config: Config, db: Db, options: { format?: 'csv' | 'json'; axis?: string; metric?: string } = {}): Promise<string> {
  return collect((stream) => exportFits({ config, db }, { format: options.format ?? 'csv', axis: options.axis, metric: options.metric }, { stream }));
}
