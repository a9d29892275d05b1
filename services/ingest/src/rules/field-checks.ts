import type { IssueLog } from '../issues';
import type { ColumnSpec, NumberColumn } from './columns';
import { FIELD, shown } from '@stemwise/core';

/** What a check returns for a bad value (the issue is already logged). */
export const INVALID: unique symbol = Symbol('invalid');
export type Parsed = string | number | null;

/** Checks one cell; `raw` is undefined when the row is short (reported as a ragged row already). */
export type FieldCheck = (raw: string | undefined, line: number) => Parsed | typeof INVALID;

export interface FieldCheckOptions {
  file: string;
  log: IssueLog;
  decimalComma: boolean;
  /** Known forest type codes (for columns named forest_type). */
  forestTypes: readonly string[];
  /** Today as YYYY-MM-DD; dates after it are in the future. */
  today: string;
}

/** The `region` of the national rows of `export regions`; refused as a region name (any case). */
export const RESERVED_REGION = 'national';

const NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d{1,3})?$/;
const INTEGER = /^[+-]?\d+$/;
const DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

function trimmed(raw: string): string {
  const n = raw.length;
  if (n === 0) return raw;
  const a = raw.charCodeAt(0);
  const b = raw.charCodeAt(n - 1);
  return a === 32 || a === 9 || b === 32 || b === 9 ? raw.trim() : raw;
}

function rangeText(c: NumberColumn): string {
  const u = c.unit === '°' ? '°' : ` ${c.unit}`;
  const lo = c.min === undefined ? '' : c.minOpen ? `above ${c.min}${u}` : `at least ${c.min}${u}`;
  const hi = c.max === undefined ? '' : c.maxOpen ? `below ${c.max}${u}` : `at most ${c.max}${u}`;
  return lo && hi ? `${lo} and ${hi}` : lo || hi;
}

/** Is a calendar date real (2023-02-29 is not)? */
export function isRealDate(y: number, m: number, d: number): boolean {
  if (m < 1 || m > 12 || d < 1) return false;
  const days = [31, y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0) ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][m - 1];
  return d <= days;
}

/** Compiles one column's rules into a check that logs its issue and returns INVALID, or the parsed value. */
export function compileFieldCheck(c: ColumnSpec, o: FieldCheckOptions): FieldCheck {
  const { file, log } = o;
  const missing = (line: number): typeof INVALID | Parsed => {
    if (!c.required) return 'fallback' in c && c.fallback !== undefined ? c.fallback : null;
    log.add(FIELD.required, file, line, c.name, '', `${c.name} is empty; this column must be filled in on every row`);
    return INVALID;
  };
  switch (c.kind) {
    case 'text': {
      const isForestType = c.name === 'forest_type';
      const isRegion = c.name === 'region';
      const known = new Set(o.forestTypes);
      return (raw, line) => {
        if (raw === undefined) return INVALID;
        const v = trimmed(raw);
        if (v === '') return missing(line);
        if (v.length > c.maxLength) {
          log.add(FIELD.tooLong, file, line, c.name, v, `${c.name} has ${v.length} characters; at most ${c.maxLength} are allowed`);
          return INVALID;
        }
        if (c.chars && !c.chars.test(v)) {
          log.add(FIELD.badCharacters, file, line, c.name, v, `${c.name} ${shown(v)} may only contain ${c.charsHint}`);
          return INVALID;
        }
        // The exports name all regions together `national` (docs/exports.md): a real region of that name would be mistaken for them.
        if (isRegion && v.toLowerCase() === RESERVED_REGION) {
          log.add(FIELD.reservedRegion, file, line, c.name, v, `region ${shown(v)} is reserved: exports and reports name all regions together "${RESERVED_REGION}"; give the region another name`);
          return INVALID;
        }
        if (isForestType && !known.has(v)) {
          log.add(FIELD.unknownForestType, file, line, c.name, v, `forest_type ${shown(v)} is not a known forest type (known: ${o.forestTypes.join(', ')})`);
          return INVALID;
        }
        return v;
      };
    }
    case 'number': {
      const range = rangeText(c);
      const hint = o.decimalComma ? '' : "; if numbers are written with a decimal comma, upload with --delimiter ';' --decimal-comma";
      return (raw, line) => {
        if (raw === undefined) return INVALID;
        let v = trimmed(raw);
        if (v === '') return missing(line);
        if (o.decimalComma) v = v.replace(',', '.');
        if (!NUMBER.test(v)) {
          log.add(FIELD.notNumber, file, line, c.name, raw, `${c.name} is ${shown(raw)}, not a number${v.includes(',') ? hint : ''}`);
          return INVALID;
        }
        const n = Number(v);
        if (
          !Number.isFinite(n) ||
          (c.min !== undefined && (c.minOpen ? n <= c.min : n < c.min)) ||
          (c.max !== undefined && (c.maxOpen ? n >= c.max : n > c.max))
        ) {
          log.add(FIELD.outOfRange, file, line, c.name, raw, `${c.name} is ${v}; ${c.what} must be ${range}`);
          return INVALID;
        }
        return n;
      };
    }
    case 'integer':
      return (raw, line) => {
        if (raw === undefined) return INVALID;
        const v = trimmed(raw);
        if (v === '') return missing(line);
        const n = INTEGER.test(v) ? Number(v) : NaN;
        if (!Number.isInteger(n) || n < c.min || n > c.max) {
          log.add(FIELD.notInteger, file, line, c.name, raw, `${c.name} is ${shown(raw)}; ${c.what} must be a whole number from ${c.min} to ${c.max}`);
          return INVALID;
        }
        return n;
      };
    case 'enum': {
      const allowed = new Set(c.values);
      return (raw, line) => {
        if (raw === undefined) return INVALID;
        const v = trimmed(raw);
        if (v === '') return missing(line);
        if (!allowed.has(v)) {
          log.add(FIELD.notAllowed, file, line, c.name, raw, `${c.name} is ${shown(raw)}; use one of: ${c.values.join(', ')}`);
          return INVALID;
        }
        return v;
      };
    }
    case 'date':
      return (raw, line) => {
        if (raw === undefined) return INVALID;
        const v = trimmed(raw);
        if (v === '') return missing(line);
        const m = DATE.exec(v);
        if (!m || !isRealDate(Number(m[1]), Number(m[2]), Number(m[3]))) {
          log.add(FIELD.badDate, file, line, c.name, raw, `${c.name} is ${shown(raw)}; write a real date as YYYY-MM-DD, e.g. 2024-03-15`);
          return INVALID;
        }
        if (v > o.today) {
          log.add(FIELD.dateInFuture, file, line, c.name, v, `${c.name} ${v} is in the future`);
          return INVALID;
        }
        if (v < '1800-01-01') {
          log.add(FIELD.dateTooEarly, file, line, c.name, v, `${c.name} ${v} is before 1800`);
          return INVALID;
        }
        return v;
      };
  }
}
