import fs from 'node:fs';
import { insertSpeciesVersion, latestSpeciesVersion, markVisitsStale, type Db } from '@stemwise/db';
import { IssueLog } from './issues';
import { batchOptions, PLAUSIBILITY_DEFAULTS, type SubmitOptions } from '@stemwise/core';
import { latestAllowedDate } from './validate/context';
import { validateSpecies } from './validate/species';

export interface SpeciesImportResult {
  /** The new version, or the current one when the list is identical to it. */
  versionId: number | null;
  created: boolean;
  species: number;
  errors: number;
  warnings: number;
  log: IssueLog;
  /** Plot visits marked for recomputation. */
  staleVisits: number;
}

/**
 * Imports a species reference list as a new version and marks every plot visit stale (metrics depend
 * on names, guilds and densities). The list is checked with the same rules as in a batch; any error
 * imports nothing. An identical list (same content hash as the current version) makes no new version.
 */
export async function importSpeciesFile(db: Db, file: string, options: Pick<SubmitOptions, 'delimiter' | 'decimalComma'> = {}): Promise<SpeciesImportResult> {
  const log = new IssueLog();
  const gzip = (() => {
    const fd = fs.openSync(file, 'r');
    try {
      const b = Buffer.alloc(2);
      return fs.readSync(fd, b, 0, 2, 0) === 2 && b[0] === 0x1f && b[1] === 0x8b;
    } finally {
      fs.closeSync(fd);
    }
  })();
  const progress = { bytesRead: 0, rowsChecked: 0, rowsLoaded: 0 };
  const result = await validateSpecies(
    {
      log,
      options: batchOptions(options),
      forestTypes: [],
      today: latestAllowedDate(),
      plausibility: PLAUSIBILITY_DEFAULTS,
      progress,
      tick: () => {},
    },
    { file: 'species.csv', path: file, gzip },
  );
  const base = { species: result.rows.length, errors: log.errors, warnings: log.warnings, log };
  if (log.errors > 0 || result.stats.fatal) return { ...base, versionId: null, created: false, staleVisits: 0 };
  return db.transaction(async (tx) => {
    const latest = await latestSpeciesVersion(tx);
    if (latest && latest.contentHash === result.contentHash) return { ...base, versionId: latest.id, created: false, staleVisits: 0 };
    const versionId = await insertSpeciesVersion(tx, `file ${file.split(/[\\/]/).pop()}`, result.contentHash, result.rows);
    const staleVisits = await markVisitsStale(tx, 'all');
    return { ...base, versionId, created: true, staleVisits };
  });
}

