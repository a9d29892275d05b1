import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { COLUMNS_OF, tableReaders, TREE_COLUMNS, type Cell } from './columns';
import { INVALID } from './field-checks';

describe('reading cells by column name', () => {
  it('reads each column of every table from its own place in the row', () => {
    for (const columns of Object.values(COLUMNS_OF)) {
      const readers = tableReaders(columns);
      const row: Cell[] = columns.map((c) => `cell of ${c.name}`);
      const cell: Record<string, (cells: readonly Cell[]) => Cell> = readers.cell;
      const value: Record<string, (cells: readonly Cell[]) => Cell> = readers.value;
      expect(Object.keys(cell).sort()).toEqual(columns.map((c) => c.name).sort());
      for (const c of columns) {
        expect(cell[c.name](row)).toBe(`cell of ${c.name}`);
        expect(value[c.name](row)).toBe(`cell of ${c.name}`);
      }
    }
  });

  it('hands over a failed check as INVALID', () => {
    const { cell } = tableReaders(TREE_COLUMNS);
    const row: Cell[] = ['P-1', 'T-1', null, INVALID, null, 'live', null, 0, '0'];
    expect(cell.dbh_cm(row)).toBe(INVALID);
    expect(cell.status(row)).toBe('live');
  });
});

describe('docs/upload-format.md', () => {
  const doc = fs.readFileSync(path.resolve(__dirname, '../../../../docs/upload-format.md'), 'utf8');

  it('lists every column of every file, in the column table order, needed exactly when required', () => {
    for (const [kind, columns] of Object.entries(COLUMNS_OF)) {
      const section = doc.split(`\n## ${kind}.csv\n`)[1]?.split('\n## ')[0] ?? '';
      // A row may name several columns (`latitude`, `longitude`); the last cell says whether they are needed.
      const listed = [...section.matchAll(/^\| (`[a-z0-9_]+`(?:, `[a-z0-9_]+`)*) \|.*\| ([^|]+) \|$/gm)].flatMap((m) =>
        [...m[1].matchAll(/`([a-z0-9_]+)`/g)].map((n) => [n[1], m[2].trim() === 'yes']),
      );
      expect(listed, kind).toEqual(columns.map((c) => [c.name, c.required]));
    }
  });
});
