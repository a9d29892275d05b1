import { defineRule } from './rule';

// Structure: can the file be read as UTF-8 CSV with the expected columns at all?

export const STRUCTURE = {
  fileMissing: defineRule('structure', 'structure_file_missing', 'error', 'A batch lacks plots.csv or trees.csv.'),
  emptyFile: defineRule('structure', 'structure_empty_file', 'error', 'A file has no content at all (not even a header).'),
  noRows: defineRule('structure', 'structure_no_rows', 'error', 'plots.csv or trees.csv has a header row but no data rows.'),
  gzipCorrupt: defineRule('structure', 'structure_gzip_corrupt', 'error', 'A .gz file is damaged or cut short and cannot be decompressed.'),
  unpackedTooLarge: defineRule('structure', 'structure_unpacked_too_large', 'error', 'A .gz file expands to more than the configured cap (STEMWISE_MAX_UNPACKED_MB); reading stops there.'),
  encoding: defineRule('structure', 'structure_encoding', 'error', 'A file is not UTF-8 (Latin-1/Windows-1252 and UTF-16 are recognised and named).'),
  semicolonDelimited: defineRule('structure', 'structure_semicolon_delimited', 'error', 'Values are separated by semicolons but the upload did not say so (--delimiter \';\').'),
  lineTooLong: defineRule('structure', 'structure_line_too_long', 'error', 'A line is longer than 1 MB (usually a missing closing quote or a binary file); reading stops there.'),
  missingColumn: defineRule('structure', 'structure_missing_column', 'error', 'A required column is absent from the header.'),
  duplicateColumn: defineRule('structure', 'structure_duplicate_column', 'error', 'A column name appears twice in the header.'),
  unknownColumn: defineRule('structure', 'structure_unknown_column', 'warning', 'A header names a column the format does not know; it is kept in the file but ignored.'),
  raggedRow: defineRule('structure', 'structure_ragged_row', 'error', 'A row has more or fewer values than the header has columns.'),
  quotedNewline: defineRule('structure', 'structure_quoted_newline', 'error', 'A quoted value runs over a line break; no value of the format may contain one.'),
  badQuotes: defineRule('structure', 'structure_bad_quotes', 'error', 'A row has a quote that is not closed, or text right after a closing quote.'),
} as const;

export const structureMessages = {
  fileMissing: (file: string) => `${file} is missing; a batch needs plots.csv and trees.csv`,
  emptyFile: (file: string) => `${file} is empty; it needs a header row and at least one data row`,
  noRows: (file: string) => `${file} has a header but no data rows`,
  gzipCorrupt: (file: string, detail: string) => `${file} is not a readable gzip file (${detail}); compress it again or upload it uncompressed`,
  unpackedTooLarge: (file: string, maxBytes: number) =>
    `${file} expands to more than ${Math.round(maxBytes / 1024 ** 2)} MiB when decompressed (the cap set by STEMWISE_MAX_UNPACKED_MB); split it into smaller batches`,
  latin1: (byte: number) =>
    `byte 0x${byte.toString(16).toUpperCase().padStart(2, '0')} is not valid UTF-8; the file looks like Latin-1 (ISO-8859-1) or Windows-1252 — save it as UTF-8 and upload again`,
  utf16: () => 'the file is UTF-16 text; save it as UTF-8 (with or without BOM) and upload again',
  semicolon: () =>
    "values are separated by ';' instead of ','; upload again with --delimiter ';' (and --decimal-comma if numbers are written like 12,5)",
  lineTooLong: (maxBytes: number) => `this line is longer than ${Math.round(maxBytes / 1024)} KB (often an unclosed quote); reading of the file stopped here`,
  missingColumn: (column: string) => `the header has no column ${column}, which is required`,
  duplicateColumn: (column: string) => `the header names the column ${column} more than once`,
  unknownColumn: (column: string) => `the column ${JSON.stringify(column)} is not part of the format; it is ignored (check its spelling)`,
  raggedRow: (got: number, want: number) => `this row has ${got} values but the header has ${want} columns`,
  quotedNewline: (lines: number) => `a quoted value continues over ${lines} lines; values must stay on one line`,
  badQuotes: (detail: string) => `malformed quotes: ${detail}`,
};
