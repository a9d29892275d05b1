import type { Queryable } from '../connection';
import type { batches, batchIssues, batchUnresolvedNames } from '../schema/batches';

type Batch = typeof batches.$inferSelect;

// The batch row is the source of truth of an upload: its state, counts, progress and issues.

export type BatchState = 'received' | 'validating' | 'rejected' | 'loaded' | 'computed' | 'failed';

export interface BatchFile {
  kind: 'plots' | 'trees' | 'strata' | 'species';
  /** Name as uploaded (for people). */
  name: string;
  /** Name in the storage folder of the batch. */
  stored: string;
  bytes: number;
  gzip: boolean;
}

export interface BatchOptions {
  skip_invalid: boolean;
  replace: boolean;
  delimiter: ',' | ';';
  decimal_comma: boolean;
}

/** A batch as stored; its state, files and options are typed as the ingest writes them. */
export interface BatchRow extends Omit<Batch, 'state' | 'files' | 'options'> {
  state: BatchState;
  files: BatchFile[];
  options: BatchOptions;
}

// bytes_total and bytes_read are int8: read as float8, a number on both engines (sizes stay far below 2^53).
const COLUMNS = `id, state, content_hash "contentHash", files, options, submitted_by "submittedBy",
  plots_rows "plotsRows", trees_rows "treesRows", plots_loaded "plotsLoaded", stems_loaded "stemsLoaded",
  rows_skipped "rowsSkipped", n_errors "nErrors", n_warnings "nWarnings", bytes_total::float8 "bytesTotal",
  bytes_read::float8 "bytesRead", rows_checked "rowsChecked", rows_loaded "rowsLoaded", attempts,
  failure_reason "failureReason", created_at "createdAt", updated_at "updatedAt", loaded_at "loadedAt"`;

/**
 * Records a received upload. Returns null when a live batch (not rejected, not failed) with the same
 * content hash exists: the partial unique index decides, so two concurrent identical uploads are safe.
 */
export async function insertBatch(
  db: Queryable,
  row: { id: string; contentHash: string; files: BatchFile[]; options: BatchOptions; submittedBy: string; bytesTotal: number },
): Promise<string | null> {
  const rows = await db.query<Pick<Batch, 'id'>>(
    `insert into batches (id, state, content_hash, files, options, submitted_by, bytes_total)
     values ($1, 'received', $2, $3::jsonb, $4::jsonb, $5, $6)
     on conflict do nothing returning id`,
    [row.id, row.contentHash, JSON.stringify(row.files), JSON.stringify(row.options), row.submittedBy, row.bytesTotal],
  );
  return rows[0]?.id ?? null;
}

/** The live batch (not rejected, not failed) holding this content, or null. */
export async function findLiveBatchByHash(db: Queryable, contentHash: string): Promise<{ id: string; state: BatchState } | null> {
  const rows = await db.query<{ id: string; state: BatchState }>(
    `select id, state from batches where content_hash = $1 and state not in ('rejected','failed') limit 1`,
    [contentHash],
  );
  return rows[0] ?? null;
}

export async function getBatch(db: Queryable, id: string): Promise<BatchRow | null> {
  const rows = await db.query<BatchRow>(`select ${COLUMNS} from batches where id = $1`, [id]);
  return rows[0] ?? null;
}

/**
 * Starts (or restarts) validation: state `validating`, one more attempt, counters reset. Returns
 * false when the batch is not waiting (already rejected, loaded, computed or failed).
 */
export async function startBatchValidation(db: Queryable, id: string): Promise<boolean> {
  const rows = await db.query(
    `update batches set state = 'validating', attempts = attempts + 1, plots_rows = 0, trees_rows = 0,
        plots_loaded = 0, stems_loaded = 0, rows_skipped = 0, n_errors = 0, n_warnings = 0, bytes_read = 0,
        rows_checked = 0, rows_loaded = 0, failure_reason = null, updated_at = now()
      where id = $1 and state in ('received','validating') returning id`,
    [id],
  );
  return rows.length === 1;
}

export interface BatchProgress {
  bytesRead: number;
  rowsChecked: number;
  rowsLoaded: number;
}

/** Progress of a batch being validated (written every half second or so). */
export async function updateBatchProgress(db: Queryable, id: string, p: BatchProgress): Promise<void> {
  await db.query(
    `update batches set bytes_read = $2, rows_checked = $3, rows_loaded = $4, updated_at = now() where id = $1 and state = 'validating'`,
    [id, p.bytesRead, p.rowsChecked, p.rowsLoaded],
  );
}

/** An issue as stored (without its batch); `severity` is one its check constraint allows. */
export interface BatchIssueRow extends Pick<typeof batchIssues.$inferSelect, 'rule' | 'file' | 'line' | 'column' | 'value' | 'message'> {
  severity: 'error' | 'warning';
}

export async function deleteBatchIssues(db: Queryable, batchId: string): Promise<void> {
  await db.query(`delete from batch_issues where batch_id = $1`, [batchId]);
}

/** Stores issues (one statement per 5,000, arrays as single parameters). */
export async function insertBatchIssues(db: Queryable, batchId: string, issues: readonly BatchIssueRow[]): Promise<void> {
  for (let i = 0; i < issues.length; i += 5000) {
    const part = issues.slice(i, i + 5000);
    await db.query(
      `insert into batch_issues (batch_id, severity, rule, file, line, "column", value, message)
       select $1, * from unnest($2::text[], $3::text[], $4::text[], $5::int[], $6::text[], $7::text[], $8::text[])`,
      [
        batchId,
        part.map((x) => x.severity),
        part.map((x) => x.rule),
        part.map((x) => x.file),
        part.map((x) => x.line),
        part.map((x) => x.column),
        part.map((x) => x.value),
        part.map((x) => x.message),
      ],
    );
  }
}

/** Issues of a batch in a stable order (errors first, then by rule, file and line). */
export async function listBatchIssues(db: Queryable, batchId: string, severity?: 'error' | 'warning'): Promise<BatchIssueRow[]> {
  return db.query<BatchIssueRow>(
    `select severity, rule, file, line, "column", value, message from batch_issues
      where batch_id = $1 and ($2::text is null or severity = $2)
      order by severity, rule, file, line nulls last, id`,
    [batchId, severity ?? null],
  );
}

/** Names of a batch that did not resolve (written by the compute service from its metrics). */
export async function listUnresolvedNames(db: Queryable, batchId: string): Promise<Array<Omit<typeof batchUnresolvedNames.$inferSelect, 'batchId'>>> {
  return db.query(`select name, level, stems from batch_unresolved_names where batch_id = $1 order by stems desc, name`, [batchId]);
}

export interface BatchCounts {
  plotsRows: number;
  treesRows: number;
  plotsLoaded: number;
  stemsLoaded: number;
  rowsSkipped: number;
  nErrors: number;
  nWarnings: number;
  bytesRead: number;
  rowsChecked: number;
}

/** Ends validation: `rejected` (nothing loaded) or `loaded`, with the final counts. */
export async function finishBatch(db: Queryable, id: string, state: 'rejected' | 'loaded', c: BatchCounts): Promise<void> {
  await db.query(
    `update batches set state = $2, plots_rows = $3, trees_rows = $4, plots_loaded = $5, stems_loaded = $6,
        rows_skipped = $7, n_errors = $8, n_warnings = $9, bytes_read = $10, rows_checked = $11,
        rows_loaded = $6, updated_at = now(), loaded_at = case when $2 = 'loaded' then now() else null end
      where id = $1`,
    [id, state, c.plotsRows, c.treesRows, c.plotsLoaded, c.stemsLoaded, c.rowsSkipped, c.nErrors, c.nWarnings, c.bytesRead, c.rowsChecked],
  );
}
