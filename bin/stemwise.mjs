#!/usr/bin/env node
// Runs the compiled build (dist/stemwise.mjs and its chunks, made by `npm run build`, which `npm ci` and
// `npm install` run as the root package's `prepare` script) when no source is newer than it; otherwise
// the TypeScript sources directly (tsx), compiled at each start, so an edited source is never shadowed
// by an old build (`npm run build` makes it current again).
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const built = path.join(root, 'dist', 'stemwise.mjs');

/** Newest modification time of the TypeScript sources of the workspace packages (0 if none). */
function newestSource(dir) {
  let newest = 0;
  for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
    if (e.name === 'node_modules' || e.name.startsWith('.')) continue;
    const p = path.join(dir, e.name);
    if (e.isDirectory()) newest = Math.max(newest, newestSource(p));
    else if (e.name.endsWith('.ts')) newest = Math.max(newest, fs.statSync(p).mtimeMs);
  }
  return newest;
}

function buildIsCurrent() {
  let builtAt;
  try {
    builtAt = fs.statSync(built).mtimeMs;
  } catch {
    return false;
  }
  const sources = ['platform', 'db', 'core', 'services', 'cli', 'demo-inventory'].map((d) => path.join(root, d)).filter((d) => fs.existsSync(d));
  return sources.every((d) => newestSource(d) <= builtAt);
}

let main;
if (buildIsCurrent()) ({ main } = await import(pathToFileURL(built).href));
else {
  const { register } = await import('tsx/esm/api');
  register();
  ({ main } = await import('../cli/src/main.ts'));
}
process.exitCode = await main(process.argv.slice(2));
