import { describe, expect, it } from 'vitest';
import { csvCell, csvLine, encodeFeatureCollection, encodeTable, formatNumber, jsonCell, neutraliseText } from './table-format';

async function text(pieces: AsyncIterable<string>): Promise<string> {
  let out = '';
  for await (const p of pieces) out += p;
  return out;
}

describe('export cell format', () => {
  it('writes numbers in shortest round-trip form (ECMAScript Number::toString)', () => {
    expect(formatNumber(0.1 + 0.2)).toBe('0.30000000000000004');
    expect(formatNumber(1e21)).toBe('1e+21');
    expect(formatNumber(-1.5)).toBe('-1.5');
    expect(formatNumber(-0)).toBe('0');
    expect(formatNumber(NaN)).toBe('');
    expect(formatNumber(null)).toBe('');
    // round trip on awkward doubles
    for (const x of [Math.PI, 1 / 3, 5e-324, Number.MAX_VALUE, 123456789.123456789, -2.220446049250313e-16]) {
      expect(Number(formatNumber(x))).toBe(x);
    }
  });

  it('neutralises text a spreadsheet would run as a formula, and never a number', () => {
    expect(neutraliseText('=SUM(A1:A9)')).toBe("'=SUM(A1:A9)");
    expect(neutraliseText('+1')).toBe("'+1");
    expect(neutraliseText('-North')).toBe("'-North");
    expect(neutraliseText('@cmd')).toBe("'@cmd");
    expect(neutraliseText('\tx')).toBe("'\tx");
    expect(neutraliseText('\u0001x')).toBe("'\u0001x");
    expect(neutraliseText('North-East')).toBe('North-East');
    expect(csvCell(-1.5)).toBe('-1.5');
    expect(csvCell('-1.5')).toBe("'-1.5");
    expect(csvCell(null)).toBe('');
  });

  it('quotes CSV cells as RFC 4180 says', () => {
    expect(csvCell('a,b')).toBe('"a,b"');
    expect(csvCell('say "hi"')).toBe('"say ""hi"""');
    expect(csvCell('two\nlines')).toBe('"two\nlines"');
    expect(csvCell('=HYPERLINK("a","b")')).toBe(`"'=HYPERLINK(""a"",""b"")"`);
    expect(csvCell('=a,b')).toBe(`"'=a,b"`);
    expect(csvLine(['a', 'b', 'c'], { a: 'x', b: null, c: 2 })).toBe('x,,2\n');
  });

  it('writes JSON nulls for missing and non-finite values', () => {
    expect(jsonCell(null)).toBe('null');
    expect(jsonCell(Infinity)).toBe('null');
    expect(jsonCell('=x')).toBe('"=x"'); // JSON is data, not a spreadsheet: text kept as is
    expect(jsonCell(0.1)).toBe('0.1');
  });

  it('encodes tables and empty tables as valid CSV and JSON', async () => {
    const rows = [
      { id: 'A', v: 1.25 },
      { id: 'B', v: null },
    ];
    expect(await text(encodeTable('csv', ['id', 'v'], rows))).toBe('id,v\nA,1.25\nB,\n');
    const json = await text(encodeTable('json', ['id', 'v'], rows));
    expect(JSON.parse(json)).toEqual(rows);
    expect(JSON.parse(await text(encodeTable('json', ['id'], [])))).toEqual([]);
    expect(await text(encodeTable('csv', ['id'], []))).toBe('id\n');
  });

  it('writes GeoJSON points longitude first (RFC 7946 §3.1.1)', async () => {
    const gj = JSON.parse(await text(encodeFeatureCollection(['id'], [{ row: { id: 'A' }, longitude: 21.5, latitude: -3.25 }])));
    expect(gj.type).toBe('FeatureCollection');
    expect(gj.features[0].geometry).toEqual({ type: 'Point', coordinates: [21.5, -3.25] });
    expect(gj.features[0].properties).toEqual({ id: 'A' });
    expect(JSON.parse(await text(encodeFeatureCollection(['id'], [])))).toEqual({ type: 'FeatureCollection', features: [] });
  });
});
