import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { Readable, Transform, Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { createGunzip } from 'node:zlib';
import type { BatchFile } from '@stemwise/db';

/** The files of an inventory batch (upload format version 1). */
export type FileKind = 'plots' | 'trees' | 'strata' | 'species';

export interface SubmittedFile {
  kind: FileKind;
  /** The name it was uploaded under (for people). */
  name: string;
  /** A path to read, or the upload stream itself. */
  source: string | Readable;
  /**
   * `source` is a file the service spooled itself on the storage folder's file system (an HTTP upload):
   * it is moved into the batch folder instead of copied, so an upload is written to disk once.
   */
  move?: boolean;
}

export interface StoredFile extends BatchFile {
  /** SHA-256 of the decompressed bytes (of the raw bytes, prefixed `raw:`, when gzip cannot be read). */
  contentSha256: string;
}

export const KIND_ORDER: readonly FileKind[] = ['plots', 'trees', 'strata', 'species'];

async function fsyncPath(p: string): Promise<void> {
  const fh = await fs.promises.open(p, 'r');
  try {
    await fh.sync();
  } finally {
    await fh.close();
  }
}

/**
 * Copies (or, with `move`, moves) one upload into the batch folder durably (temporary name, fsync,
 * rename) while hashing it: the hash is over the decompressed text, so the same data uploaded plain or
 * gzipped is one content. A gzip file that expands past `maxUnpackedBytes` is hashed as raw bytes
 * (decompression stops there; the ingest refuses the file with its own rule).
 */
export async function storeFile(dir: string, file: SubmittedFile, maxUnpackedBytes = Infinity): Promise<StoredFile> {
  const part = path.join(dir, `${file.kind}.part`);
  const raw = crypto.createHash('sha256');
  const plain = crypto.createHash('sha256');
  let bytes = 0;
  let head: Buffer | null = null;
  let gunzip: ReturnType<typeof createGunzip> | null = null;
  let gunzipFailed = false;
  let gunzipDone: Promise<void> = Promise.resolve();
  let unpacked = 0;
  const tap = new Transform({
    transform(chunk: Buffer, _enc, cb) {
      if (head === null) {
        head = chunk.subarray(0, 2);
        if (head.length === 2 && head[0] === 0x1f && head[1] === 0x8b) {
          const g = createGunzip();
          gunzip = g;
          gunzipDone = new Promise((resolve) => {
            const stop = () => {
              gunzipFailed = true;
              resolve();
            };
            g.on('data', (d: Buffer) => {
              unpacked += d.length;
              if (unpacked <= maxUnpackedBytes) return void plain.update(d);
              stop();
              g.destroy();
            });
            g.on('end', resolve);
            g.on('error', stop);
          });
        }
      }
      bytes += chunk.length;
      raw.update(chunk);
      if (gunzip && !gunzipFailed) gunzip.write(chunk);
      else if (!gunzip) plain.update(chunk);
      cb(null, chunk);
    },
    flush(cb) {
      if (!gunzipFailed) (gunzip as ReturnType<typeof createGunzip> | null)?.end();
      cb();
    },
  });
  const source = typeof file.source === 'string' ? fs.createReadStream(file.source) : file.source;
  const moving = file.move === true && typeof file.source === 'string';
  const discard = new Writable({ write: (_chunk, _enc, cb) => cb() });
  await pipeline(source, tap, moving ? discard : fs.createWriteStream(part));
  await gunzipDone;
  const from = moving ? (file.source as string) : part;
  await fsyncPath(from);
  const gzip = gunzip !== null;
  const stored = `${file.kind}.csv${gzip ? '.gz' : ''}`;
  await fs.promises.rename(from, path.join(dir, stored));
  return {
    kind: file.kind,
    name: file.name,
    stored,
    bytes,
    gzip,
    contentSha256: gzip && gunzipFailed ? `raw:${raw.digest('hex')}` : plain.digest('hex'),
  };
}

/** The content hash of a batch: SHA-256 over each file's kind and content hash, in a fixed order of kinds. */
export function batchContentHash(files: readonly StoredFile[]): string {
  const h = crypto.createHash('sha256');
  for (const kind of KIND_ORDER) {
    const f = files.find((x) => x.kind === kind);
    if (f) h.update(`${kind} ${f.contentSha256}\n`);
  }
  return h.digest('hex');
}

/** Makes the folder of a new batch and, once its files are in, makes the folder entry itself durable. */
export async function makeBatchDir(storageDir: string, batchId: string): Promise<string> {
  const dir = path.join(storageDir, batchId);
  await fs.promises.mkdir(dir, { recursive: true });
  return dir;
}

export async function syncDir(dir: string): Promise<void> {
  await fsyncPath(dir).catch(() => {}); // not every file system lets a directory be fsynced
  await fsyncPath(path.dirname(dir)).catch(() => {});
}

/** The files of an upload folder: plots.csv and trees.csv, optionally strata.csv and species.csv, each maybe .gz. */
export function filesInDir(dir: string): SubmittedFile[] {
  const out: SubmittedFile[] = [];
  const names = fs.readdirSync(dir);
  for (const kind of KIND_ORDER) {
    const found = names.filter((n) => n.toLowerCase() === `${kind}.csv` || n.toLowerCase() === `${kind}.csv.gz`);
    if (found.length > 1) throw new Error(`${dir} holds both ${found.join(' and ')}; keep one`);
    if (found.length) out.push({ kind, name: found[0], source: path.join(dir, found[0]) });
  }
  return out;
}
