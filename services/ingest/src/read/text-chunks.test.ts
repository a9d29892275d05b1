import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { FileProblem } from './file-problem';
import { firstInvalidUtf8, textChunks } from './text-chunks';

async function read(bytes: Buffer, gzip = false): Promise<string> {
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'tc-')), 'f');
  fs.writeFileSync(file, bytes);
  let text = '';
  for await (const t of textChunks(file, gzip, () => {})) text += t;
  return text;
}

describe('textChunks', () => {
  it('drops a byte order mark and decodes UTF-8, also gzipped', async () => {
    expect(await read(Buffer.from('\ufeffa,é\n', 'utf8'))).toBe('a,é\n');
    expect(await read(gzipSync(Buffer.from('a,ö\n', 'utf8')), true)).toBe('a,ö\n');
  });
  it('names Latin-1 with its line', async () => {
    await expect(read(Buffer.from('a\nb\nc\u00e9\n', 'latin1'))).rejects.toSatisfy((e: FileProblem) => e.rule.code === 'structure_encoding' && e.line === 3 && /Latin-1/.test(e.message));
  });
  it('finds the first byte that breaks UTF-8', () => {
    expect(firstInvalidUtf8(Buffer.from('aé', 'utf8'))).toBe(-1);
    expect(firstInvalidUtf8(Buffer.from([0x61, 0xe9, 0x62]))).toBe(1);
    expect(firstInvalidUtf8(Buffer.from([0xc3]))).toBe(-1); // cut at the end: undecided
    expect(firstInvalidUtf8(Buffer.from([0xc0, 0x80]))).toBe(0); // overlong
  });
});
