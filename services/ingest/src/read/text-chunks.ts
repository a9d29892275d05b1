import fs from 'node:fs';
import { createGunzip } from 'node:zlib';
import { STRUCTURE, structureMessages } from '@stemwise/core';
import { FileProblem } from './file-problem';

/** Offset of the first byte that breaks UTF-8 in `buf` (from `from`), or -1. */
export function firstInvalidUtf8(buf: Uint8Array, from = 0): number {
  let i = from;
  while (i < buf.length) {
    const b = buf[i];
    if (b < 0x80) {
      i++;
      continue;
    }
    const need = b >= 0xc2 && b <= 0xdf ? 1 : b >= 0xe0 && b <= 0xef ? 2 : b >= 0xf0 && b <= 0xf4 ? 3 : -1;
    if (need < 0) return i;
    for (let k = 1; k <= need; k++) {
      if (i + k >= buf.length) return -1; // cut at the chunk end: the next chunk decides
      if ((buf[i + k] & 0xc0) !== 0x80) return i;
    }
    i += need + 1;
  }
  return -1;
}

function countNewlines(buf: Uint8Array, end: number): number {
  let n = 0;
  for (let i = 0; i < end; i++) if (buf[i] === 0x0a) n++;
  return n;
}

/**
 * The text of a stored upload file as UTF-8 string chunks (a BOM dropped), decompressed when `gzip`.
 * `onBytes` gets the count of stored (possibly compressed) bytes read, for progress. Throws a
 * FileProblem for a damaged gzip file, one that expands past `maxUnpackedBytes` (a few KB of gzip can
 * hold gigabytes), or text that is not UTF-8, naming the line.
 */
export async function* textChunks(filePath: string, gzip: boolean, onBytes: (n: number) => void, maxUnpackedBytes = Infinity): AsyncGenerator<string> {
  const raw = fs.createReadStream(filePath, { highWaterMark: 64 * 1024 });
  raw.on('data', (b) => onBytes(b.length));
  const source: AsyncIterable<Buffer> = gzip ? raw.pipe(createGunzip({ chunkSize: 64 * 1024 })) : raw;
  if (gzip) raw.on('error', (err) => (source as NodeJS.ReadWriteStream).emit('error', err));
  const decoder = new TextDecoder('utf-8', { fatal: true });
  let first = true;
  let newlines = 0;
  let unpacked = 0;
  try {
    for await (const buf of source) {
      unpacked += buf.length;
      if (gzip && unpacked > maxUnpackedBytes) {
        throw new FileProblem(STRUCTURE.unpackedTooLarge, null, structureMessages.unpackedTooLarge(fileLabel(filePath), maxUnpackedBytes));
      }
      if (first && buf.length >= 2 && ((buf[0] === 0xff && buf[1] === 0xfe) || (buf[0] === 0xfe && buf[1] === 0xff))) {
        throw new FileProblem(STRUCTURE.encoding, 1, structureMessages.utf16());
      }
      first = false;
      let text: string;
      try {
        text = decoder.decode(buf, { stream: true });
      } catch {
        const at = Math.max(0, firstInvalidUtf8(buf));
        throw new FileProblem(STRUCTURE.encoding, newlines + countNewlines(buf, at) + 1, structureMessages.latin1(buf[at] ?? 0));
      }
      for (let i = text.indexOf('\n'); i >= 0; i = text.indexOf('\n', i + 1)) newlines++;
      if (text.length) yield text;
    }
    try {
      const rest = decoder.decode();
      if (rest.length) yield rest;
    } catch {
      throw new FileProblem(STRUCTURE.encoding, newlines + 1, 'the file ends in the middle of a UTF-8 character; save it as UTF-8 and upload again');
    }
  } catch (err) {
    if (err instanceof FileProblem) throw err;
    const code = (err as { code?: string }).code ?? '';
    if (gzip && (code.startsWith('Z_') || /incorrect header|unexpected end|invalid/i.test(String((err as Error).message)))) {
      throw new FileProblem(STRUCTURE.gzipCorrupt, null, structureMessages.gzipCorrupt(fileLabel(filePath), (err as Error).message));
    }
    throw err;
  } finally {
    raw.destroy();
  }
}

function fileLabel(p: string): string {
  return p.split(/[\\/]/).pop() ?? p;
}
