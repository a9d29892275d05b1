import { describe, expect, it } from 'vitest';
import { IssueLog } from '../issues';
import { PLOT_COLUMNS, TREE_COLUMNS } from './columns';
import { compileFieldCheck, INVALID, isRealDate } from './field-checks';

const check = (name: string, options: { decimalComma?: boolean } = {}) => {
  const log = new IssueLog();
  const column = [...PLOT_COLUMNS, ...TREE_COLUMNS].find((c) => c.name === name)!;
  const fn = compileFieldCheck(column, { file: 'x.csv', log, decimalComma: options.decimalComma ?? false, forestTypes: ['wet', 'dry'], today: '2025-06-30' });
  return { fn: (raw: string) => fn(raw, 2), log };
};

describe('compiled field checks (bounds of inventory format version 1)', () => {
  it('accept the bounds the format allows and refuse those it excludes', () => {
    const dbh = check('dbh_cm');
    expect(dbh.fn('500')).toBe(500);
    expect(dbh.fn(' 12.5 ')).toBe(12.5);
    expect(dbh.fn('1e1')).toBe(10);
    expect(dbh.fn('0')).toBe(INVALID);
    expect(dbh.fn('500.01')).toBe(INVALID);
    expect(dbh.fn('0x10')).toBe(INVALID);
    expect(dbh.fn('Infinity')).toBe(INVALID);
    expect(dbh.log.count('field_out_of_range')).toBe(2);
    expect(dbh.log.count('field_not_number')).toBe(2);
    const h = check('height_m');
    expect(h.fn('1.3')).toBe(INVALID);
    expect(h.fn('1.31')).toBe(1.31);
    expect(h.fn('')).toBeNull();
  });

  it('read a decimal comma only when told to', () => {
    expect(check('dbh_cm', { decimalComma: true }).fn('12,5')).toBe(12.5);
    const plain = check('dbh_cm');
    expect(plain.fn('12,5')).toBe(INVALID);
    expect(plain.log.rows()[0].message).toMatch(/--decimal-comma/);
  });

  it('fill in the defaults of optional columns', () => {
    expect(check('dbh_min_cm').fn('')).toBe(10);
    expect(check('subplot_area_ha').fn('')).toBe(0);
    expect(check('fire_damage').fn('')).toBe(0);
    expect(check('in_subplot').fn('')).toBe('0');
  });

  it('check dates for form, calendar, future and the year 1800', () => {
    const d = check('survey_date');
    expect(d.fn('2024-02-29')).toBe('2024-02-29');
    expect(d.fn('2023-02-29')).toBe(INVALID);
    expect(d.fn('2025-07-01')).toBe(INVALID);
    expect(d.fn('1799-12-31')).toBe(INVALID);
    expect(d.fn('2024-2-3')).toBe(INVALID);
    expect(d.log.rows().map((r) => r.rule)).toEqual(['field_bad_date', 'field_date_in_future', 'field_date_too_early', 'field_bad_date']);
  });

  it('knows leap years (Gregorian rule: 1900 is not one, 2000 is)', () => {
    expect([isRealDate(1900, 2, 29), isRealDate(2000, 2, 29), isRealDate(2024, 2, 29), isRealDate(2023, 4, 31)]).toEqual([false, true, true, false]);
  });

  it('check keys, forest types and allowed words', () => {
    expect(check('plot_id').fn('A-1_b.2')).toBe('A-1_b.2');
    expect(check('plot_id').fn('A 1')).toBe(INVALID);
    expect(check('forest_type').fn('moist')).toBe(INVALID);
    expect(check('status').fn('Live')).toBe(INVALID);
    expect(check('logging_class').fn('2.0')).toBe(INVALID);
    expect(check('logging_class').fn('3')).toBe(3);
  });
});
