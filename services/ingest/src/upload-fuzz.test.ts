import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import type { BatchIssueRow } from '@stemwise/db';
import { IssueLog } from './issues';
import { CsvSplitter, type CsvEvent } from './read/csv-splitter';
import { FileProblem } from './read/file-problem';
import { textChunks } from './read/text-chunks';
import { ALL_RULES, PLAUSIBILITY_DEFAULTS, STRUCTURE } from '@stemwise/core';
import { COLUMNS_OF, type ColumnSpec } from './rules/columns';
import { compileFieldCheck, INVALID } from './rules/field-checks';
import { latestAllowedDate, type ValidationContext } from './validate/context';
import { validatePlots } from './validate/plots';
import { validateTrees } from './validate/trees';

// Property-based tests of the upload parser and validator on random input and on random mutations of
// a small valid batch (an invented inventory: the Marrowind plots). Fixed seeds and run counts keep
// them reproducible and within a few seconds; a failure prints its seed and shrunk counterexample.

const SEED = 20_260_513;
const RULE_CODES = new Set(ALL_RULES.map((r) => r.code));
/** Rules about a whole file or a whole plot: their issues have no line. */
const WITHOUT_LINE = new Set(['structure_empty_file', 'structure_gzip_corrupt', 'plausibility_dbh_looks_mm', 'plausibility_species_no_reference']);

const PLOTS = [
  'plot_id,region,forest_type,latitude,longitude,area_ha,dbh_min_cm,subplot_area_ha,subplot_dbh_min_cm,survey_date,logging_class,fire_class,elevation_m',
  'FZ-01,Saltreach,wet,-2.5101,26.1003,1,10,0.04,5,2024-03-02,0,0,310',
  'FZ-02,Saltreach,dry,-2.6120,26.2207,0.5,10,0,5,2024-03-04,2,1,',
].join('\n');
const TREES = [
  'plot_id,tree_id,species,dbh_cm,height_m,status,stump_cause,fire_damage,in_subplot',
  'FZ-01,a1,Ossara lumen,31.5,21.0,live,,0,0',
  'FZ-01,a2,Tikka rubra,12.0,,dead,,1,0',
  'FZ-01,a3,,6.2,,live,,0,1',
  'FZ-01,a4,Ossara sp.,44.0,,stump,logged,0,0',
  'FZ-02,b1,Tikka rubra,18.4,14.5,live,,2,0',
  'FZ-02,b2,indet,27.0,,live,,0,0',
].join('\n');

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-fuzz-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));
let fileNo = 0;
function stored(bytes: Uint8Array): string {
  const p = path.join(dir, `f${fileNo++}`);
  fs.writeFileSync(p, bytes);
  return p;
}

function context(log: IssueLog): ValidationContext {
  return {
    log,
    options: { skip_invalid: false, replace: false, delimiter: ',', decimal_comma: false },
    forestTypes: ['wet', 'moist', 'dry'],
    today: latestAllowedDate(),
    plausibility: PLAUSIBILITY_DEFAULTS,
    progress: { bytesRead: 0, rowsChecked: 0, rowsLoaded: 0 },
    tick: () => {},
  };
}

/** Checks the batch's two files as the ingest job does (without a database: no stored plots, no species list). */
async function validate(plots: Uint8Array, trees: Uint8Array, gzip: boolean) {
  const log = new IssueLog();
  const ctx = context(log);
  const pack = (b: Uint8Array) => stored(gzip ? gzipSync(b) : b);
  const p = await validatePlots(ctx, { file: 'plots.csv', path: pack(plots), gzip });
  const t = await validateTrees(ctx, { file: 'trees.csv', path: pack(trees), gzip }, {
    plots: p.plots,
    lookupStored: async () => ({ plots: [], treeIds: [] }),
    sink: null,
    species: null,
    plotsReadable: !p.stats.fatal,
    checkDuplicates: true,
  });
  return { log, rows: log.rows(), plots: p, trees: t };
}

/** Every issue names a known rule, its file and (unless the rule is about a whole file) a line; none holds a NUL. */
function expectWellFormed(rows: BatchIssueRow[], files = ['plots.csv', 'trees.csv']): void {
  for (const r of rows) {
    expect(RULE_CODES.has(r.rule), r.rule).toBe(true);
    expect(files).toContain(r.file);
    if (r.line === null) expect(WITHOUT_LINE.has(r.rule) || r.column === '*', JSON.stringify(r)).toBe(true);
    else expect(Number.isInteger(r.line) && r.line >= 1, JSON.stringify(r)).toBe(true);
    expect(r.message.length).toBeGreaterThan(0);
    for (const s of [r.message, r.value, r.column]) if (s !== null) expect(s.includes('\0')).toBe(false);
  }
}

/** Every row counted as rejected has an error on its own line of its file. */
function expectRejectedRowsNamed(rows: BatchIssueRow[], file: string, badRows: number): void {
  const lines = new Set(rows.filter((r) => r.severity === 'error' && r.file === file && r.line !== null).map((r) => r.line));
  expect(lines.size).toBeGreaterThanOrEqual(badRows);
}

const utf8 = (s: string) => Buffer.from(s, 'utf8');
const PIECES = ['a', 'Z', '7', '.', '-', ' ', ',', ';', '"', '""', '\n', '\r', '\r\n', '\t', '\0', '\ufeff', 'é', '日', '\u{1F332}'];
const csvText = fc.array(fc.constantFrom(...PIECES), { maxLength: 120 }).map((a) => a.join(''));

describe('the upload parser under random input (fast-check)', () => {
  it('the CSV splitter gives the same records in any chunking, lines in order, or stops on a too-long line', () => {
    const run = (text: string, cuts: number[]) => {
      const s = new CsvSplitter(',', 64);
      const out: CsvEvent[] = [];
      try {
        let at = 0;
        for (const c of [...cuts.map((k) => k % (text.length + 1)).sort((a, b) => a - b), text.length]) {
          s.push(text.slice(at, Math.max(at, c)), out);
          at = Math.max(at, c);
        }
        s.end(out);
        return { out, stop: null };
      } catch (err) {
        if (!(err instanceof FileProblem) || err.rule !== STRUCTURE.lineTooLong) throw err;
        return { out, stop: err.line };
      }
    };
    fc.assert(
      fc.property(csvText, fc.array(fc.nat(200), { maxLength: 6 }), (text, cuts) => {
        const whole = run(text, []);
        const chunked = run(text, cuts);
        expect(chunked.stop).toBe(whole.stop);
        if (whole.stop === null) expect(chunked.out).toEqual(whole.out);
        let last = 0;
        for (const e of whole.out) {
          expect(e.line).toBeGreaterThan(last);
          last = e.line;
          if ('fields' in e) expect(e.lines).toBeGreaterThanOrEqual(1);
        }
      }),
      { seed: SEED, numRuns: 1000 },
    );
  });

  it('reading text chunks yields strings or stops with a file problem (encoding, gzip), for any bytes', async () => {
    const bytes = fc.oneof(
      fc.uint8Array({ maxLength: 400 }),
      fc.tuple(fc.constantFrom([0xef, 0xbb, 0xbf], [0xff, 0xfe], [0xfe, 0xff], [0x1f, 0x8b, 8, 0]), fc.uint8Array({ maxLength: 200 })).map(([a, b]) => Uint8Array.from([...a, ...b])),
    );
    await fc.assert(
      fc.asyncProperty(bytes, fc.boolean(), fc.boolean(), async (raw, gzip, cut) => {
        let data: Uint8Array = gzip && !(raw[0] === 0x1f && raw[1] === 0x8b) ? gzipSync(raw) : raw;
        if (cut) data = data.subarray(0, Math.floor(data.length / 2));
        try {
          for await (const text of textChunks(stored(data), gzip, () => {})) expect(typeof text).toBe('string');
        } catch (err) {
          expect(err).toBeInstanceOf(FileProblem);
          expect([STRUCTURE.encoding.code, STRUCTURE.gzipCorrupt.code]).toContain((err as FileProblem).rule.code);
        }
      }),
      { seed: SEED, numRuns: 200 },
    );
  });

  it('a field check returns a value of its column or logs exactly one issue on its line, for any text', () => {
    const columns: Array<[string, ColumnSpec]> = Object.entries(COLUMNS_OF).flatMap(([kind, cols]) => cols.map((c) => [`${kind}.csv`, c] as [string, ColumnSpec]));
    const raw = fc.oneof(
      fc.string({ unit: 'binary', maxLength: 80 }),
      fc.double().map(String),
      fc.integer({ min: -5, max: 5 }).map(String),
      fc.constantFrom('', ' ', '1e999', '-0', '.5', '5.', '0x10', 'NaN', 'Infinity', '2024-02-29', '2023-02-29', '9999-12-31', 'live', ' wet ', '1,5', '\0', 'a'.repeat(70)),
    );
    fc.assert(
      fc.property(fc.constantFrom(...columns), raw, fc.integer({ min: 2, max: 1e6 }), ([file, column], value, line) => {
        const log = new IssueLog();
        const check = compileFieldCheck(column, { file, log, decimalComma: false, forestTypes: ['wet', 'moist', 'dry'], today: latestAllowedDate() });
        const v = check(value, line);
        const rows = log.rows();
        if (v === INVALID) {
          expect(rows).toHaveLength(1);
          expect(rows[0]).toMatchObject({ severity: 'error', file, line, column: column.name });
          expectWellFormed(rows, [file]);
        } else {
          expect(rows).toHaveLength(0);
          if (column.kind === 'number' && v !== null) expect(Number.isFinite(v)).toBe(true);
          if (column.kind === 'integer' && v !== null) expect(Number.isInteger(v)).toBe(true);
          if (column.kind === 'text' && v !== null) expect((v as string).length).toBeLessThanOrEqual(column.maxLength);
        }
      }),
      { seed: SEED, numRuns: 1500 },
    );
  });
});

// Mutations of a file's text: the careless user's and the attacker's.
type Mutation = (s: string) => string;
const at = (s: string, k: number) => k % (s.length + 1);
const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.tuple(fc.nat(), fc.constantFrom(...PIECES)).map(([k, piece]): Mutation => (s) => s.slice(0, at(s, k)) + piece + s.slice(at(s, k))),
  fc.tuple(fc.nat(), fc.nat(30)).map(([k, n]): Mutation => (s) => s.slice(0, at(s, k)) + s.slice(at(s, k) + n)),
  fc.tuple(fc.nat(), fc.constantFrom(',', '"', '\0', '\n', ';', 'x')).map(([k, c]): Mutation => (s) => s.slice(0, at(s, k)) + c + s.slice(at(s, k) + 1)),
  fc.nat().map((k): Mutation => (s) => s.slice(0, at(s, k))),
  fc.constant<Mutation>((s) => `\ufeff${s}`),
  fc.constant<Mutation>((s) => s.replace(/\n/g, '\r\n')),
  fc.constant<Mutation>((s) => s.replace(/,/g, ';')),
  fc.tuple(fc.nat(), fc.constantFrom(70, 5000, 1_100_000)).map(([k, n]): Mutation => (s) => s.slice(0, at(s, k)) + 'x'.repeat(n) + s.slice(at(s, k))),
);

describe('the validator on mutated batches (fast-check)', () => {
  it('never throws; every issue has a known rule, its file and a line; every rejected row is named', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(mutation, { minLength: 1, maxLength: 3 }),
        fc.array(mutation, { maxLength: 1 }),
        fc.uint8Array({ maxLength: 6 }),
        fc.boolean(),
        async (treeEdits, plotEdits, rawBytes, gzip) => {
          const trees = treeEdits.reduce((s, m) => m(s), TREES);
          const plots = plotEdits.reduce((s, m) => m(s), PLOTS);
          // Raw bytes (often not UTF-8) spliced into the middle of trees.csv.
          const t = utf8(trees);
          const half = t.length >> 1;
          const treeBytes = Buffer.concat([t.subarray(0, half), rawBytes, t.subarray(half)]);
          const r = await validate(utf8(plots), treeBytes, gzip);
          expectWellFormed(r.rows);
          expectRejectedRowsNamed(r.rows, 'trees.csv', r.trees.stats.badRows);
          expectRejectedRowsNamed(r.rows, 'plots.csv', r.plots.stats.badRows);
        },
      ),
      { seed: SEED, numRuns: 200 },
    );
  });

  it('a valid batch stays valid through BOMs, CRLF, quoting, column order, header case, blank lines and gzip', async () => {
    const reshape = (text: string, order: number[], quote: boolean[], crlf: boolean, bom: boolean, upper: boolean, blank: boolean) => {
      const rows = text.split('\n').map((l) => l.split(','));
      const perm = [...rows[0].keys()].sort((a, b) => (order[a] ?? 0) - (order[b] ?? 0) || a - b);
      const out = rows.map((r, i) =>
        perm
          .map((k, j) => {
            const v = i === 0 && upper ? r[k].toUpperCase() : r[k];
            return quote[(i * 13 + j) % quote.length] ? `"${v}"` : v;
          })
          .join(','),
      );
      if (blank) out.splice(2, 0, '', '  ');
      const body = out.join(crlf ? '\r\n' : '\n') + (blank ? '\n\n' : '');
      return bom ? `\ufeff${body}` : body;
    };
    const shape = fc.tuple(fc.array(fc.nat(20), { maxLength: 13 }), fc.array(fc.boolean(), { minLength: 1, maxLength: 20 }), fc.boolean(), fc.boolean(), fc.boolean(), fc.boolean());
    await fc.assert(
      fc.asyncProperty(shape, shape, fc.boolean(), async (ps, ts, gzip) => {
        const r = await validate(utf8(reshape(PLOTS, ...ps)), utf8(reshape(TREES, ...ts)), gzip);
        expect(r.rows.filter((i) => i.severity === 'error')).toEqual([]);
        expect(r.trees.stats).toEqual({ rows: 6, badRows: 0, fatal: false });
        expect([...r.plots.plots.keys()]).toEqual(['FZ-01', 'FZ-02']);
        expect(r.log.errors).toBe(0);
      }),
      { seed: SEED, numRuns: 150 },
    );
  });
});
