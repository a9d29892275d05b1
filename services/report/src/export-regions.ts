import { countStaleVisits, listLatestSnapshots, listRegionNames, regionExists, type Queryable } from '@stemwise/db';
import { encodeTable, NATIONAL, REGION_COLUMNS, writeExport, type ExportTarget, type RegionRow, type Row, type ServiceDeps } from '@stemwise/core';
import { StemwiseError } from '@stemwise/platform';
import type { SnapshotPayload } from './snapshot-payload';
import { readNationalSnapshot } from './national-snapshot';

export interface ExportRegionsOptions {
  format: 'csv' | 'json';
  /** Only this region (by name), or `national` for the national rows only. */
  region?: string | null;
}

/**
 * The `export regions` rows of the latest summary of every region (or one), by region name, then the
 * rows of the latest national summary (region `national`, docs/exports.md) unless one region was asked for.
 */
export async function listRegionExportRows(db: Queryable, region?: string | null): Promise<RegionRow[]> {
  const rows: RegionRow[] = [];
  if (region !== NATIONAL) for (const s of await listLatestSnapshots(db, region ?? null)) rows.push(...(s.payload as SnapshotPayload).summary.rows);
  if (region === null || region === undefined || region === NATIONAL) rows.push(...((await readNationalSnapshot(db))?.payload.summary.rows ?? []));
  return rows;
}

/**
 * `stemwise export regions`: the columns of docs/exports.md from the latest snapshots, as
 * CSV (neutralised for spreadsheets) or JSON, to a file or a stream, the national rows last. Regions
 * not summarised yet are absent; `staleVisits` counts plot visits whose figures a recompute has still to bring in.
 */
export async function exportRegions(deps: Pick<ServiceDeps, 'db'>, options: ExportRegionsOptions, target: ExportTarget): Promise<{ rows: number; staleVisits: number }> {
  const region = options.region ?? null;
  if (region !== null && region !== NATIONAL && !(await regionExists(deps.db, region))) {
    const known = await listRegionNames(deps.db);
    throw new StemwiseError('not_found', `no region named '${region}' (known: ${known.length ? known.join(', ') : 'none yet'}; '${NATIONAL}' gives the national rows)`);
  }
  const rows = await listRegionExportRows(deps.db, region);
  await writeExport(encodeTable(options.format, REGION_COLUMNS, rows as unknown as Row[]), target);
  return { rows: rows.length, staleVisits: await countStaleVisits(deps.db, region === NATIONAL ? null : region) };
}
