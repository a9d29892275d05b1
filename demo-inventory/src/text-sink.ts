// A text file written as a stream, optionally gzip-compressed, with backpressure: `write` waits
// while the stream's buffer is full, so memory stays flat however large the file grows. The file
// is written under a temporary name and renamed when complete, so a failed run leaves no
// half-written file under the final name.

import { once } from 'node:events';
import { createWriteStream } from 'node:fs';
import { rename, rm } from 'node:fs/promises';
import type { Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { createGzip, type ZlibOptions } from 'node:zlib';

const FLUSH_AT_CHARS = 1 << 18;
// Deep stream buffers let generation run on while zlib (on the libuv thread pool) and the disk catch up.
const STREAM_BUFFER_BYTES = 1 << 22;

export class TextSink {
  private readonly target: Writable;
  private readonly done: Promise<void>;
  private readonly partialPath: string;
  private pending: string[] = [];
  private pendingChars = 0;
  private closed = false;

  /** Opens `path` for writing (gzip-compressed when `gzip`). */
  constructor(readonly path: string, gzip: boolean) {
    this.partialPath = `${path}.partial`;
    const file = createWriteStream(this.partialPath, { highWaterMark: STREAM_BUFFER_BYTES });
    if (gzip) {
      // zlib streams pass stream options on to their Transform base; @types/node's ZlibOptions omits them.
      const zip = createGzip({ level: 6, highWaterMark: STREAM_BUFFER_BYTES } as ZlibOptions);
      this.target = zip;
      this.done = pipeline(zip, file);
    } else {
      this.target = file;
      this.done = once(file, 'close').then(() => undefined);
    }
    // Keep a failure for `close` or the next `write` to report, not as an unhandled rejection.
    this.done.catch(() => undefined);
  }

  /** Adds one line (a line break is appended); flushes to the stream in large chunks. */
  async line(text: string): Promise<void> {
    this.pending.push(text);
    this.pendingChars += text.length + 1;
    if (this.pendingChars >= FLUSH_AT_CHARS) await this.flush();
  }

  /** Adds several lines. */
  async lines(texts: readonly string[]): Promise<void> {
    for (const t of texts) {
      this.pending.push(t);
      this.pendingChars += t.length + 1;
    }
    if (this.pendingChars >= FLUSH_AT_CHARS) await this.flush();
  }

  private async flush(): Promise<void> {
    if (this.pending.length === 0) return;
    if (this.closed) throw new Error(`TextSink: ${this.path} is already closed`);
    const chunk = this.pending.join('\n') + '\n';
    this.pending = [];
    this.pendingChars = 0;
    if (!this.target.write(chunk)) await Promise.race([once(this.target, 'drain'), this.done]);
  }

  /** Writes what is left, ends the stream, waits until the file is on disk and gives it its name. */
  async close(): Promise<void> {
    await this.flush();
    this.closed = true;
    this.target.end();
    await this.done;
    await rename(this.partialPath, this.path);
  }

  /** Abandons the file: ends the stream and removes the partial file. */
  async discard(): Promise<void> {
    this.closed = true;
    this.target.destroy();
    await this.done.catch(() => undefined);
    await rm(this.partialPath, { force: true });
  }
}
