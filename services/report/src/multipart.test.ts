import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { multipartBoundary, MultipartError, readMultipart } from './multipart';

// Bodies are encoded by Node's own FormData/Request (undici), an independent multipart writer, then
// read back in chunks of awkward sizes so that boundaries straddle chunk edges.

async function encode(form: FormData): Promise<{ body: Buffer; contentType: string }> {
  const req = new Request('http://localhost/', { method: 'POST', body: form });
  return { body: Buffer.from(await req.arrayBuffer()), contentType: req.headers.get('content-type') as string };
}

async function* chunks(body: Buffer, size: number): AsyncGenerator<Buffer> {
  for (let i = 0; i < body.length; i += size) yield body.subarray(i, i + size);
}

const limits = { maxBytes: 1e6, fileFields: ['plots', 'trees'], textFields: ['replace'] };
const tmp = () => fs.mkdtempSync(path.join(os.tmpdir(), 'mp-'));

describe('readMultipart', () => {
  const plots = 'plot_id,region\nA-1,Northvale\n';
  // binary content that contains CR, LF and dashes, as a gzip file could
  const trees = Buffer.from([0x1f, 0x8b, 0x0d, 0x0a, 0x2d, 0x2d, 0x00, 0xff, ...Buffer.from('\r\n--not-the-boundary\r\n'), 0x0d]);

  for (const size of [1, 3, 7, 64, 1e6]) {
    it(`reads files and fields in chunks of ${size} bytes`, async () => {
      const form = new FormData();
      form.append('plots', new Blob([plots]), 'plots.csv');
      form.append('replace', 'true');
      form.append('trees', new Blob([trees]), 'trees.csv.gz');
      const { body, contentType } = await encode(form);
      const dir = tmp();
      const out = await readMultipart(chunks(body, size), multipartBoundary(contentType)!, dir, limits);
      expect(out.fields).toEqual({ replace: 'true' });
      expect(out.files.map((f) => [f.field, f.filename, f.bytes])).toEqual([
        ['plots', 'plots.csv', Buffer.byteLength(plots)],
        ['trees', 'trees.csv.gz', trees.length],
      ]);
      expect(fs.readFileSync(out.files[0].path, 'utf8')).toBe(plots);
      expect(fs.readFileSync(out.files[1].path).equals(trees)).toBe(true);
      fs.rmSync(dir, { recursive: true });
    });
  }

  it('refuses unknown parts, repeated parts, oversized and truncated bodies', async () => {
    const one = async (build: (f: FormData) => void, lim = limits, cut = 0) => {
      const form = new FormData();
      build(form);
      const { body, contentType } = await encode(form);
      return readMultipart(chunks(body.subarray(0, body.length - cut), 5), multipartBoundary(contentType)!, tmp(), lim);
    };
    await expect(one((f) => f.append('photos', new Blob(['x']), 'a.jpg'))).rejects.toThrow(/unexpected file part photos/);
    await expect(one((f) => f.append('colour', 'red'))).rejects.toThrow(/unexpected field colour/);
    await expect(one((f) => (f.append('plots', new Blob(['a']), 'a.csv'), f.append('plots', new Blob(['b']), 'b.csv')))).rejects.toThrow(/given twice/);
    await expect(one((f) => f.append('plots', new Blob(['x'.repeat(5000)]), 'p.csv'), { ...limits, maxBytes: 1000 })).rejects.toMatchObject({ status: 413 });
    await expect(one((f) => f.append('plots', new Blob(['abc']), 'p.csv'), limits, 10)).rejects.toThrow(MultipartError);
  });

  it('finds the boundary in the content type, quoted or not', () => {
    expect(multipartBoundary('multipart/form-data; boundary=----abc123')).toBe('----abc123');
    expect(multipartBoundary('multipart/form-data; charset=utf-8; boundary="a b:c"')).toBe('a b:c');
    expect(multipartBoundary('application/json')).toBeNull();
    expect(multipartBoundary('multipart/form-data')).toBeNull();
  });
});
