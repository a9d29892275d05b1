import type { IssueLog } from '../issues';
import type { ColumnSpec } from '../rules/columns';
import { compileFieldCheck, INVALID, type FieldCheckOptions, type Parsed } from '../rules/field-checks';
import { FIELD, fieldMessages, STRUCTURE, structureMessages } from '@stemwise/core';
import { CsvSplitter, type CsvEvent } from './csv-splitter';
import { FileProblem } from './file-problem';
import { textChunks } from './text-chunks';

export interface TableSource {
  /** Name for people and issues, e.g. trees.csv. */
  file: string;
  path: string;
  gzip: boolean;
}

export interface TableOptions extends Omit<FieldCheckOptions, 'file'> {
  columns: readonly ColumnSpec[];
  delimiter: ',' | ';';
  /** A header without data rows is an error (plots, trees) or simply nothing to do (strata, species). */
  requireRows: boolean;
  onBytes(n: number): void;
  /** Longest line accepted (characters); longer stops the file. */
  maxLineChars?: number;
  /** Largest decompressed size of a gzip file (bytes); larger stops the file. Default: no cap. */
  maxUnpackedBytes?: number;
}

export interface TableRow {
  /** Parsed values in the order of the column table (fallbacks filled in); INVALID where a check failed. */
  values: Array<Parsed | typeof INVALID>;
  line: number;
  /** No error on this row so far. */
  ok: boolean;
}

export interface TableStats {
  rows: number;
  /** Rows with at least one error of the structure or field rules. */
  badRows: number;
  /** The file could not be read to its end, or its header is unusable: nothing of it may load. */
  fatal: boolean;
}

/**
 * Reads a stored table: header checks, then every data row through the structure and field rules,
 * yielded in batches (one per chunk of text read). Problems that stop the file are logged and end it.
 */
export async function* readTable(src: TableSource, o: TableOptions, stats: TableStats): AsyncGenerator<TableRow[]> {
  const { log, file } = { log: o.log, file: src.file };
  const splitter = new CsvSplitter(o.delimiter, o.maxLineChars ?? 1 << 20);
  const checks = o.columns.map((c) => compileFieldCheck(c, { ...o, file }));
  let positions: number[] | null = null;
  let names: string[] = [];
  let width = 0;
  let sawText = false;
  // PostgreSQL text cannot hold U+0000. Whole chunks are searched for it (one indexOf per 64 KB);
  // only once one held it are the cells of each row searched, to name the line and column.
  let nulSeen = false;
  const events: CsvEvent[] = [];

  const header = (fields: string[], line: number): boolean => {
    names = fields.map((f) => f.trim().toLowerCase());
    if (nulSeen && names.some((n) => n.includes('\0'))) {
      log.add(FIELD.nulCharacter, file, line, null, null, fieldMessages.nulCharacter(null));
      return false;
    }
    if (o.delimiter === ',' && names.length === 1 && names[0].includes(';')) {
      log.add(STRUCTURE.semicolonDelimited, file, line, null, null, structureMessages.semicolon());
      return false;
    }
    let usable = true;
    const seen = new Set<string>();
    for (const n of names) {
      if (seen.has(n) && n !== '') {
        log.add(STRUCTURE.duplicateColumn, file, line, n, n, structureMessages.duplicateColumn(n));
        usable = false;
      }
      seen.add(n);
    }
    const known = new Set(o.columns.map((c) => c.name));
    for (const n of names) if (!known.has(n)) log.add(STRUCTURE.unknownColumn, file, line, n, n, structureMessages.unknownColumn(n));
    positions = o.columns.map((c) => names.indexOf(c.name));
    o.columns.forEach((c, i) => {
      if (positions![i] < 0 && c.required) {
        log.add(STRUCTURE.missingColumn, file, line, c.name, null, structureMessages.missingColumn(c.name));
        usable = false;
      }
    });
    width = names.length;
    return usable;
  };

  const rowsOf = (): TableRow[] | null => {
    const out: TableRow[] = [];
    for (const e of events) {
      if (!('fields' in e)) {
        if (positions === null) {
          log.add(STRUCTURE.badQuotes, file, e.line, null, null, structureMessages.badQuotes(e.problem));
          return null;
        }
        stats.rows++;
        stats.badRows++;
        log.add(STRUCTURE.badQuotes, file, e.line, null, null, structureMessages.badQuotes(e.problem));
        continue;
      }
      if (positions === null) {
        if (!header(e.fields, e.line)) return null;
        continue;
      }
      stats.rows++;
      const f = e.fields;
      if (f.length !== width) {
        stats.badRows++;
        log.add(STRUCTURE.raggedRow, file, e.line, null, null, structureMessages.raggedRow(f.length, width));
        continue;
      }
      let ok = true;
      if (e.lines > 1) {
        ok = false;
        log.add(STRUCTURE.quotedNewline, file, e.line, null, null, structureMessages.quotedNewline(e.lines));
      }
      let withNul: Set<number> | null = null;
      if (nulSeen) {
        for (let j = 0; j < f.length; j++) {
          if (!f[j].includes('\0')) continue;
          (withNul ??= new Set()).add(j);
          log.add(FIELD.nulCharacter, file, e.line, names[j] || null, f[j], fieldMessages.nulCharacter(names[j] || `value ${j + 1}`));
          ok = false;
        }
      }
      const values: Array<Parsed | typeof INVALID> = new Array(checks.length);
      for (let i = 0; i < checks.length; i++) {
        const p = positions[i];
        const v = withNul?.has(p) ? INVALID : checks[i](p < 0 ? '' : f[p], e.line);
        if (v === INVALID) ok = false;
        values[i] = v;
      }
      if (!ok) stats.badRows++;
      out.push({ values, line: e.line, ok });
    }
    events.length = 0;
    return out;
  };

  try {
    for await (const text of textChunks(src.path, src.gzip, o.onBytes, o.maxUnpackedBytes)) {
      if (!sawText && text.trim() !== '') sawText = true;
      if (!nulSeen && text.includes('\0')) nulSeen = true;
      splitter.push(text, events);
      const rows = rowsOf();
      if (rows === null) {
        stats.fatal = true;
        return;
      }
      if (rows.length) yield rows;
    }
    splitter.end(events);
    const rows = rowsOf();
    if (rows === null) {
      stats.fatal = true;
      return;
    }
    if (rows.length) yield rows;
  } catch (err) {
    if (!(err instanceof FileProblem)) throw err;
    log.add(err.rule, file, err.line, null, null, err.message);
    stats.fatal = true;
    return;
  }
  if (!sawText) {
    log.add(STRUCTURE.emptyFile, file, null, null, null, structureMessages.emptyFile(file));
    stats.fatal = true;
  } else if (stats.rows === 0 && o.requireRows) {
    log.add(STRUCTURE.noRows, file, 2, null, null, structureMessages.noRows(file));
    stats.fatal = true;
  }
}
