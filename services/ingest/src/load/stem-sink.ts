import { copyStems, insertStems, STEM_FIELDS, type StemColumns, type StemRecord, type Tx } from '@stemwise/db';
import { Channel } from './channel';

export type { StemRecord };

/** Where validated stems go inside the load transaction. */
export interface StemSink {
  /**
   * Adds a stem; a returned promise must be awaited (backpressure). The sink reads the record's fields
   * during the call and keeps no reference to it, so a caller may reuse one record for every stem.
   */
  add(stem: Readonly<StemRecord>): Promise<void> | undefined;
  /** Stops loading (the batch will be rejected); later adds are dropped. */
  stop(): void;
  /** Writes what is left and waits until the database has it. */
  finish(): Promise<void>;
  readonly stopped: boolean;
}

// COPY text format: backslash, tab, line feed and carriage return are escaped; \N is NULL.
function copyText(s: string): string {
  return /[\\\t\n\r]/.test(s) ? s.replace(/\\/g, '\\\\').replace(/\t/g, '\\t').replace(/\n/g, '\\n').replace(/\r/g, '\\r') : s;
}

/** One stem as a line of COPY text, its fields in STEM_COPY_COLUMNS order. */
export function copyLine(s: Readonly<StemRecord>): string {
  return `${s.visitId}\t${copyText(s.treeId)}\t${s.species === null ? '\\N' : copyText(s.species)}\t${s.dbhCm}\t${s.heightM === null ? '\\N' : s.heightM}\t${s.status}\t${s.stumpCause ?? '\\N'}\t${s.fireDamage}\t${s.inSubplot ? 't' : 'f'}\n`;
}

// Below V8's large-object size (about 128 KB), so a chunk dies young instead of growing the old generation.
const CHUNK_CHARS = 64 * 1024;

/**
 * PostgreSQL: one COPY … FROM STDIN fed while validation runs (the server inserts on its own core).
 * Each 64 KB chunk is encoded to a Buffer as soon as it is full: COPY is the slower side, so chunks
 * queue, and queued strings would be promoted to V8's old generation and pile up there as garbage.
 */
export function copySink(tx: Tx): StemSink {
  const channel = new Channel<Buffer>(16);
  let buf = '';
  let stopped = false;
  const copying = copyStems(tx, channel).catch((err) => {
    channel.fail(err);
    throw err;
  });
  copying.catch(() => {}); // observed in finish(); never an unhandled rejection
  return {
    get stopped() {
      return stopped;
    },
    add(stem) {
      if (stopped) return undefined;
      buf += copyLine(stem);
      if (buf.length < CHUNK_CHARS) return undefined;
      const chunk = Buffer.from(buf, 'utf8');
      buf = '';
      return channel.push(chunk);
    },
    stop() {
      stopped = true;
      buf = '';
    },
    async finish() {
      if (buf.length) await channel.push(Buffer.from(buf, 'utf8'));
      buf = '';
      channel.close();
      await copying;
    },
  };
}

const UNNEST_ROWS = 20_000;

function emptyColumns(): StemColumns {
  return { visitId: [], treeId: [], species: [], dbhCm: [], heightM: [], status: [], stumpCause: [], fireDamage: [], inSubplot: [] };
}

function pushField<K extends keyof StemRecord>(cols: StemColumns, stem: Readonly<StemRecord>, field: K): void {
  cols[field].push(stem[field]);
}

/** PGlite (or any engine): batched INSERT … SELECT FROM unnest, 20,000 stems a statement. */
export function unnestSink(tx: Tx): StemSink {
  let cols = emptyColumns();
  let stopped = false;
  return {
    get stopped() {
      return stopped;
    },
    add(stem) {
      if (stopped) return undefined;
      for (const f of STEM_FIELDS) pushField(cols, stem, f);
      if (cols.visitId.length < UNNEST_ROWS) return undefined;
      const full = cols;
      cols = emptyColumns();
      return insertStems(tx, full);
    },
    stop() {
      stopped = true;
      cols = emptyColumns();
    },
    async finish() {
      if (cols.visitId.length) await insertStems(tx, cols);
      cols = emptyColumns();
    },
  };
}
