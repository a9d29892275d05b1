// Cells and tables of the exports (`export plots`, `export fits`, `export regions`): one home for how a
// number, a missing value and a text cell are written, so every export reads the same.
//  - numbers: shortest round-trip form (String(x)), so parsing the text gives back the same double;
//  - missing (null, or a non-finite number): an empty CSV cell, `null` in JSON;
//  - CSV: RFC 4180 quoting; TEXT cells that a spreadsheet would run as a formula (first character
//    = + - @, tab, carriage return or another control character) get a leading apostrophe
//    (the OWASP advice against CSV injection). Number cells are never touched: -1.5 stays -1.5.
// Lines end with "\n".

export type Cell = string | number | null;
export type Row = Readonly<Record<string, Cell>>;
export type TableFormat = 'csv' | 'json';

/** A number in shortest round-trip form; '' for null or a non-finite value. */
export function formatNumber(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '';
  return Object.is(x, -0) ? '0' : String(x);
}

// A text cell a spreadsheet could evaluate: starts with = + - @ or a control character (U+0000–U+001F, U+007F).
const FORMULA_START = /^[=+\-@\u0000-\u001f\u007f]/;

/** Prefixes an apostrophe to text a spreadsheet would read as a formula. */
export function neutraliseText(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/** One CSV cell: numbers as shortest round-trip text, text neutralised then quoted when needed. */
export function csvCell(value: Cell | undefined): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return formatNumber(value);
  const text = neutraliseText(value);
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** One CSV line (with its "\n") of the given columns of a row. */
export function csvLine(columns: readonly string[], row: Row): string {
  let out = '';
  for (let i = 0; i < columns.length; i++) out += (i ? ',' : '') + csvCell(row[columns[i]]);
  return out + '\n';
}

/** The header line of a CSV table. */
export function csvHeader(columns: readonly string[]): string {
  return columns.map((c) => csvCell(c)).join(',') + '\n';
}

/** A JSON value of a cell: numbers as shortest round-trip, non-finite numbers as null. */
export function jsonCell(value: Cell | undefined): string {
  if (value === null || value === undefined) return 'null';
  if (typeof value === 'number') return Number.isFinite(value) ? formatNumber(value) : 'null';
  return JSON.stringify(value);
}

/** A JSON object of the given columns of a row, keys in column order. */
export function jsonObject(columns: readonly string[], row: Row): string {
  let out = '{';
  for (let i = 0; i < columns.length; i++) out += (i ? ',' : '') + JSON.stringify(columns[i]) + ':' + jsonCell(row[columns[i]]);
  return out + '}';
}

/**
 * The text of a table, piece by piece: CSV (header, then a line per row) or JSON (an array of objects,
 * one per line). Rows are pulled as they are written, so a long export never sits in memory.
 */
export async function* encodeTable(format: TableFormat, columns: readonly string[], rows: AsyncIterable<Row> | Iterable<Row>): AsyncGenerator<string> {
  if (format === 'csv') {
    yield csvHeader(columns);
    for await (const row of rows) yield csvLine(columns, row);
    return;
  }
  let first = true;
  yield '[';
  for await (const row of rows) {
    yield (first ? '\n' : ',\n') + jsonObject(columns, row);
    first = false;
  }
  yield first ? ']\n' : '\n]\n';
}

/** A GeoJSON Feature (RFC 7946) at a point: coordinates [longitude, latitude], the row as properties. */
export function geoJsonFeature(columns: readonly string[], row: Row, longitude: number, latitude: number): string {
  return `{"type":"Feature","geometry":{"type":"Point","coordinates":[${jsonCell(longitude)},${jsonCell(latitude)}]},"properties":${jsonObject(columns, row)}}`;
}

/** A GeoJSON FeatureCollection (RFC 7946), piece by piece; points are WGS 84 longitude/latitude. */
export async function* encodeFeatureCollection(
  columns: readonly string[],
  rows: AsyncIterable<{ row: Row; longitude: number; latitude: number }> | Iterable<{ row: Row; longitude: number; latitude: number }>,
): AsyncGenerator<string> {
  let first = true;
  yield '{"type":"FeatureCollection","features":[';
  for await (const f of rows) {
    yield (first ? '\n' : ',\n') + geoJsonFeature(columns, f.row, f.longitude, f.latitude);
    first = false;
  }
  yield first ? ']}\n' : '\n]}\n';
}
