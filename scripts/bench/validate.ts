// Field checks benchmark (a script, never a timed test):
//   npx tsx scripts/bench/validate.ts [--stems 500000]
// The ingest checks each cell with functions compiled from the column tables (rules/columns.ts). The
// other way the format could be checked is a zod schema per row, built here from the same tables with
// the same rules. Both run over the same rows of a generated trees.csv (already split into cells, so
// only the checking is timed); the script prints rows per second for each and checks they agree.
// Then the checks once more with what validateTrees does next for a loadable stem, both ways: reading
// the parsed cells by column name into one reused stem record and encoding its COPY line (the code),
// against reading them by position into a nine-argument call (how it was done before).

import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { parseArgs } from 'node:util';
import { z } from 'zod';
import { generateInventory } from '@stemwise/demo-inventory';
import { compileFieldCheck, copyLine, emptyStem, fillStem, INVALID, IssueLog, TREE_COLUMNS, type Cell, type ColumnSpec } from '@stemwise/ingest';

const NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d{1,3})?$/;
const INTEGER = /^[+-]?\d+$/;

/** One column's rule as a zod schema over the raw cell: trimmed, empty → fallback or null, else typed and bounded. */
function zodColumn(c: ColumnSpec): z.ZodType<unknown, string> {
  let typed: z.ZodType<unknown, string>;
  switch (c.kind) {
    case 'text': {
      let s = z.string().max(c.maxLength);
      if (c.chars) s = s.regex(c.chars);
      typed = s;
      break;
    }
    case 'number': {
      let n = z.number().finite();
      if (c.min !== undefined) n = c.minOpen ? n.gt(c.min) : n.gte(c.min);
      if (c.max !== undefined) n = c.maxOpen ? n.lt(c.max) : n.lte(c.max);
      typed = z.string().regex(NUMBER).transform(Number).pipe(n);
      break;
    }
    case 'integer':
      typed = z.string().regex(INTEGER).transform(Number).pipe(z.number().int().gte(c.min).lte(c.max));
      break;
    case 'enum':
      typed = z.enum(c.values as unknown as [string, ...string[]]);
      break;
    case 'date':
      typed = z.iso.date();
      break;
  }
  const fallback = 'fallback' in c && c.fallback !== undefined ? c.fallback : null;
  const empty = c.required ? z.never() : z.literal('').transform(() => fallback);
  return z.string().trim().pipe(z.union([empty, typed]));
}

function copyText(s: string): string {
  return /[\\\t\n\r]/.test(s) ? s.replace(/\\/g, '\\\\').replace(/\t/g, '\\t').replace(/\n/g, '\\n').replace(/\r/g, '\\r') : s;
}

// The COPY line as built from positional arguments before the stem record (kept here for comparison).
function positionalLine(visitId: number, treeId: string, species: string | null, dbhCm: number, heightM: number | null, status: string, stumpCause: string | null, fireDamage: number, inSubplot: boolean): string {
  return `${visitId}\t${copyText(treeId)}\t${species === null ? '\\N' : copyText(species)}\t${dbhCm}\t${heightM === null ? '\\N' : heightM}\t${status}\t${stumpCause ?? '\\N'}\t${fireDamage}\t${inSubplot ? 't' : 'f'}\n`;
}

function time(label: string, rows: string[][], check: (cells: string[]) => boolean): { seconds: number; bad: number } {
  let bad = 0;
  const t0 = performance.now();
  for (const cells of rows) if (!check(cells)) bad++;
  const seconds = (performance.now() - t0) / 1000;
  console.log(`${label.padEnd(38)} ${seconds.toFixed(2)} s  ${Math.round(rows.length / seconds).toLocaleString('en-US').padStart(11)} rows/s`);
  return { seconds, bad };
}

export async function runValidateBench(args: string[] = []): Promise<void> {
  const { values } = parseArgs({ args, strict: false, options: { stems: { type: 'string', default: '500000' } } });
  const work = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-bench-validate-'));
  try {
    await generateInventory({ outDir: work, plots: Math.max(1, Math.round(Number(values.stems) / 585)), seed: 5, badRows: 0 });
    const lines = fs.readFileSync(path.join(work, 'trees.csv'), 'utf8').split('\n').filter((l) => l !== '');
    const header = lines.shift()!.split(',');
    const rows = lines.map((l) => l.split(','));
    const order = TREE_COLUMNS.map((c) => header.indexOf(c.name));
    console.log(`field checks of ${rows.length.toLocaleString('en-US')} trees.csv rows (cells already split)`);

    const log = new IssueLog();
    const compiled = TREE_COLUMNS.map((c) => compileFieldCheck(c, { file: 'trees.csv', log, decimalComma: false, forestTypes: [], today: '2100-01-01' }));
    const schema = z.object(Object.fromEntries(TREE_COLUMNS.map((c) => [c.name, zodColumn(c)])));

    const viaCompiled = (cells: string[]) => {
      let ok = true;
      for (let i = 0; i < compiled.length; i++) if (compiled[i](cells[order[i]], 2) === INVALID) ok = false;
      return ok;
    };
    const viaZod = (cells: string[]) => {
      const o: Record<string, string> = {};
      for (let i = 0; i < TREE_COLUMNS.length; i++) o[TREE_COLUMNS[i].name] = cells[order[i]];
      return schema.safeParse(o).success;
    };
    // One warm-up pass each (JIT), then the measured ones.
    for (const f of [viaCompiled, viaZod]) for (let i = 0; i < Math.min(rows.length, 20_000); i++) f(rows[i]);
    const a = time('compiled checks (what ingest uses)', rows, viaCompiled);
    const b = time('zod schema from the same column table', rows, viaZod);
    console.log(`zod / compiled: ${(b.seconds / a.seconds).toFixed(1)}× the time; rows refused: ${a.bad} and ${b.bad}${a.bad === b.bad ? ' (agree)' : ' — DISAGREE'}`);

    const stem = emptyStem();
    let chars = 0;
    const parse = (cells: string[]): Cell[] | null => {
      const out: Cell[] = new Array(compiled.length);
      let ok = true;
      for (let i = 0; i < compiled.length; i++) if ((out[i] = compiled[i](cells[order[i]], 2)) === INVALID) ok = false;
      return ok ? out : null;
    };
    const byName = (cells: string[]) => {
      const v = parse(cells);
      if (v === null) return false;
      chars += copyLine(fillStem(stem, 1, v)).length;
      return true;
    };
    const byPosition = (cells: string[]) => {
      const v = parse(cells);
      if (v === null) return false;
      chars += positionalLine(1, v[1] as string, v[2] as string | null, v[3] as number, v[4] as number | null, v[5] as string, v[6] as string | null, v[7] as number, v[8] === '1').length;
      return true;
    };
    for (const f of [byName, byPosition]) for (let i = 0; i < Math.min(rows.length, 20_000); i++) f(rows[i]);
    const n = time('checks + named reads + stem record line', rows, byName);
    const p = time('checks + positional reads + 9-arg line', rows, byPosition);
    console.log(`named / positional: ${(n.seconds / p.seconds).toFixed(2)}× the time (${chars.toLocaleString('en-US')} characters of COPY text)`);
    // The same comparison on rows with the generator's planted faults: both must refuse the same rows.
    await generateInventory({ outDir: path.join(work, 'bad'), plots: 40, seed: 6, badRows: 400 });
    const badRows = fs.readFileSync(path.join(work, 'bad', 'trees.csv'), 'utf8').split('\n').slice(1).filter((l) => l !== '').map((l) => l.split(','));
    const refused = (f: (cells: string[]) => boolean) => badRows.map((r) => !f(r));
    const x = refused(viaCompiled);
    const y = refused(viaZod);
    const differ = x.filter((v, i) => v !== y[i]).length;
    console.log(`on ${badRows.length.toLocaleString('en-US')} rows with planted faults: refused ${x.filter(Boolean).length} and ${y.filter(Boolean).length}, ${differ === 0 ? 'the same rows' : `${differ} rows DIFFER`}`);
  } finally {
    fs.rmSync(work, { recursive: true, force: true });
  }
}

if (process.argv[1] && pathToFileURL(process.argv[1]).href === import.meta.url) {
  await runValidateBench(process.argv.slice(2));
}
