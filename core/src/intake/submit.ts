import crypto from 'node:crypto';
import fs from 'node:fs';
import { appendAuditEntries, findLiveBatchByHash, insertBatch, type BatchOptions, type BatchState } from '@stemwise/db';
import type { ServiceDeps } from '../deps';
import { oneLine, StemwiseError } from '@stemwise/platform';
import { batchContentHash, makeBatchDir, storeFile, syncDir, type SubmittedFile } from './storage';

export type { SubmittedFile } from './storage';

/** A submission that cannot be accepted at all (a 400 for the HTTP API, a usage error for the CLI). */
export class SubmissionError extends StemwiseError {
  constructor(message: string) {
    super('submission_invalid', message);
  }
}

export interface SubmitOptions {
  /** Load the valid rows and record the skipped ones (default: any error rejects the batch). */
  skipInvalid?: boolean;
  /** A plot already stored for the same survey_date is replaced (default: a conflict error). */
  replace?: boolean;
  /** Separator of values (default ','). */
  delimiter?: ',' | ';';
  /** Numbers are written with a decimal comma (needs delimiter ';'). */
  decimalComma?: boolean;
}

export interface SubmitResult {
  batchId: string;
  /** The same content is already a live batch: its id is returned and nothing new is stored. */
  duplicate: boolean;
  state: BatchState;
  /** False when the job could not be queued (Redis down): the batch is stored and is picked up later. */
  queued: boolean;
}

/** The value separator of an upload, ',' or ';' (undefined stays undefined: the default ','); anything else is a SubmissionError. */
export function checkDelimiter(value: string | undefined): ',' | ';' | undefined {
  if (value !== undefined && value !== ',' && value !== ';') throw new SubmissionError(`the delimiter must be ',' or ';', not ${JSON.stringify(value)}`);
  return value;
}

/** Checks the options of a submission and turns them into the stored form. */
export function batchOptions(o: SubmitOptions): BatchOptions {
  const delimiter = checkDelimiter(o.delimiter) ?? ',';
  if (o.decimalComma && delimiter !== ';') throw new SubmissionError("a decimal comma needs the ';' delimiter (values would be ambiguous otherwise)");
  return { skip_invalid: !!o.skipInvalid, replace: !!o.replace, delimiter, decimal_comma: !!o.decimalComma };
}

/**
 * Stores an upload durably and records it as a batch (state `received`) before anything else; only
 * then is the `ingest.batch` job queued. The same content as a live batch is recognised by its hash
 * (also under concurrent uploads, through the database's unique index) and loads nothing twice.
 */
export async function submitBatch(deps: ServiceDeps, files: readonly SubmittedFile[], options: SubmitOptions, actor: string): Promise<SubmitResult> {
  const opts = batchOptions(options);
  const kinds = files.map((f) => f.kind);
  for (const k of kinds) if (!['plots', 'trees', 'strata', 'species'].includes(k)) throw new SubmissionError(`unknown file kind ${k}`);
  if (new Set(kinds).size !== kinds.length) throw new SubmissionError('each of plots, trees, strata and species may be given once');
  for (const need of ['plots', 'trees'] as const) if (!kinds.includes(need)) throw new SubmissionError(`a batch needs ${need}.csv (or ${need}.csv.gz)`);

  const batchId = crypto.randomUUID();
  const dir = await makeBatchDir(deps.config.storageDir, batchId);
  let keep = false;
  try {
    const stored = [];
    for (const f of files) stored.push(await storeFile(dir, f, deps.config.maxUnpackedBytes));
    await syncDir(dir);
    const contentHash = batchContentHash(stored);
    const bytesTotal = stored.reduce((a, f) => a + f.bytes, 0);
    const record = stored.map(({ kind, name, stored: s, bytes, gzip }) => ({ kind, name, stored: s, bytes, gzip }));
    for (let attempt = 0; attempt < 3; attempt++) {
      const existing = await findLiveBatchByHash(deps.db, contentHash);
      if (existing) return { batchId: existing.id, duplicate: true, state: existing.state, queued: false };
      const id = await insertBatch(deps.db, { id: batchId, contentHash, files: record, options: opts, submittedBy: actor, bytesTotal });
      if (id === null) continue; // a concurrent identical upload won: report it on the next round
      keep = true;
      await appendAuditEntries(deps.db, [{ actor, action: 'batch.submit', target: batchId, details: { files: record, options: opts, contentHash } }]).catch((err) =>
        deps.log.warn({ err, batchId }, 'audit entry not written'),
      );
      let queued = true;
      try {
        await deps.queue.add({ name: 'ingest.batch', data: { batchId }, jobId: `ingest.${batchId}` });
      } catch (err) {
        queued = false;
        deps.log.warn({ batchId, reason: oneLine(err) }, 'batch stored but not queued; the reconciler will queue it');
      }
      return { batchId, duplicate: false, state: 'received', queued };
    }
    throw new Error('submitBatch: the content hash kept colliding with batches that changed state; try again');
  } finally {
    if (!keep) await fs.promises.rm(dir, { recursive: true, force: true });
  }
}
