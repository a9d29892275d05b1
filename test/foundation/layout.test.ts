// The layout of the repository as DEVELOPERS.md describes it: three sibling services over one shared
// core (no service imports another), closed packages (no "./*" export), and pure science in
// core/src/science (no database, queue, HTTP server or file system).
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../../scripts/build';

const SERVICES = ['ingest', 'compute', 'report'] as const;

/** Bare module specifiers a TypeScript source imports: static, re-exported, side-effect and dynamic. */
function importedModules(source: string): string[] {
  const found: string[] = [];
  const patterns = [/\bfrom\s*['"]([^'"]+)['"]/g, /\bimport\s*['"]([^'"]+)['"]/g, /\bimport\s*\(\s*['"]([^'"]+)['"]\s*\)/g, /\brequire\s*\(\s*['"]([^'"]+)['"]\s*\)/g];
  for (const re of patterns) for (const m of source.matchAll(re)) found.push(m[1]);
  return found;
}

/** The package a specifier names ('@scope/name' or 'name'), without its subpath. */
function packageOf(specifier: string): string {
  const parts = specifier.split('/');
  return specifier.startsWith('@') ? parts.slice(0, 2).join('/') : parts[0];
}

function tsFiles(dir: string): string[] {
  if (!fs.existsSync(dir)) return [];
  const out: string[] = [];
  for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
    if (e.name === 'node_modules') continue;
    const p = path.join(dir, e.name);
    if (e.isDirectory()) out.push(...tsFiles(p));
    else if (e.name.endsWith('.ts')) out.push(p);
  }
  return out;
}

/** `file imports module` lines for every import of another service from a file of `service`. */
function siblingImports(service: string, files: ReadonlyArray<{ file: string; source: string }>): string[] {
  const others = SERVICES.filter((s) => s !== service).map((s) => `@stemwise/${s}`);
  const bad: string[] = [];
  for (const { file, source } of files) {
    for (const spec of importedModules(source)) if (others.includes(packageOf(spec))) bad.push(`${file} imports ${spec}`);
  }
  return bad;
}

/** What pure science may not import: the database, the queue, the HTTP server, the file system. */
const IMPURE = ['@stemwise/db', '@stemwise/platform', 'pg', 'pg-copy-streams', '@electric-sql/pglite', 'drizzle-orm', 'bullmq', 'ioredis', 'fastify', 'node:fs', 'fs', 'node:fs/promises', 'fs/promises'];

/** Entry points of those packages that hold pure data only (no imports at all; checked below). */
const PURE_ENTRY_POINTS: Readonly<Record<string, string>> = { '@stemwise/db/catalogue': path.join('db', 'src', 'catalogue') };

function impureImports(files: ReadonlyArray<{ file: string; source: string }>): string[] {
  const bad: string[] = [];
  for (const { file, source } of files) {
    for (const spec of importedModules(source)) {
      if (spec in PURE_ENTRY_POINTS) continue;
      if (IMPURE.includes(spec) || IMPURE.includes(packageOf(spec))) bad.push(`${file} imports ${spec}`);
    }
  }
  return bad;
}

/** Every package.json of the workspace (the root and its workspaces). */
function packageJsons(): string[] {
  const root = JSON.parse(fs.readFileSync(path.join(ROOT, 'package.json'), 'utf8')) as { workspaces: string[] };
  return ['package.json', ...root.workspaces.map((w) => path.join(w, 'package.json'))];
}

/** Export keys of a package.json that are wildcards ("./*" and the like). */
function wildcardExports(pkg: { exports?: unknown }): string[] {
  const e = pkg.exports;
  if (!e || typeof e !== 'object') return [];
  return Object.keys(e).filter((k) => k.includes('*'));
}

const read = (files: string[]) => files.map((f) => ({ file: path.relative(ROOT, f), source: fs.readFileSync(f, 'utf8') }));

describe('the layout', () => {
  it.each(SERVICES)('services/%s imports no other service (static, re-export or dynamic import)', (service) => {
    const files = read(tsFiles(path.join(ROOT, 'services', service)));
    expect(files.length).toBeGreaterThan(0);
    expect(siblingImports(service, files)).toEqual([]);
  });

  it('finds a sibling import in every form it can take (the check itself)', () => {
    const sources = [
      "import { x } from '@stemwise/compute';",
      "import type { Y } from '@stemwise/report/routes';",
      "export { z } from '@stemwise/compute';",
      "const m = await import('@stemwise/report');",
      "const n = await import(\n  '@stemwise/compute'\n);",
      "import '@stemwise/report';",
    ].map((source, i) => ({ file: `f${i}.ts`, source }));
    expect(siblingImports('ingest', sources)).toHaveLength(sources.length);
    expect(siblingImports('ingest', [{ file: 'ok.ts', source: "import { a } from '@stemwise/core';\nimport { b } from '@stemwise/ingest';" }])).toEqual([]);
  });

  it('has no wildcard export in any package.json', () => {
    const files = packageJsons();
    expect(files).toContain(path.join('core', 'package.json'));
    const bad = files.flatMap((f) => wildcardExports(JSON.parse(fs.readFileSync(path.join(ROOT, f), 'utf8'))).map((k) => `${f}: "${k}"`));
    expect(bad).toEqual([]);
    expect(wildcardExports({ exports: { '.': './src/index.ts', './*': './src/*.ts' } })).toEqual(['./*']);
  });

  it('keeps core/src/science pure: no database, queue, HTTP server or file system', () => {
    const files = read(tsFiles(path.join(ROOT, 'core', 'src', 'science')).filter((f) => !f.endsWith('.test.ts')));
    expect(files.length).toBeGreaterThan(10);
    expect(impureImports(files)).toEqual([]);
    expect(impureImports([{ file: 'x.ts', source: "import fs from 'node:fs';\nimport { Pool } from 'pg';\nimport type { Db } from '@stemwise/db';" }])).toHaveLength(3);
    expect(impureImports([{ file: 'y.ts', source: "import { PLOT_METRICS } from '@stemwise/db/catalogue';" }])).toEqual([]);
  });

  it.each(Object.entries(PURE_ENTRY_POINTS))('keeps %s pure data: its folder imports nothing', (_entry, folder) => {
    const files = read(tsFiles(path.join(ROOT, folder)).filter((f) => !f.endsWith('.test.ts')));
    expect(files.length).toBeGreaterThan(0);
    expect(files.flatMap(({ file, source }) => importedModules(source).map((spec) => `${file} imports ${spec}`))).toEqual([]);
  });
});
