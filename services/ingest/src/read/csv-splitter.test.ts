import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { CsvSplitter, type CsvEvent, type CsvRecord } from './csv-splitter';
import { FileProblem } from './file-problem';
import { createRng } from '@stemwise/core/science';

function split(text: string, chunkSize = text.length || 1, delimiter = ','): CsvEvent[] {
  const s = new CsvSplitter(delimiter, 1000);
  const out: CsvEvent[] = [];
  for (let i = 0; i < text.length; i += chunkSize) s.push(text.slice(i, i + chunkSize), out);
  s.end(out);
  return out;
}
const records = (events: CsvEvent[]) => events.filter((e): e is CsvRecord => 'fields' in e);

// The seeded generator of @stemwise/core, so the differential test is reproducible.
const rng = (seed: number) => createRng(seed).next;

describe('CsvSplitter', () => {
  it('splits exactly like csv-parse on well-formed CSV with quotes, escaped quotes, delimiters and line breaks in values, in any chunking', () => {
    const r = rng(42);
    const alphabet = ['a', 'b', 'Z', '1', ' ', '.', ',', '"', '\n', 'é', '\r\n'];
    for (let round = 0; round < 200; round++) {
      const rows: string[][] = [];
      const width = 1 + Math.floor(r() * 5);
      for (let k = 0; k < 1 + Math.floor(r() * 6); k++) {
        rows.push(Array.from({ length: width }, () => Array.from({ length: Math.floor(r() * 6) }, () => alphabet[Math.floor(r() * alphabet.length)]).join('')));
      }
      const eol = r() < 0.5 ? '\n' : '\r\n';
      const text = rows
        .map((row) => row.map((v) => (/[",\n\r]/.test(v) || v === '' || r() < 0.2 ? `"${v.replace(/"/g, '""')}"` : v)).join(','))
        .join(eol) + (r() < 0.5 ? eol : '');
      const expected = parse(text, { relax_column_count: true, skip_empty_lines: true, record_delimiter: ['\r\n', '\n'] }) as string[][];
      const chunk = 1 + Math.floor(r() * 20);
      expect(records(split(text, chunk)).map((x) => x.fields), `round ${round}: ${JSON.stringify(text)}`).toEqual(expected);
    }
  });

  it('numbers records by the physical line they start on and counts the lines a quoted line break spans', () => {
    const events = split('h1,h2\n\n1,"a\nb"\n2,x\r\n', 3);
    expect(records(events).map((e) => [e.line, e.lines])).toEqual([
      [1, 1],
      [3, 2],
      [5, 1],
    ]);
  });

  it('reports a malformed quote on its own line and reads the next line normally', () => {
    const events = split('a,b\n1,"x"y\n2,ab"c\n3,"unclosed\n4,ok\n', 4);
    expect(events).toEqual([
      { fields: ['a', 'b'], line: 1, lines: 1 },
      { problem: 'text follows the closing quote of value 2', line: 2 },
      { problem: 'value 2 has a quote inside an unquoted value', line: 3 },
      { problem: 'a quoted value is not closed before the end of the file', line: 4 },
      { fields: ['4', 'ok'], line: 5, lines: 1 },
    ]);
  });

  it('stops with the line number at a line longer than the limit', () => {
    try {
      split(`a,b\n1,2\n${'x'.repeat(1500)}\n`, 100);
      expect.unreachable();
    } catch (err) {
      expect(err).toBeInstanceOf(FileProblem);
      expect((err as FileProblem).rule.code).toBe('structure_line_too_long');
      expect((err as FileProblem).line).toBe(3);
    }
  });

  it('splits on semicolons when told to and skips blank lines', () => {
    expect(records(split('a;b\n  \n1,5;2\n', 2, ';')).map((e) => e.fields)).toEqual([
      ['a', 'b'],
      ['1,5', '2'],
    ]);
  });
});
