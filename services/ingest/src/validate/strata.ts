import { tableReaders, STRATA_COLUMNS } from '../rules/columns';
import { CROSS, crossMessages } from '@stemwise/core';
import { readTable, type TableSource, type TableStats } from '../read/table';
import { tableOptions, type ValidationContext } from './context';

export interface StratumEntry {
  region: string;
  forestType: string;
  forestAreaHa: number;
  line: number;
}

const { cell, value } = tableReaders(STRATA_COLUMNS);

/** Reads strata.csv: field rules and duplicate region/forest type pairs. Returns the loadable rows. */
export async function validateStrata(ctx: ValidationContext, src: TableSource): Promise<{ strata: StratumEntry[]; stats: TableStats }> {
  const stats: TableStats = { rows: 0, badRows: 0, fatal: false };
  const strata: StratumEntry[] = [];
  const seen = new Map<string, number>();
  const rows = readTable(src, tableOptions(ctx, STRATA_COLUMNS, false), stats);
  for await (const batch of rows) {
    for (const { values, line, ok } of batch) {
      ctx.progress.rowsChecked++;
      const region = cell.region(values);
      const forestType = cell.forest_type(values);
      if (typeof region !== 'string' || typeof forestType !== 'string') continue;
      const key = `${region}\u0000${forestType}`;
      const first = seen.get(key);
      if (first !== undefined) {
        ctx.log.add(CROSS.duplicateStratum, src.file, line, 'region', region, crossMessages.duplicateStratum(region, forestType, first));
        if (ok) stats.badRows++;
        continue;
      }
      seen.set(key, line);
      if (ok) strata.push({ region, forestType, forestAreaHa: value.forest_area_ha(values), line });
    }
    ctx.tick();
  }
  return { strata, stats };
}
