import { STRUCTURE, structureMessages } from '@stemwise/core';
import { FileProblem } from './file-problem';

// An RFC 4180 splitter written for line-exact reporting: every record carries the physical line it
// starts on and how many lines it spans, a malformed quote costs only its own line (the next line is
// read normally), and a line over the limit stops the file with its line number. Lines without a quote
// take a fast path (String.split). Its output equals csv-parse's on well-formed input (see the test).

export interface CsvRecord {
  fields: string[];
  /** Physical line the record starts on (1 = the first line of the file). */
  line: number;
  /** Physical lines the record spans (more than 1 only when a quoted value holds a line break). */
  lines: number;
}

export interface CsvProblem {
  problem: string;
  line: number;
}

export type CsvEvent = CsvRecord | CsvProblem;

const QUOTE = 34;
const CR = 13;
const LF = 10;

function isBlank(s: string): boolean {
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c !== 32 && c !== 9 && c !== CR) return false;
  }
  return true;
}

export class CsvSplitter {
  private carry = '';
  /** Lines fully consumed so far. */
  private line = 0;

  constructor(
    private readonly delimiter: string = ',',
    private readonly maxLineChars: number = 1 << 20,
  ) {
    if (delimiter.length !== 1 || delimiter === '"' || delimiter === '\n') throw new Error(`CsvSplitter: bad delimiter ${JSON.stringify(delimiter)}`);
  }

  /** Adds text; appends every record completed by it to `out`. */
  push(text: string, out: CsvEvent[]): void {
    this.consume(this.carry.length ? this.carry + text : text, false, out);
  }

  /** The end of the input: the last line may lack its line break. */
  end(out: CsvEvent[]): void {
    const rest = this.carry;
    this.carry = '';
    if (rest.length) this.consume(rest.endsWith('\n') ? rest : `${rest}\n`, true, out);
  }

  private tooLong(line: number): never {
    throw new FileProblem(STRUCTURE.lineTooLong, line, structureMessages.lineTooLong(this.maxLineChars));
  }

  private consume(buf: string, final: boolean, out: CsvEvent[]): void {
    const d = this.delimiter;
    let pos = 0;
    let nextQuote = buf.indexOf('"');
    while (pos < buf.length) {
      const nl = buf.indexOf('\n', pos);
      if (nl < 0) break;
      if (nextQuote >= 0 && nextQuote < pos) nextQuote = buf.indexOf('"', pos);
      if (nextQuote < 0 || nextQuote > nl) {
        if (nl - pos > this.maxLineChars) this.tooLong(this.line + 1);
        const end = nl > pos && buf.charCodeAt(nl - 1) === CR ? nl - 1 : nl;
        this.line++;
        if (end > pos) {
          const s = buf.slice(pos, end);
          if (!isBlank(s)) out.push({ fields: s.split(d), line: this.line, lines: 1 });
        }
        pos = nl + 1;
        continue;
      }
      const next = this.quoted(buf, pos, final, out);
      if (next < 0) break; // the record continues in the next chunk
      pos = next;
    }
    this.carry = buf.slice(pos);
    if (this.carry.length > this.maxLineChars) this.tooLong(this.line + 1);
  }

  /** Parses one record containing quotes from `pos`; returns the position after it, or -1 to wait for more text. */
  private quoted(buf: string, pos: number, final: boolean, out: CsvEvent[]): number {
    const d = this.delimiter.charCodeAt(0);
    const start = this.line + 1;
    const fields: string[] = [];
    let i = pos;
    let breaks = 0;
    const fail = (problem: string, at: number): number => {
      // Skip to the end of the physical line where the problem is; the next line is read normally.
      const nl = buf.indexOf('\n', at);
      const stop = nl < 0 ? buf.length : nl + 1;
      for (let k = at; k < stop; k++) if (buf.charCodeAt(k) === LF) breaks++;
      this.line += breaks;
      out.push({ problem, line: start });
      return stop;
    };
    for (;;) {
      if (i - pos > this.maxLineChars) this.tooLong(start);
      if (buf.charCodeAt(i) === QUOTE) {
        let value = '';
        let k = i + 1;
        for (;;) {
          const q = buf.indexOf('"', k);
          if (q < 0 || (q === buf.length - 1 && !final)) {
            if (!final) return buf.length - pos > this.maxLineChars ? this.tooLong(start) : -1;
            return fail('a quoted value is not closed before the end of the file', i);
          }
          for (let j = k; j < q; j++) if (buf.charCodeAt(j) === LF) breaks++;
          if (buf.charCodeAt(q + 1) === QUOTE) {
            value += buf.slice(k, q + 1);
            k = q + 2;
            continue;
          }
          value += buf.slice(k, q);
          i = q + 1;
          break;
        }
        const c = buf.charCodeAt(i);
        if (!final && (i >= buf.length || (c === CR && i + 1 >= buf.length))) return -1;
        if (c === d) {
          fields.push(value);
          i++;
          continue;
        }
        if (c === LF || (c === CR && buf.charCodeAt(i + 1) === LF)) {
          fields.push(value);
          this.line += breaks + 1;
          out.push({ fields, line: start, lines: breaks + 1 });
          return c === LF ? i + 1 : i + 2;
        }
        return fail(`text follows the closing quote of value ${fields.length + 1}`, i);
      }
      // An unquoted value: up to the next delimiter or line break; a quote inside it is malformed.
      let k = i;
      for (;;) {
        if (k >= buf.length) return final ? fail('the record ends without a line break', pos) : -1;
        const c = buf.charCodeAt(k);
        if (c === d || c === LF) break;
        if (c === QUOTE) return fail(`value ${fields.length + 1} has a quote inside an unquoted value`, k);
        k++;
      }
      const end = buf.charCodeAt(k) === LF && k > i && buf.charCodeAt(k - 1) === CR ? k - 1 : k;
      fields.push(buf.slice(i, end));
      if (buf.charCodeAt(k) === d) {
        i = k + 1;
        continue;
      }
      this.line += breaks + 1;
      out.push({ fields, line: start, lines: breaks + 1 });
      return k + 1;
    }
  }
}
