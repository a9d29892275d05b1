import fs from 'node:fs';
import path from 'node:path';
import { once } from 'node:events';
import type { Writable } from 'node:stream';
import { StemwiseError } from '@stemwise/platform';

/** Where an export goes: a file (written to a temporary name, renamed when complete) or a stream such as stdout. */
export type ExportTarget = { file: string } | { stream: Writable };

const FLUSH_BYTES = 64 * 1024;

async function writeTo(stream: Writable, text: string): Promise<void> {
  if (!stream.write(text)) await once(stream, 'drain');
}

/**
 * Writes text pieces to the target in blocks of ~64 kB, waiting when the stream is full. A file is
 * complete or absent: an export that fails half way leaves no partial file behind.
 */
export async function writeExport(pieces: AsyncIterable<string>, target: ExportTarget): Promise<void> {
  if ('stream' in target) {
    await pump(pieces, target.stream);
    return;
  }
  const file = path.resolve(target.file);
  if (!fs.existsSync(path.dirname(file))) throw new StemwiseError('output_invalid', `cannot write ${target.file}: the folder ${path.dirname(file)} does not exist`);
  if (fs.existsSync(file) && fs.statSync(file).isDirectory()) throw new StemwiseError('output_invalid', `cannot write ${target.file}: it is a folder`);
  const temp = path.join(path.dirname(file), `.${path.basename(file)}.${process.pid}.partial`);
  const stream = fs.createWriteStream(temp);
  try {
    await pump(pieces, stream);
    stream.end();
    await once(stream, 'finish');
    fs.renameSync(temp, file);
  } catch (err) {
    stream.destroy();
    fs.rmSync(temp, { force: true });
    throw err;
  }
}

async function pump(pieces: AsyncIterable<string>, stream: Writable): Promise<void> {
  let buffer = '';
  for await (const piece of pieces) {
    buffer += piece;
    if (buffer.length >= FLUSH_BYTES) {
      await writeTo(stream, buffer);
      buffer = '';
    }
  }
  if (buffer) await writeTo(stream, buffer);
}
