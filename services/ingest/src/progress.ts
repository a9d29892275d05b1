import { EventEmitter } from 'node:events';
import { updateBatchProgress, type Db } from '@stemwise/db';
import type { JobContext, Logger } from '@stemwise/platform';

export interface IngestProgress {
  batchId: string;
  phase: 'checking' | 'loading' | 'done';
  bytesTotal: number;
  bytesRead: number;
  rowsChecked: number;
  rowsLoaded: number;
}

/**
 * Progress of batches validated in this process, for a CLI that runs the in-process queue (with
 * BullMQ, progress is read from the batch row instead). Emits 'progress' with an IngestProgress.
 */
export const ingestEvents = new EventEmitter();

const EVERY_MS = 500;

/** Writes progress to the batch row (and the job) at most every half second, never blocking validation. */
export class ProgressReporter {
  readonly counters = { bytesRead: 0, rowsChecked: 0, rowsLoaded: 0 };
  private last = 0;
  private writing: Promise<void> | null = null;
  /** PGlite has one connection: while the load transaction holds it, the row is not written. */
  inTransaction = false;
  phase: IngestProgress['phase'] = 'checking';

  constructor(
    private readonly db: Db,
    private readonly batchId: string,
    private readonly bytesTotal: number,
    private readonly log: Logger,
    private readonly job?: JobContext,
  ) {}

  tick(force = false): void {
    const now = Date.now();
    if (!force && now - this.last < EVERY_MS) return;
    this.last = now;
    const p: IngestProgress = { batchId: this.batchId, phase: this.phase, bytesTotal: this.bytesTotal, ...this.counters };
    ingestEvents.emit('progress', p);
    this.job?.progress({ bytesRead: p.bytesRead, rowsChecked: p.rowsChecked, rowsLoaded: p.rowsLoaded }).catch(() => {});
    if (this.writing || (this.inTransaction && this.db.kind === 'pglite')) return;
    this.writing = updateBatchProgress(this.db, this.batchId, this.counters)
      .catch((err) => this.log.warn({ err }, 'progress not written'))
      .finally(() => (this.writing = null));
  }

  /** Waits for a write in flight (before the final state is written). */
  async settle(): Promise<void> {
    await this.writing;
  }
}
