import fs from 'node:fs';
import path from 'node:path';
import { once } from 'node:events';

// A streaming reader of multipart/form-data (RFC 7578) for uploads: each file part is written to a
// file as it arrives (never held in memory whole), text fields are collected. Limits keep a client
// from filling the disk or the memory.

export class MultipartError extends Error {
  constructor(
    message: string,
    readonly status: 400 | 413 = 400,
  ) {
    super(message);
    this.name = 'MultipartError';
  }
}

export interface MultipartLimits {
  /** Total bytes of the body. */
  maxBytes: number;
  /** Names of the file parts accepted (others are refused). */
  fileFields: readonly string[];
  /** Names of the text fields accepted (others are refused). */
  textFields: readonly string[];
  /** Bytes of one text field or of one part's headers. */
  maxTextBytes?: number;
}

export interface MultipartFile {
  field: string;
  filename: string;
  path: string;
  bytes: number;
}

export interface MultipartResult {
  files: MultipartFile[];
  fields: Record<string, string>;
}

/** The boundary of a multipart/form-data content type, or null. */
export function multipartBoundary(contentType: string | undefined): string | null {
  if (!contentType || !/^multipart\/form-data\s*;/i.test(contentType)) return null;
  const m = /;\s*boundary=(?:"([^"]{1,70})"|([^\s;]{1,70}))/i.exec(contentType);
  return m ? (m[1] ?? m[2]) : null;
}

function parseHeaders(text: string): { name: string; filename: string | null } {
  let name: string | null = null;
  let filename: string | null = null;
  for (const line of text.split('\r\n')) {
    const colon = line.indexOf(':');
    if (colon < 0 || line.slice(0, colon).trim().toLowerCase() !== 'content-disposition') continue;
    const value = line.slice(colon + 1);
    if (!/^\s*form-data\s*(;|$)/i.test(value)) throw new MultipartError('a part is not form-data');
    name = /;\s*name="([^"]*)"/i.exec(value)?.[1] ?? /;\s*name=([^;\s]+)/i.exec(value)?.[1] ?? null;
    filename = /;\s*filename="([^"]*)"/i.exec(value)?.[1] ?? /;\s*filename=([^;\s]+)/i.exec(value)?.[1] ?? null;
  }
  if (!name) throw new MultipartError('a part has no name (Content-Disposition: form-data; name="…")');
  return { name, filename };
}

type Sink = { kind: 'file'; file: MultipartFile; stream: fs.WriteStream; failed: Error | null } | { kind: 'text'; name: string; chunks: Buffer[]; bytes: number };

/** Opens a spool file whose errors are kept on the sink (an 'error' event without a listener would end the process). */
function fileSink(file: MultipartFile): Sink {
  const sink: Sink = { kind: 'file', file, stream: fs.createWriteStream(file.path), failed: null };
  sink.stream.on('error', (err) => (sink.failed ??= err));
  return sink;
}

/** Waits for 'drain' or 'finish' of a spool file, or rejects with its error. */
function settle(sink: Extract<Sink, { kind: 'file' }>, event: 'drain' | 'finish'): Promise<void> {
  if (sink.failed) return Promise.reject(sink.failed);
  return new Promise((resolve, reject) => {
    const done = () => {
      sink.stream.off('error', fail);
      resolve();
    };
    const fail = (err: Error) => {
      sink.stream.off(event, done);
      reject(err);
    };
    sink.stream.once(event, done);
    sink.stream.once('error', fail);
  });
}

/**
 * Reads a multipart body from `body`, writing file parts into `dir` (created; named after their field).
 * Throws MultipartError for a malformed or oversized body; files written so far stay in `dir` (the
 * caller removes the folder).
 */
export async function readMultipart(body: AsyncIterable<Buffer>, boundary: string, dir: string, limits: MultipartLimits): Promise<MultipartResult> {
  const maxText = limits.maxTextBytes ?? 16 * 1024;
  const delimiter = Buffer.from(`\r\n--${boundary}`);
  await fs.promises.mkdir(dir, { recursive: true });
  const result: MultipartResult = { files: [], fields: {} };
  const seen = new Set<string>();
  // The body starts with "--boundary": a CRLF in front lets one delimiter serve every boundary.
  let buf: Buffer = Buffer.from('\r\n');
  let state: 'preamble' | 'after-boundary' | 'headers' | 'body' | 'done' = 'preamble';
  let sink: Sink | null = null;
  let total = 0;

  const write = async (data: Buffer) => {
    if (!data.length || !sink) return;
    if (sink.kind === 'file') {
      if (sink.failed) throw sink.failed;
      sink.file.bytes += data.length;
      if (!sink.stream.write(data)) await settle(sink, 'drain');
    } else {
      sink.bytes += data.length;
      if (sink.bytes > maxText) throw new MultipartError(`field ${sink.name} is longer than ${maxText} bytes`, 413);
      sink.chunks.push(data);
    }
  };
  const closeSink = async () => {
    if (!sink) return;
    if (sink.kind === 'file') {
      const done = settle(sink, 'finish');
      sink.stream.end();
      await done;
      result.files.push(sink.file);
    } else {
      result.fields[sink.name] = Buffer.concat(sink.chunks).toString('utf8');
    }
    sink = null;
  };
  const openSink = (name: string, filename: string | null) => {
    if (seen.has(name)) throw new MultipartError(`part ${name} is given twice`);
    seen.add(name);
    if (filename !== null) {
      if (!limits.fileFields.includes(name)) throw new MultipartError(`unexpected file part ${name} (expected ${limits.fileFields.join(', ')})`);
      const file: MultipartFile = { field: name, filename: path.basename(filename.replace(/\\/g, '/')) || name, path: path.join(dir, `${name}.upload`), bytes: 0 };
      sink = fileSink(file);
    } else {
      if (!limits.textFields.includes(name)) throw new MultipartError(`unexpected field ${name} (files are sent with a filename; fields: ${limits.textFields.join(', ') || 'none'})`);
      sink = { kind: 'text', name, chunks: [], bytes: 0 };
    }
  };

  try {
    for await (const chunk of body) {
      total += chunk.length;
      if (total > limits.maxBytes) throw new MultipartError(`the upload is larger than ${limits.maxBytes} bytes`, 413);
      buf = buf.length ? Buffer.concat([buf, chunk]) : chunk;
      for (;;) {
        if (state === 'preamble' || state === 'body') {
          const at = buf.indexOf(delimiter);
          if (at < 0) {
            // keep a tail that may be the start of a delimiter
            const keep = Math.min(buf.length, delimiter.length - 1);
            if (state === 'body') await write(buf.subarray(0, buf.length - keep));
            else if (buf.length > 64 * 1024) throw new MultipartError('no multipart boundary found at the start of the body');
            buf = buf.subarray(buf.length - keep);
            break;
          }
          if (state === 'body') {
            await write(buf.subarray(0, at));
            await closeSink();
          }
          buf = buf.subarray(at + delimiter.length);
          state = 'after-boundary';
        }
        if (state === 'after-boundary') {
          if (buf.length < 2) break;
          if (buf[0] === 0x2d && buf[1] === 0x2d) {
            state = 'done';
            break;
          }
          const eol = buf.indexOf('\r\n');
          if (eol < 0) {
            if (buf.length > 256) throw new MultipartError('malformed boundary line');
            break;
          }
          if (buf.subarray(0, eol).toString('latin1').trim() !== '') throw new MultipartError('malformed boundary line');
          buf = buf.subarray(eol + 2);
          state = 'headers';
        }
        if (state === 'headers') {
          const end = buf.indexOf('\r\n\r\n');
          if (end < 0) {
            if (buf.length > maxText) throw new MultipartError('part headers are too long', 413);
            break;
          }
          const { name, filename } = parseHeaders(buf.subarray(0, end).toString('utf8'));
          openSink(name, filename);
          buf = buf.subarray(end + 4);
          state = 'body';
          continue;
        }
        if (state === 'done') break;
      }
      if (state === 'done') break;
    }
    if (state !== 'done') throw new MultipartError('the upload ended before its closing boundary (interrupted?)');
    return result;
  } catch (err) {
    // Close the spool file before the caller removes the folder (a pending write fails quietly).
    const s = sink as Sink | null;
    if (s?.kind === 'file' && !s.stream.closed) {
      const closed = once(s.stream, 'close').catch(() => {});
      s.stream.destroy();
      await closed;
    }
    throw err;
  }
}
