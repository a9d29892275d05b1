import { describe, expect, it } from 'vitest';
import { csvCell } from '@stemwise/platform';

describe('csvCell', () => {
  it('keeps cells a spreadsheet would run as formulas as text (a leading apostrophe)', () => {
    expect(csvCell('=1+1')).toBe("'=1+1");
    expect(csvCell('+41 22')).toBe("'+41 22");
    expect(csvCell('-3')).toBe("'-3");
    expect(csvCell('@SUM(A1)')).toBe("'@SUM(A1)");
    expect(csvCell('\tx')).toBe("'\tx");
    expect(csvCell('=HYPERLINK("a","b")')).toBe(`"'=HYPERLINK(""a"",""b"")"`);
  });
  it('quotes commas, quotes and line breaks, and leaves plain values alone', () => {
    expect(csvCell('a,b')).toBe('"a,b"');
    expect(csvCell('line\nbreak')).toBe('"line\nbreak"');
    expect(csvCell(12)).toBe('12');
    expect(csvCell(null)).toBe('');
    expect(csvCell('Ossara lumen')).toBe('Ossara lumen');
  });
});
