import type { BatchOptions } from '@stemwise/db';
import type { IssueLog } from '../issues';
import type { PlausibilityOptions } from '@stemwise/core';
import type { TableOptions } from '../read/table';

/** What every file validator shares while one batch is checked. */
export interface ValidationContext {
  log: IssueLog;
  options: BatchOptions;
  forestTypes: readonly string[];
  /** Largest decompressed size of a gzip file (bytes; STEMWISE_MAX_UNPACKED_MB). Default: no cap. */
  maxUnpackedBytes?: number;
  /** Dates after this (YYYY-MM-DD) are in the future. */
  today: string;
  plausibility: PlausibilityOptions;
  /** Counters read by the progress reporter. */
  progress: { bytesRead: number; rowsChecked: number; rowsLoaded: number };
  /** Called after each chunk of rows (the progress reporter writes every ~0.5 s). */
  tick(): void;
}

/** Today's date plus one day, YYYY-MM-DD: a crew east of UTC may already be a day ahead. */
export function latestAllowedDate(now = new Date()): string {
  return new Date(now.getTime() + 86_400_000).toISOString().slice(0, 10);
}

/** How every file of a batch is read: its column table, the batch's options, and progress counting. */
export function tableOptions(ctx: ValidationContext, columns: TableOptions['columns'], requireRows: boolean): TableOptions {
  return {
    log: ctx.log,
    columns,
    delimiter: ctx.options.delimiter,
    decimalComma: ctx.options.decimal_comma,
    forestTypes: ctx.forestTypes,
    today: ctx.today,
    requireRows,
    onBytes: (n) => (ctx.progress.bytesRead += n),
    maxUnpackedBytes: ctx.maxUnpackedBytes,
  };
}
