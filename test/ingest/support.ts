import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { InProcessQueue, type Config, type JobQueue } from '@stemwise/platform';
import { loadedRowCounts, type Db } from '@stemwise/db';
import { batchReport, submitBatch, type ServiceDeps, type SubmitOptions, type SubmittedFile } from '@stemwise/core';
import { processBatch } from '@stemwise/ingest';
import { testLogger } from '../support/services';

// Fixtures of an invented inventory (the republic of Marrowind; its regions and species are made up).

export const PLOTS_HEADER = 'plot_id,region,forest_type,latitude,longitude,area_ha,dbh_min_cm,subplot_area_ha,subplot_dbh_min_cm,survey_date,logging_class,fire_class,elevation_m';
export const TREES_HEADER = 'plot_id,tree_id,species,dbh_cm,height_m,status,stump_cause,fire_damage,in_subplot';

export const PLOTS = [
  PLOTS_HEADER,
  'MW-001,Upper Tarn,wet,-3.1201,27.4410,1,10,0.04,5,2023-05-14,0,1,420',
  'MW-002,Upper Tarn,moist,-3.1302,27.4522,1,10,0,5,2023-05-15,2,0,',
  'MW-003,Lowmere,dry,-3.3003,27.6011,0.5,10,0,5,2023-06-02,1,0,180',
].join('\n');

export const TREES = [
  TREES_HEADER,
  'MW-001,1,Ossara lumen,24.5,18.2,live,,0,0',
  'MW-001,2,Tikka rubra,41.0,,live,,1,0',
  'MW-001,3,,12.3,,dead,,0,0',
  'MW-001,4,Ossara sp.,7.5,,live,,0,1',
  'MW-001,5,Ossara lumen,33.0,,stump,logged,0,0',
  'MW-002,1,Tikka rubra,15.1,12.0,live,,0,0',
  'MW-002,2,Ossara lumen,62.0,31.5,live,,0,0',
  'MW-003,1,Quill aurea,18.0,,live,,2,0',
  'MW-003,2,indet,11.2,,live,,0,0',
].join('\n');

export const SPECIES = [
  'name,family,guild,wood_density,synonyms',
  'Ossara lumen,Ossaraceae,shade_tolerant,0.71,Ossara lucida',
  'Ossara minor,Ossaraceae,light_demander,0.55,',
  'Tikka rubra,Tikkaceae,pioneer,0.38,Tikka rufa;Tikka rosea',
].join('\n');

export const STRATA = ['region,forest_type,forest_area_ha', 'Upper Tarn,wet,120000', 'Upper Tarn,moist,80000', 'Lowmere,dry,45000'].join('\n');

export function tempDir(prefix = 'stemwise-ingest-'): string {
  return fs.mkdtempSync(path.join(os.tmpdir(), prefix));
}

/** Writes an upload folder; a value that is a Buffer is written as is (for encodings and gzip). */
export function writeUpload(files: Partial<Record<'plots' | 'trees' | 'strata' | 'species', string | Buffer>>, options: { gzip?: boolean } = {}): string {
  const dir = tempDir('stemwise-upload-');
  for (const [kind, content] of Object.entries(files)) {
    if (content === undefined) continue;
    const data = typeof content === 'string' ? Buffer.from(content.endsWith('\n') ? content : `${content}\n`, 'utf8') : content;
    if (options.gzip) fs.writeFileSync(path.join(dir, `${kind}.csv.gz`), gzipSync(data));
    else fs.writeFileSync(path.join(dir, `${kind}.csv`), data);
  }
  return dir;
}

export function uploadFiles(dir: string): SubmittedFile[] {
  // Files only: a generated inventory keeps its second visit in a folder of its own (a batch of its own).
  return fs.readdirSync(dir).filter((name) => fs.statSync(path.join(dir, name)).isFile()).map((name) => ({ kind: name.split('.')[0] as SubmittedFile['kind'], name, source: path.join(dir, name) }));
}

export function depsFor(config: Config, db: Db, queue: JobQueue = new InProcessQueue(testLogger())): ServiceDeps {
  return { config, db, log: testLogger(), queue };
}

/** Submits an upload folder and runs its ingest job directly; returns the batch report. */
export async function ingestDir(deps: ServiceDeps, dir: string, options: SubmitOptions = {}) {
  const submitted = await submitBatch(deps, uploadFiles(dir), options, 'test');
  if (!submitted.duplicate) await processBatch(deps, submitted.batchId);
  const report = await batchReport(deps.db, submitted.batchId, 50);
  return { submitted, report: report! };
}

export const counts = (db: Db) => loadedRowCounts(db);

/** Polls `probe` every 100 ms until it gives a value, or throws after `deadlineMs`. */
export async function until<T>(what: string, deadlineMs: number, probe: () => Promise<T | null | undefined | false>): Promise<T> {
  const end = Date.now() + deadlineMs;
  for (;;) {
    const v = await probe();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
