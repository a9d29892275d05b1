import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

// Sources are cited inside the repository (docs/methods.md, docs/exports.md, docs/upload-format.md) or
// by their published reference: a reader who clones the project must be able to follow every citation.
// This file scans every tracked .ts, .mjs and .md file for citations of notes that are not in the
// repository and for absolute filesystem paths, and checks that every cited docs/methods.md#anchor is a
// heading of docs/methods.md. It skips itself: its sample strings are what the detector must catch.

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const SELF = path.relative(ROOT, fileURLToPath(import.meta.url)).split(path.sep).join('/');

/** Notes kept beside the project, never in it; a bare name counts unless the repository has a file of that name. */
const OUTSIDE_NOTE_NAMES = ['sources.md', 'outputs.md', 'inventory-format.md', 'design.md', 'stack.md', 'style.md'];

// ../shared anywhere, or shared/ followed by one of the folders or notes of the reference folder.
const SHARED_PATH = /(?:\.\.\/)+shared\b|\bshared\/(?:spec|reference|hooks)\b|\bshared\/(?:stack|design|style)\.md\b/;
// An absolute path into a home, work or scratch folder: the slash must not follow a word character,
// a dot, a colon or another slash, so URLs (https://host/home/…) and relative paths (a/tmp/b) pass.
const ABSOLUTE_PATH = /(?<![\w.:/~@$-])\/(?:work|home|root|tmp|Users|mnt)\/[\w.-]/;

interface Finding {
  readonly rule: 'shared_path' | 'outside_note' | 'absolute_path';
  readonly text: string;
}

function noteNamePattern(trackedNames: ReadonlySet<string>): RegExp | null {
  const names = OUTSIDE_NOTE_NAMES.filter((n) => !trackedNames.has(n));
  if (names.length === 0) return null;
  // a bare file name, not part of a longer name (upload-format.md is not inventory-format.md)
  return new RegExp(`(?<![\\w-])(?:${names.map((n) => n.replace(/[.-]/g, '\\$&')).join('|')})(?![\\w-])`);
}

/** What a piece of comment or string text cites that a reader of the repository cannot follow. */
function findOutsideCitations(text: string, where: 'comment' | 'string', trackedNames: ReadonlySet<string> = new Set()): Finding[] {
  const out: Finding[] = [];
  const shared = SHARED_PATH.exec(text);
  if (shared) out.push({ rule: 'shared_path', text: shared[0] });
  const note = noteNamePattern(trackedNames)?.exec(text);
  if (note) out.push({ rule: 'outside_note', text: note[0] });
  // absolute paths only in comments and prose: code builds real paths from os.tmpdir() and friends
  if (where === 'comment') {
    const abs = ABSOLUTE_PATH.exec(text);
    if (abs) out.push({ rule: 'absolute_path', text: abs[0] });
  }
  return out;
}

interface Piece {
  readonly kind: 'comment' | 'string';
  readonly line: number;
  readonly text: string;
}

/** Comments and string literals of a TypeScript or JavaScript file, from the compiler's own parser. */
function commentsAndStrings(fileName: string, source: string): Piece[] {
  const kind = fileName.endsWith('.ts') ? ts.ScriptKind.TS : ts.ScriptKind.JS;
  const sf = ts.createSourceFile(fileName, source, ts.ScriptTarget.Latest, true, kind);
  const pieces: Piece[] = [];
  const seen = new Set<number>();
  const lineOf = (pos: number) => sf.getLineAndCharacterOfPosition(pos).line + 1;
  const addComments = (ranges: readonly ts.CommentRange[] | undefined) => {
    for (const r of ranges ?? []) {
      if (seen.has(r.pos)) continue;
      seen.add(r.pos);
      pieces.push({ kind: 'comment', line: lineOf(r.pos), text: source.slice(r.pos, r.end) });
    }
  };
  const visit = (node: ts.Node): void => {
    addComments(ts.getLeadingCommentRanges(source, node.pos));
    addComments(ts.getLeadingCommentRanges(source, node.end));
    addComments(ts.getTrailingCommentRanges(source, node.end));
    if (ts.isStringLiteralLike(node) || ts.isTemplateLiteralToken(node)) {
      pieces.push({ kind: 'string', line: lineOf(node.getStart(sf)), text: node.text });
    }
    ts.forEachChild(node, visit);
  };
  // a shebang or a comment before the first token belongs to no node's leading trivia in some files
  addComments(ts.getLeadingCommentRanges(source, 0));
  visit(sf);
  return pieces;
}

function trackedFiles(): string[] {
  const out = execFileSync('git', ['ls-files', '-z', '--', '*.ts', '*.mjs', '*.md'], { cwd: ROOT, encoding: 'utf8' });
  return out
    .split('\0')
    .filter((f) => f !== '' && !f.split('/').includes('node_modules') && f !== SELF)
    .filter((f) => fs.existsSync(path.join(ROOT, f)));
}

/** GitHub's heading anchor: lower case, punctuation dropped (letters, digits, _ and - kept), spaces to hyphens. */
function githubAnchor(heading: string): string {
  return heading
    .trim()
    .toLowerCase()
    .replace(/[^\p{L}\p{N}\s_-]/gu, '')
    .replace(/\s/g, '-');
}

/** The anchors of a markdown file's headings (fenced code skipped), repeated ones numbered as GitHub does. */
function headingAnchors(markdown: string): Set<string> {
  const anchors = new Set<string>();
  const count = new Map<string, number>();
  let fenced = false;
  for (const line of markdown.split('\n')) {
    if (/^\s*```/.test(line)) fenced = !fenced;
    const m = fenced ? null : /^#{1,6}\s+(.+?)\s*#*\s*$/.exec(line);
    if (!m) continue;
    const base = githubAnchor(m[1]);
    const n = count.get(base) ?? 0;
    count.set(base, n + 1);
    anchors.add(n === 0 ? base : `${base}-${n}`);
  }
  return anchors;
}

describe('the outside-citation detector', () => {
  const hit = (text: string, where: 'comment' | 'string' = 'comment') => findOutsideCitations(text, where).map((f) => f.rule);

  it('catches the reference folder, its notes and absolute paths', () => {
    // The sample paths are joined from parts, so this file never cites one itself.
    const joined = (...parts: string[]) => parts.join('/');
    const specNote = joined('shared', 'spec', 'outputs.md');
    expect(hit(`// see ${specNote}`)).toContain('shared_path');
    expect(hit(`// see ${specNote}`)).toContain('outside_note');
    expect(hit(`(${joined('..', 'shared', 'reference')})`)).toEqual(['shared_path']);
    expect(hit(`values of ${joined('shared', 'stack.md')}`)).toContain('shared_path');
    expect(hit('worked numbers of sources.md (computed)')).toEqual(['outside_note']);
    expect(hit('rules of inventory-format.md')).toEqual(['outside_note']);
    expect(hit(`// example of /${joined('work', 'shared', 'reference', 'sources.md')}`)).toEqual(['shared_path', 'outside_note', 'absolute_path']);
    expect(hit('// profile written to /tmp/report-prof')).toEqual(['absolute_path']);
    expect(hit('see /home/someone/notes.txt')).toEqual(['absolute_path']);
    expect(hit('`/root/x`')).toEqual(['absolute_path']);
  });

  it('lets through what is not an outside citation', () => {
    expect(hit('// https://www.itl.nist.gov/div898/strd/ and https://example.org/home/page')).toEqual([]);
    expect(hit('// GET /v1/regions/:region/summary and /v1/batches')).toEqual([]);
    expect(hit('// docs/methods.md#fishers-alpha, docs/exports.md, docs/upload-format.md')).toEqual([]);
    expect(hit('// services/compute/src/shared/util.ts and a/tmp/b')).toEqual([]);
    expect(hit('// fs.mkdtempSync(path.join(os.tmpdir(), "stemwise-"))')).toEqual([]);
    expect(hit("'/tmp/scratch'", 'string')).toEqual([]);
    expect(findOutsideCitations('see design.md', 'comment', new Set(['design.md']))).toEqual([]);
  });

  it('reads comments and strings through the TypeScript parser, not through regular expressions', () => {
    const src = [
      '#!/usr/bin/env node',
      '// first comment',
      "const re = /https?:\\/\\//; // after a regex",
      'const s = `a ${"inner"} b`; /* block */',
      'function f() {',
      '  return 1;',
      '  // before the closing brace',
      '}',
      '',
    ].join('\n');
    const pieces = commentsAndStrings('sample.ts', src);
    const comments = pieces.filter((p) => p.kind === 'comment').map((p) => p.text);
    expect(comments).toEqual(expect.arrayContaining(['// first comment', '// after a regex', '/* block */', '// before the closing brace']));
    expect(comments.some((c) => c.includes('https'))).toBe(false);
    const strings = pieces.filter((p) => p.kind === 'string').map((p) => p.text);
    expect(strings).toEqual(expect.arrayContaining(['inner', 'a ', ' b']));
  });

  it('computes the anchors GitHub gives to headings', () => {
    expect(githubAnchor("Fisher's alpha")).toBe('fishers-alpha');
    expect(githubAnchor('Chao1, bias-corrected')).toBe('chao1-bias-corrected');
    expect(githubAnchor('Mitchell-Olds and Shaw test')).toBe('mitchell-olds-and-shaw-test');
    expect([...headingAnchors('# A\n## B c\n```\n# not a heading\n```\n## B c\n')]).toEqual(['a', 'b-c', 'b-c-1']);
  });
});

describe('citations in the repository', () => {
  const files = trackedFiles();
  const trackedNames = new Set(files.map((f) => path.posix.basename(f)));

  it('scans the tracked sources and documents', () => {
    expect(files.length).toBeGreaterThan(100);
    expect(files).toContain('docs/methods.md');
  });

  it('cite no file outside the repository and no absolute path', () => {
    const problems: string[] = [];
    for (const file of files) {
      const text = fs.readFileSync(path.join(ROOT, file), 'utf8');
      const pieces: Piece[] = file.endsWith('.md')
        ? text.split('\n').map((t, i) => ({ kind: 'comment' as const, line: i + 1, text: t }))
        : commentsAndStrings(file, text);
      for (const p of pieces) {
        for (const f of findOutsideCitations(p.text, p.kind, trackedNames)) {
          problems.push(`${file}:${p.line}: ${f.rule} '${f.text}'`);
        }
      }
    }
    expect(problems, 'cite docs/methods.md, docs/exports.md, docs/upload-format.md or the published source instead').toEqual([]);
  });

  it('cite only anchors that docs/methods.md has', () => {
    const methods = fs.readFileSync(path.join(ROOT, 'docs/methods.md'), 'utf8');
    const anchors = headingAnchors(methods);
    expect(anchors).toContain('fishers-alpha');
    const missing: string[] = [];
    let cited = 0;
    for (const file of files) {
      const text = fs.readFileSync(path.join(ROOT, file), 'utf8');
      const refs = [...text.matchAll(/\bmethods\.md#([\w-]+)/g)].map((m) => m[1]);
      if (file === 'docs/methods.md') refs.push(...[...text.matchAll(/\]\(#([\w-]+)\)/g)].map((m) => m[1]));
      for (const anchor of refs) {
        cited += 1;
        if (!anchors.has(anchor)) missing.push(`${file}: methods.md#${anchor}`);
      }
    }
    expect(cited).toBeGreaterThan(10);
    expect(missing).toEqual([]);
  });
});
